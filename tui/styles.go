package tui

import "github.com/charmbracelet/lipgloss"

// Styles holds every style the screen uses, built once by DefaultStyles.
// Colours are adaptive: the first of each pair is for light terminals.
// lipgloss drops colour on its own when NO_COLOR is set or the output is
// not a colour terminal.
type Styles struct {
	Title    lipgloss.Style // program name in the header
	Scenario lipgloss.Style // scenario name in the header
	Tab      lipgloss.Style // inactive view name
	TabOn    lipgloss.Style // active view name
	Heading  lipgloss.Style // panel heading
	Label    lipgloss.Style // label before a value
	Value    lipgloss.Style // a computed value
	Dim      lipgloss.Style // secondary text
	Selected lipgloss.Style // the chosen row's marker and name
	Good     lipgloss.Style
	Bad      lipgloss.Style
	Warn     lipgloss.Style
	Caution  lipgloss.Style
	Status   lipgloss.Style // message after a save or an error
	Prompt   lipgloss.Style // a question that needs an answer
	Overlay  lipgloss.Style // frame of the full help
	Cursor   lipgloss.Style // the text cursor in a field

	SliderFill lipgloss.Style
	SliderKnob lipgloss.Style
	SliderRest lipgloss.Style

	Bar lipgloss.Style // line-up bars

	// Chart layers, bottom to top.
	CutoffLine lipgloss.Style
	FloorLine  lipgloss.Style
	PackLine   lipgloss.Style
	LoadLine   lipgloss.Style
	Axis       lipgloss.Style
}

// Palette of our own: slate, teal, amber, brick.
var (
	colText   = lipgloss.AdaptiveColor{Light: "#1F2A33", Dark: "#DCE3E8"}
	colDim    = lipgloss.AdaptiveColor{Light: "#5E6E7A", Dark: "#8A99A6"}
	colTeal   = lipgloss.AdaptiveColor{Light: "#00766E", Dark: "#4FD1C5"}
	colAmber  = lipgloss.AdaptiveColor{Light: "#9A5B00", Dark: "#F2B84B"}
	colBrick  = lipgloss.AdaptiveColor{Light: "#A3262A", Dark: "#F07167"}
	colPlum   = lipgloss.AdaptiveColor{Light: "#6B3FA0", Dark: "#B79CED"}
	colGreen  = lipgloss.AdaptiveColor{Light: "#2E7D32", Dark: "#8BD48F"}
	colTrack  = lipgloss.AdaptiveColor{Light: "#B8C2CA", Dark: "#44505A"}
	colTabBg  = lipgloss.AdaptiveColor{Light: "#D6EEEC", Dark: "#17413E"}
	colSelect = lipgloss.AdaptiveColor{Light: "#00534D", Dark: "#9FF0E6"}
)

// DefaultStyles returns the screen's styles.
func DefaultStyles() Styles {
	s := Styles{}
	s.Title = lipgloss.NewStyle().Bold(true).Foreground(colTeal)
	s.Scenario = lipgloss.NewStyle().Foreground(colText)
	s.Tab = lipgloss.NewStyle().Foreground(colDim)
	s.TabOn = lipgloss.NewStyle().Bold(true).Foreground(colSelect).Background(colTabBg)
	s.Heading = lipgloss.NewStyle().Bold(true).Underline(true).Foreground(colTeal)
	s.Label = lipgloss.NewStyle().Foreground(colDim)
	s.Value = lipgloss.NewStyle().Bold(true).Foreground(colText)
	s.Dim = lipgloss.NewStyle().Foreground(colDim)
	s.Selected = lipgloss.NewStyle().Bold(true).Foreground(colSelect)
	s.Good = lipgloss.NewStyle().Foreground(colGreen)
	s.Bad = lipgloss.NewStyle().Bold(true).Foreground(colBrick)
	s.Warn = lipgloss.NewStyle().Foreground(colAmber)
	s.Caution = lipgloss.NewStyle().Foreground(colDim)
	s.Status = lipgloss.NewStyle().Foreground(colGreen)
	s.Prompt = lipgloss.NewStyle().Bold(true).Foreground(colAmber)
	s.Overlay = lipgloss.NewStyle().Border(lipgloss.RoundedBorder()).BorderForeground(colTeal).Padding(0, 1)
	s.Cursor = lipgloss.NewStyle().Reverse(true)
	s.SliderFill = lipgloss.NewStyle().Foreground(colTeal)
	s.SliderKnob = lipgloss.NewStyle().Bold(true).Foreground(colAmber)
	s.SliderRest = lipgloss.NewStyle().Foreground(colTrack)
	s.Bar = lipgloss.NewStyle().Foreground(colTeal)
	s.CutoffLine = lipgloss.NewStyle().Foreground(colPlum)
	s.FloorLine = lipgloss.NewStyle().Foreground(colBrick)
	s.PackLine = lipgloss.NewStyle().Foreground(colTeal)
	s.LoadLine = lipgloss.NewStyle().Foreground(colAmber)
	s.Axis = lipgloss.NewStyle().Foreground(colDim)
	return s
}
