package tui

import (
	"fmt"
	"math"
	"strings"

	"headroom/discharge"
	"headroom/internal/units"
)

// verdictModel is the verdict panel: what the engine made of the design,
// every number with its unit and a label.
type verdictModel struct {
	sh    *shared
	width int
}

// SetWidth sets the panel's width in columns.
func (m *verdictModel) SetWidth(w int) { m.width = w }

// View draws the verdict's numbers.
func (m verdictModel) View() string {
	sh, st := m.sh, &m.sh.styles
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
			if used+len([]rune(note)) > w {
				s += "\n" + strings.Repeat(" ", lw) + st.Dim.Render(wrapAfter(note, w, lw))
			} else {
				s += " " + st.Dim.Render(note)
			}
		}
		b.WriteString(s + "\n")
	}
	line("Runtime", hours(r.RuntimeH), "of use")
	line("", days(r.RuntimeDays), fmt.Sprintf("at %s h a day", trimFloat(sh.vals.hours)))
	sh.spreadVerdict(line)
	line("Delivered", mah(r.DeliveredMAh), "drawn from the pack")
	line("Stranded", mah(r.StrandedMAh), fmt.Sprintf("(%s of %s)", pct(r.StrandedMAh, r.ReferenceMAh), mah(r.ReferenceMAh)))
	line(" by protection", mah(r.StrandedByProtectionMAh), "("+pct(r.StrandedByProtectionMAh, r.ReferenceMAh)+", its drop)")
	line(" by the floor", mah(r.StrandedByFloorMAh), "("+pct(r.StrandedByFloorMAh, r.ReferenceMAh)+")")
	line("Protection heat", units.Human(r.ProtectionPeakW, units.Power, 3)+" peak", "("+units.Human(r.ProtectionLossWh, units.Power, 3)+"h in all)")
	line("Junction", units.Human(r.JunctionC, units.Temperature, 3), "at the heat peak")
	line("Standby share", fmt.Sprintf("%.1f %%", 100*r.StandbyShare), "of all charge drawn")
	if r.CostPerHour > 0 {
		line("Cost per hour", money(r.CostPerHour), "(pack "+money(r.PackPrice)+")")
	} else {
		line("Cost per hour", "—", "(no runtime; pack "+money(r.PackPrice)+")")
	}
	return strings.TrimRight(b.String(), "\n")
}

// notesModel is the cut-off sentence, the warnings and the cautions.
type notesModel struct {
	sh    *shared
	width int
}

// SetWidth sets the panel's width in columns.
func (m *notesModel) SetWidth(w int) { m.width = w }

// View draws the notes, wrapped at word boundaries.
func (m notesModel) View() string {
	sh, st := m.sh, &m.sh.styles
	w := max(m.width, 20)
	if sh.err != nil {
		return ""
	}
	r := sh.res
	var b strings.Builder
	b.WriteString(st.Label.Render("Stops because ") + st.Value.Render(wrapAfter(cutoffWords(r, sh.profile(), sh.vals.floor), w, 14)) + "\n")
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

// profileLabel lists the phases: "motor wag 450 mA for 3 s, …".
func profileLabel(prof []discharge.Phase) string {
	var parts []string
	for _, p := range prof {
		s := p.Load.Label()
		if p.Name != "" {
			s = p.Name + " " + s
		}
		if len(prof) > 1 {
			s += " for " + units.Human(p.Seconds, units.Time, 3)
		}
		parts = append(parts, s)
	}
	return strings.Join(parts, ", ")
}

func hours(h float64) string {
	switch {
	case h <= 0:
		return "0 h"
	case h < 1:
		return fmt.Sprintf("%.0f min", h*60)
	case h < 100:
		return fmt.Sprintf("%.1f h", h)
	}
	return fmt.Sprintf("%.0f h", h)
}

func days(d float64) string {
	switch {
	case d < 10:
		return fmt.Sprintf("%.1f days", d)
	case d < 1000:
		return fmt.Sprintf("%.0f days", d)
	}
	return fmt.Sprintf("%.1f years", d/365.25)
}

func mah(q float64) string {
	if math.Abs(q) >= 10000 {
		return fmt.Sprintf("%.1f Ah", q/1000)
	}
	return fmt.Sprintf("%.0f mAh", q)
}

func pct(part, whole float64) string {
	if !(whole > 0) {
		return "— %"
	}
	return fmt.Sprintf("%.0f %%", 100*part/whole)
}

func money(x float64) string {
	switch {
	case x == 0:
		return "$0"
	case x < 0.01:
		return fmt.Sprintf("$%.4f", x)
	case x < 1:
		return fmt.Sprintf("$%.3f", x)
	}
	return fmt.Sprintf("$%.2f", x)
}
