package tui

import (
	"fmt"
	"math"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"headroom/internal/pick"
	"headroom/protect"
)

// pickModel is the pick view: the cheapest designs that meet a runtime
// target (the view's knob) for the product as the knobs set it. The search
// runs in a command, off the key path; a result for an older target or
// design is dropped.
type pickModel struct {
	need          float64 // the target, hours of use
	lim           pick.Limits
	limErr        error // a [pick] key the file got wrong
	sel, offset   int
	width, height int

	gen     int    // generation of the last search started
	started string // what the last search was for (target and design)
	running bool
	out     *pick.Outcome
	err     error
	space   *pick.Space
}

// pickDoneMsg carries a finished search back to Update.
type pickDoneMsg struct {
	gen   int
	out   *pick.Outcome
	space *pick.Space
	err   error
}

// pickKeys are the pick view's own bindings.
var pickKeys = struct {
	Open, Use, Less, More, LessCoarse, MoreCoarse key.Binding
}{
	Open:       key.NewBinding(key.WithKeys("5"), key.WithHelp("5", "pick")),
	Use:        key.NewBinding(key.WithKeys("enter"), key.WithHelp("enter", "use this design")),
	Less:       key.NewBinding(key.WithKeys("left", "h"), key.WithHelp("←/h", "target ÷1.1")),
	More:       key.NewBinding(key.WithKeys("right", "l"), key.WithHelp("→/l", "target ×1.1")),
	LessCoarse: key.NewBinding(key.WithKeys("shift+left", "["), key.WithHelp("[", "halve target")),
	MoreCoarse: key.NewBinding(key.WithKeys("shift+right", "]"), key.WithHelp("]", "double target")),
}

// pickAbout is the pick view's note in the full help.
var pickAbout = []string{
	"The cheapest designs that run at least the target, for this load,",
	"floor and ambient, within the file's budget and [pick] limits.",
	"The list follows the target a moment after a key; enter puts the",
	"chosen design into the design view. headroom pick does more.",
}

// newPick reads the file's [pick] table and starts the target at its
// need, or at the current design's runtime.
func newPick(sh *shared) pickModel {
	m := pickModel{lim: pick.DefaultLimits()}
	m.lim.Budget = sh.scen.Budget
	for _, s := range sh.scen.Pick {
		k, _ := pick.LookupKey(s.Key)
		if err := k.Set(&m.lim, s.Value); err != nil && m.limErr == nil {
			m.limErr = fmt.Errorf("[pick] %s: %w", s.Key, err)
		}
	}
	m.lim.At = "nominal" // the screen searches at nominal: a few milliseconds
	if m.lim.Top == 0 {
		m.lim.Top = 30 // room to scroll in a tall window
	}
	m.need = m.lim.Need
	if !(m.need > 0) {
		m.need = 20
		if sh.res != nil && sh.res.RuntimeH > 0 {
			m.need = roundTarget(sh.res.RuntimeH)
		}
	}
	return m
}

func orNone(xs []string) string {
	if len(xs) == 0 {
		return "none"
	}
	return strings.Join(xs, "; ")
}

// revWords is a reversed pack's outcome in a few letters.
var revWords = map[protect.Outcome]string{
	protect.Blocked: "blocked", protect.LoadReversed: "reaches load", protect.FuseOpens: "fuse opens",
	protect.ShortsCells: "shorts cells", protect.Unseen: "not seen",
}

// roundTarget rounds hours to two significant digits.
func roundTarget(h float64) float64 {
	p := math.Pow(10, math.Floor(math.Log10(h))-1)
	return math.Max(0.1, math.Round(h/p)*p)
}

// SetSize sets the view's size.
func (m *pickModel) SetSize(w, h int) { m.width, m.height = w, h }

// signature names the search the view needs now.
func (m pickModel) signature(sh *shared) string {
	d := sh.design()
	return fmt.Sprintf("%g|%g|%g|%g|%g", m.need, sh.vals.scale, d.Floor, d.TempC, d.HoursPerDay)
}

