package tui

import "github.com/charmbracelet/bubbles/key"

// KeyMap holds every key binding of the screen.
type KeyMap struct {
	Up         key.Binding
	Down       key.Binding
	Less       key.Binding
	More       key.Binding
	LessCoarse key.Binding
	MoreCoarse key.Binding
	Type       key.Binding // type a knob's value
	Pick       key.Binding // make the line-up row the current cell
	Rank       key.Binding // line-up: cost per hour or runtime
	NextView   key.Binding
	PrevView   key.Binding
	Design     key.Binding
	Lineup     key.Binding
	Reverse    key.Binding
	Spread     key.Binding
	Save       key.Binding
	Report     key.Binding // write the one-file report of the current design
	Help       key.Binding
	Notes      key.Binding // every warning and caution
	Product    key.Binding // the product form: name, load phases, standby, price
	Back       key.Binding
	Quit       key.Binding

	// In a question or a text field.
	Accept key.Binding
	Cancel key.Binding
	Yes    key.Binding
	No     key.Binding
}

// DefaultKeyMap returns the screen's keys.
func DefaultKeyMap() KeyMap {
	return KeyMap{
		Up:         key.NewBinding(key.WithKeys("up", "k"), key.WithHelp("↑/k", "previous")),
		Down:       key.NewBinding(key.WithKeys("down", "j"), key.WithHelp("↓/j", "next")),
		Less:       key.NewBinding(key.WithKeys("left", "h"), key.WithHelp("←/h", "less")),
		More:       key.NewBinding(key.WithKeys("right", "l"), key.WithHelp("→/l", "more")),
		LessCoarse: key.NewBinding(key.WithKeys("shift+left", "["), key.WithHelp("shift+←/[", "much less")),
		MoreCoarse: key.NewBinding(key.WithKeys("shift+right", "]"), key.WithHelp("shift+→/]", "much more")),
		Type:       key.NewBinding(key.WithKeys("enter"), key.WithHelp("enter", "type value")),
		Pick:       key.NewBinding(key.WithKeys("enter"), key.WithHelp("enter", "use this cell")),
		Rank:       key.NewBinding(key.WithKeys("o"), key.WithHelp("o", "order by cost/runtime")),
		NextView:   key.NewBinding(key.WithKeys("tab"), key.WithHelp("tab", "next view")),
		PrevView:   key.NewBinding(key.WithKeys("shift+tab"), key.WithHelp("shift+tab", "previous view")),
		Design:     key.NewBinding(key.WithKeys("1"), key.WithHelp("1", "design")),
		Lineup:     key.NewBinding(key.WithKeys("2"), key.WithHelp("2", "cell line-up")),
		Reverse:    key.NewBinding(key.WithKeys("3"), key.WithHelp("3", "reversed cells")),
		Spread:     key.NewBinding(key.WithKeys("4"), key.WithHelp("4", "spread")),
		Save:       key.NewBinding(key.WithKeys("s"), key.WithHelp("s", "save")),
		Report:     key.NewBinding(key.WithKeys("r"), key.WithHelp("r", "write report")),
		Help:       key.NewBinding(key.WithKeys("?"), key.WithHelp("?", "help")),
		Notes:      key.NewBinding(key.WithKeys("w"), key.WithHelp("w", "warnings")),
		Product:    key.NewBinding(key.WithKeys("e"), key.WithHelp("e", "product")),
		Back:       key.NewBinding(key.WithKeys("esc"), key.WithHelp("esc", "back")),
		Quit:       key.NewBinding(key.WithKeys("q", "ctrl+c"), key.WithHelp("q", "quit")),
		Accept:     key.NewBinding(key.WithKeys("enter"), key.WithHelp("enter", "accept")),
		Cancel:     key.NewBinding(key.WithKeys("esc"), key.WithHelp("esc", "cancel")),
		Yes:        key.NewBinding(key.WithKeys("y", "Y"), key.WithHelp("y", "yes, overwrite")),
		No:         key.NewBinding(key.WithKeys("n", "N", "esc"), key.WithHelp("n", "no, keep it")),
	}
}

// hint is a binding shown in the one-line hint only, naming a pair of
// keys at once.
func hint(keys, desc string) key.Binding {
	return key.NewBinding(key.WithKeys(keys), key.WithHelp(keys, desc))
}

// ShortHelp is the design view's one-line hint, without help and quit,
// which the hint line always ends with.
func (k KeyMap) ShortHelp() []key.Binding {
	return []key.Binding{hint("↑/↓", "choose knob"), hint("←/→", "adjust"), hint("[/]", "big steps"),
		k.Type, hint("tab", "views"), k.Save, k.Report}
}

// FullHelp lists every binding, grouped.
func (k KeyMap) FullHelp() [][]key.Binding {
	return [][]key.Binding{
		{k.Up, k.Down, k.Less, k.More, k.LessCoarse, k.MoreCoarse, k.Type},
		{k.Pick, k.Rank, k.NextView, k.PrevView, k.Design, k.Lineup, k.Reverse, k.Spread},
		{k.Save, k.Report, k.Notes, k.Product, k.Help, k.Back, k.Quit},
	}
}

// viewKeys is the KeyMap seen from one view and mode, for the help line:
// it offers only the keys that do something there.
type viewKeys struct {
	k    KeyMap
	view screen
	mode mode
}

func (v viewKeys) ShortHelp() []key.Binding {
	k := v.k
	switch v.mode {
	case modeEdit, modeSaveName:
		return []key.Binding{k.Accept, k.Cancel}
	case modeSaveConfirm:
		return []key.Binding{k.Yes, k.No}
	case modeHelp:
		return []key.Binding{hint("?/esc", "close")}
	case modeNotes:
		return []key.Binding{hint("w/esc", "close")}
	case modeProduct:
		return []key.Binding{hint("↑/↓", "choose"), k.Type, hint("e/esc", "back")}
	case modeProductEdit:
		return []key.Binding{k.Accept, k.Cancel}
	}
	switch v.view {
	case screenLineup:
		return []key.Binding{hint("↑/↓", "choose cell"), k.Pick, k.Rank, hint("tab", "views"), k.Save}
	case screenReverse:
		return []key.Binding{hint("↑/↓", "choose protection"), hint("tab", "views"), k.Save}
	case screenSpread:
		return []key.Binding{hint("tab", "views"), k.Design, k.Save}
	case screenPick:
		return pickShortHelp(k)
	}
	return append(k.ShortHelp(), hint("e", "product"), hint("w", "warnings"))
}

func (v viewKeys) FullHelp() [][]key.Binding {
	k := v.k
	views := []key.Binding{k.NextView, k.PrevView, k.Design, k.Lineup, k.Reverse, k.Spread, pickKeys.Open}
	general := []key.Binding{k.Save, k.Report, k.Notes, k.Product, k.Help, k.Back, k.Quit}
	switch v.view {
	case screenLineup:
		return [][]key.Binding{{k.Up, k.Down, k.Pick, k.Rank}, views, general}
	case screenReverse:
		return [][]key.Binding{{k.Up, k.Down}, views, general}
	case screenSpread:
		return [][]key.Binding{views, general}
	case screenPick:
		return [][]key.Binding{{k.Up, k.Down, pickKeys.Less, pickKeys.More, pickKeys.LessCoarse, pickKeys.MoreCoarse, pickKeys.Use}, views, general}
	}
	return [][]key.Binding{{k.Up, k.Down, k.Less, k.More, k.LessCoarse, k.MoreCoarse, k.Type}, views, general}
}
