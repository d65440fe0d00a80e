package tui

import (
	"fmt"
	"strings"

	"headroom/discharge"
	"headroom/internal/units"
)

// verdictModel is the verdict panel: what the engine made of the design,
// every number with its unit and a label.
type verdictModel struct {
	width   int
	compact bool // one line per figure, for a short terminal (80×24)
	// noCells leaves out the cells' temperature, the one row the panel
	// can spare when the column is full (designView).
	noCells bool
}

// SetWidth sets the panel's width in columns.
func (m *verdictModel) SetWidth(w int) { m.width = w }

// View draws the verdict's numbers.
func (m verdictModel) View(sh *shared) string {
	st := &sh.styles
	w := max(m.width, 20)
	var b strings.Builder
	b.WriteString(st.Heading.Render("Verdict") + "\n")
	if sh.err != nil {
		b.WriteString(st.Bad.Render(wrap("This design cannot run: "+sh.err.Error(), w)))
		return b.String()
	}
	r := sh.res
	const lw = 16
	line := func(label, value, note string) {
		s := st.Label.Render(pad(label, lw)) + st.Value.Render(value)
		if note != "" {
			used := lw + len([]rune(value)) + 1
			switch {
			case used+len([]rune(note)) > w && m.compact:
				// One line a figure, whatever the figures: the note is cut.
				s += " " + st.Dim.Render(pad(note, max(1, w-used)))
			case used+len([]rune(note)) > w:
				s += "\n" + strings.Repeat(" ", lw) + st.Dim.Render(wrapAfter(note, w, lw))
			default:
				s += " " + st.Dim.Render(note)
			}
		}
		b.WriteString(s + "\n")
	}
	_, started := r.StrandedShare()
	cal := (&discharge.Design{HoursPerDay: sh.vals.hours}).CalendarText(r)
	switch {
	case !(r.RuntimeH > 0): // not "0 h of use, 0 h at 1 h a day", as run
		line("Runtime", hours(0), "(the product does not start)")
	case m.compact:
		line("Runtime", hours(r.RuntimeH), "of use ("+cal+")")
	default:
		line("Runtime", hours(r.RuntimeH), "of use")
		line("", cal, fmt.Sprintf("at %s h a day", trimFloat(sh.vals.hours)))
	}
	sh.spreadVerdict(line, m.compact)
	line("Delivered", mah(r.DeliveredMAh), "drawn from the pack")
	switch {
	case !started:
		line("Stranded", "—", "(never starts: no share is stranded)")
	case m.compact:
		line("Stranded", mah(r.StrandedMAh), fmt.Sprintf("(%s of %s)", pct(r.StrandedMAh, r.ReferenceMAh), mah(r.ReferenceMAh)))
		// One short line whatever the figures: "1032 / 1187 mAh".
		line(" drop / floor", units.Num(r.StrandedByProtectionMAh, 3)+" / "+mah(r.StrandedByFloorMAh), "")
	default:
		line("Stranded", mah(r.StrandedMAh), fmt.Sprintf("(%s of %s)", pct(r.StrandedMAh, r.ReferenceMAh), mah(r.ReferenceMAh)))
		if r.StrandedByProtectionMAh < 0 {
			line(" by protection", mah(r.StrandedByProtectionMAh), "(it lowers the current: the cells run longer)")
		} else {
			line(" by protection", mah(r.StrandedByProtectionMAh), "("+pct(r.StrandedByProtectionMAh, r.ReferenceMAh)+", its drop)")
		}
		line(" by the floor", mah(r.StrandedByFloorMAh), "("+pct(r.StrandedByFloorMAh, r.ReferenceMAh)+")")
	}
	if m.compact { // two characters fewer: the example's "(72.5 mWh in all)" was cut at 80×24
		line("Protection heat", units.Human(r.ProtectionPeakW, units.Power, 3)+" peak,", units.Human(r.ProtectionLossWh, units.Power, 3)+"h in all")
	} else {
		line("Protection heat", units.Human(r.ProtectionPeakW, units.Power, 3)+" peak", "("+units.Human(r.ProtectionLossWh, units.Power, 3)+"h in all)")
	}
	if r.JunctionRunaway {
		line("Junction", "runs away", "none settles: press w")
	} else {
		line("Junction", units.Human(r.JunctionC, units.Temperature, 3), "at the heat peak")
	}
	if !m.compact && !m.noCells { // where the row is left out a hot cell is still among the warnings
		if c := sh.cells[sh.vals.cell]; c.SelfHeats() {
			line("Cells hottest", units.Human(r.CellPeakC, units.Temperature, 3), "(by their own losses)")
		} else {
			line("Cells", "at ambient", "(no thermal data)")
		}
	}
	line("Standby share", units.Eng(r.StandbyShare, units.Fraction, 2), "of all charge drawn")
	if r.RuntimeH > 0 {
		line("Cost per hour", money(r.CostPerHour), "(pack "+money(r.PackPrice)+")")
	} else {
		line("Cost per hour", "—", "(does not run; pack "+money(r.PackPrice)+")")
	}
	return strings.TrimRight(b.String(), "\n")
}