// search returns the command that runs the search the view needs, or nil
// when it has it (or is running it) already.
func (m *pickModel) search(sh *shared) tea.Cmd {
	sig := m.signature(sh)
	if sig == m.started || m.limErr != nil {
		return nil
	}
	m.started, m.running = sig, true
	m.gen++
	gen, lim, scen := m.gen, m.lim, sh.scen // the command reads these, not the screen's state
	lim.Need = m.need
	base := sh.design()
	return func() tea.Msg {
		sp, err := pick.SpaceOf(scen, false)
		if err != nil {
			return pickDoneMsg{gen: gen, err: err}
		}
		sp.Base = base
		// The file's pack price belongs to the file's pack only.
		sp.Base.PackPrice = scen.Design.PackPrice
		sp.Base.Cell, sp.Base.Series, sp.Base.Parallel = scen.Design.Cell, scen.Design.Series, scen.Design.Parallel
		out, err := pick.Search(sp, lim, pick.Nominal{}, nil)
		return pickDoneMsg{gen: gen, out: out, space: sp, err: err}
	}
}

// Update moves the selection, changes the target, or puts the selected
// design into the design view.
func (m pickModel) Update(sh *shared, msg tea.Msg) (pickModel, tea.Cmd) {
	switch msg := msg.(type) {
	case pickDoneMsg:
		if msg.gen == m.gen {
			m.running, m.out, m.err, m.space = false, msg.out, msg.err, msg.space
			m.sel, m.offset = 0, 0
		}
		return m, nil
	case tea.KeyMsg:
		k := sh.keys
		n := 0
		if m.out != nil {
			n = len(m.out.Designs)
		}
		switch {
		case key.Matches(msg, k.Up):
			m.sel = (m.sel + n - 1) % max(n, 1)
		case key.Matches(msg, k.Down):
			m.sel = (m.sel + 1) % max(n, 1)
		case key.Matches(msg, pickKeys.Less):
			m.need = roundTarget(m.need / 1.1)
		case key.Matches(msg, pickKeys.More):
			m.need = roundTarget(m.need * 1.1)
		case key.Matches(msg, pickKeys.LessCoarse):
			m.need = roundTarget(m.need / 2)
		case key.Matches(msg, pickKeys.MoreCoarse):
			m.need = roundTarget(m.need * 2)
		case key.Matches(msg, pickKeys.Use):
			if m.running || m.sel >= n {
				return m, nil
			}
			m.use(sh, &m.out.Designs[m.sel])
			return m, func() tea.Msg { return pickedMsg{} }
		}
		m.need = math.Min(math.Max(m.need, 0.1), 24*365*20)
		cmd := m.search(sh)
		return m, cmd
	}
	return m, nil
}

// use makes design d the current one.
func (m *pickModel) use(sh *shared, d *pick.Design) {
	sh.vals.cell = sh.addCell(d.Cell)
	sh.vals.series, sh.vals.parallel = d.Series, d.Parallel
	sh.vals.kind = sh.kindIndex(d.Element.Kind())
	sh.vals.elem = d.Element
	sh.evaluate()
}