// notesModel is the cut-off sentence, the warnings and the cautions.
type notesModel struct {
	width   int
	compact bool // the warnings and cautions counted, not listed
}

// SetWidth sets the panel's width in columns.
func (m *notesModel) SetWidth(w int) { m.width = w }

// View draws the notes, wrapped at word boundaries.
func (m notesModel) View(sh *shared) string {
	st := &sh.styles
	w := max(m.width, 20)
	if sh.err != nil {
		return ""
	}
	r := sh.res
	var b strings.Builder
	b.WriteString(st.Label.Render("Cut-off       ") + st.Value.Render(wrapAfter(cutoffWords(r, sh.profile(), sh.vals.floor), w, 14)) + "\n")
	if m.compact {
		n := len(dedupeStrings(r.Cautions))
		s := plural(n, "caution", "cautions") + ": press w to read them"
		if len(r.Warnings) > 0 {
			s = "⚠ " + plural(len(r.Warnings), "warning", "warnings") + " and " + s
			b.WriteString(st.Warn.Render(wrap(s, w)))
		} else {
			b.WriteString(st.Caution.Render(wrap(s, w)))
		}
		return b.String()
	}
	for _, x := range r.Warnings {
		b.WriteString(st.Warn.Render(wrap("⚠ "+x, w)) + "\n")
	}
	seen := map[string]bool{}
	for _, x := range r.Cautions {
		if seen[x] {
			continue
		}
		seen[x] = true
		b.WriteString(st.Caution.Render(wrap("· "+x, w)) + "\n")
	}
	return strings.TrimRight(b.String(), "\n")
}

// dedupeStrings drops repeated strings, keeping the first.
func dedupeStrings(xs []string) []string {
	seen := map[string]bool{}
	var out []string
	for _, x := range xs {
		if !seen[x] {
			seen[x] = true
			out = append(out, x)
		}
	}
	return out
}

// wrapAfter wraps s for a line that already has used columns taken.
func wrapAfter(s string, w, used int) string {
	lines := wrapLines(s, max(1, w-used))
	return strings.Join(lines, "\n"+strings.Repeat(" ", used))
}

// cutoffWords says in plain words why and where the product stopped, in
// the same words as the command line (discharge.Design.CutoffText).
func cutoffWords(r *discharge.Result, prof []discharge.Phase, floor float64) string {
	d := discharge.Design{Profile: prof, Floor: floor}
	return d.CutoffText(r)
}

// peakLabel is the heaviest phase's load, e.g. "450 mA".
func peakLabel(prof []discharge.Phase) string {
	best := -1.0
	s := ""
	for _, p := range prof {
		if d := p.Demand(); d > best {
			best, s = d, p.Load.Label()
		}
	}
	return s
}

// profileLabel lists the phases: "motor wag 450 mA for 3 s, …", in the
// words the commands use (discharge.ProfileWords).
func profileLabel(prof []discharge.Phase) string { return discharge.ProfileWords(prof) }

// hours, days, mah, pct and money are the screen's names for the one
// formatter (internal/units, eng.go).
func hours(h float64) string { return units.Duration(h, 3) }

// runtimeW is the width of a runtime column: the longest hours() writes,
// "23.9 months" (a column of 8 cut "83.9 days" to "83.9 da…").
const runtimeW = 11

func mah(q float64) string { return units.MAh(q, 3) }

func pct(part, whole float64) string {
	if !(whole > 0) {
		return "—" // no share: as run and compare write it, not "— %"
	}
	return units.Num(100*part/whole, 2) + " %"
}

func money(x float64) string { return units.Dollars(x) }