// View draws the target, the ranked designs and a note on the selection.
func (m pickModel) View(sh *shared) string {
	st := &sh.styles
	w, h := max(m.width, 40), max(m.height, 6)
	var b strings.Builder
	b.WriteString(st.Heading.Render("Pick: the cheapest designs for a runtime target") + "\n")
	b.WriteString(st.Label.Render("Target ") + st.Value.Render(hours(m.need)) + st.Dim.Render(" of use (←/→ ×1.1, [/] ×2)") + "\n")
	var limits []string
	if m.lim.Budget > 0 {
		limits = append(limits, "unit cost ≤ "+money(m.lim.Budget))
	}
	if m.lim.BlockReversed {
		limits = append(limits, "reversed pack blocked")
	}
	if m.lim.MaxStranded < 1 {
		limits = append(limits, fmt.Sprintf("stranded ≤ %.0f %%", 100*m.lim.MaxStranded))
	}
	if !math.IsInf(m.lim.MaxJunction, 1) {
		limits = append(limits, fmt.Sprintf("junction ≤ %.0f °C", m.lim.MaxJunction))
	}
	intro := "Every cell, series count, parallel count up to " + fmt.Sprint(max(m.lim.MaxParallel, pick.DefaultMaxParallel)) +
		" and protection part (the file's options narrow them) for this load (" + profileLabel(sh.profile()) +
		"), floor and ambient; nominal runtimes. Limits from the file (budget, [pick]): " + orNone(limits) + "."
	for _, l := range wrapLines(intro, w) {
		b.WriteString(st.Dim.Render(l) + "\n")
	}
	switch {
	case m.limErr != nil:
		b.WriteString(st.Bad.Render(pad(m.limErr.Error(), w)))
		return b.String()
	case m.err != nil:
		b.WriteString(st.Bad.Render(pad(m.err.Error(), w)))
		return b.String()
	case m.out == nil:
		b.WriteString(st.Dim.Render("searching…"))
		return b.String()
	}
	out := m.out
	status := fmt.Sprintf("%d designs, %d evaluated, %d skipped as unable to win", out.Space, out.Evaluated, out.Pruned)
	if m.running {
		status = "searching for the new target…"
	}
	b.WriteString(st.Dim.Render(pad(status, w)) + "\n")
	if len(out.Designs) == 0 {
		msg := "No design meets every limit."
		if l := out.Longest; l != nil {
			msg += fmt.Sprintf(" The longest within the other limits: %d×%d %s with %s, %s at %s.",
				l.Series, l.Parallel, l.Cell.ID, l.Spec, hours(l.Result.RuntimeH), money(l.UnitCost))
		}
		for _, l := range wrapLines(msg, w) {
			b.WriteString(st.Bad.Render(l) + "\n")
		}
		return strings.TrimRight(b.String(), "\n")
	}
	const packW, costW, runW, strW, revW = 16, 7, runtimeW, 8, 12
	protW := max(10, w-(6+packW+1+costW+1+runW+1+strW+1+revW))
	b.WriteString(st.Label.Render(pad("   # "+pad("Pack", packW)+" "+pad("Protection", protW)+" "+pad("Cost", costW)+" "+
		pad("Runtime", runW)+" "+pad("Stranded", strW)+" "+"Reversed", w)) + "\n")
	used := strings.Count(b.String(), "\n")
	room := max(1, h-used-2)
	off := m.offset
	if m.sel < off {
		off = m.sel
	}
	if m.sel >= off+room {
		off = m.sel - room + 1
	}
	for i := off; i < len(out.Designs) && i < off+room; i++ {
		d := &out.Designs[i]
		mark := "  "
		pack := pad(fmt.Sprintf("%d×%d %s", d.Series, d.Parallel, d.Cell.ID), packW)
		if i == m.sel {
			mark = st.Selected.Render("▸ ")
			pack = st.Selected.Render(pack)
		}
		rev := revWords[d.Reverse.WholePack.Outcome]
		b.WriteString(mark + fmt.Sprintf("%2d ", i+1) + pack + " " + pad(d.Spec, protW) + " " + pad(money(d.UnitCost), costW) + " " +
			st.Value.Render(pad(hours(d.Result.RuntimeH), runW)) + " " + pad(pct(d.Result.StrandedMAh, d.Result.ReferenceMAh), strW) + " " +
			st.Dim.Render(rev) + "\n")
	}
	if m.sel < len(out.Designs) {
		d := &out.Designs[m.sel]
		b.WriteString(st.Dim.Render(pad(fmt.Sprintf("enter: use %d×%d %s with %s in the design.", d.Series, d.Parallel, d.Cell.ID, d.Spec), w)))
	}
	return strings.TrimRight(b.String(), "\n")
}

// pickShortHelp is the pick view's one-line hint.
func pickShortHelp(k KeyMap) []key.Binding {
	return []key.Binding{hint("↑/↓", "choose design"), hint("←/→", "target"), hint("[/]", "target ×2"), pickKeys.Use, hint("tab", "views")}
}
