package cellfit

import (
	"fmt"
	"math"
	"strings"

	"headroom/curves"
	"headroom/internal/rc"
)

// CellOptions say how a fit becomes a cell file.
type CellOptions struct {
	ID string // the cell's id, usually the output file's base name
	// Borrow is a library cell whose chemistry, temperature table,
	// self-discharge and rechargeable terms the new cell takes: what logs
	// at one temperature cannot show. nil: none (chemistry "custom").
	Borrow *curves.Cell
	// TempC is the temperature of the logs, °C. With a borrowed
	// temperature table the fitted values are moved from TempC to
	// curves.RefTempC by it; without one they are stated as they are.
	TempC float64
	// EndPoint is the end-point voltage, volts; 0: the borrowed cell's,
	// else the lowest voltage a log reached under load.
	EndPoint float64
}

// LookupChemistry finds the library cell to borrow from: a library id,
// or a chemistry name (the first library cell of that chemistry).
func LookupChemistry(id string) (*curves.Cell, error) {
	if c, ok := curves.Lookup(id); ok {
		return c, nil
	}
	for _, c := range curves.Library() {
		if strings.EqualFold(c.Chemistry, id) {
			return c, nil
		}
	}
	var chem []string
	seen := map[string]bool{}
	for _, c := range curves.Library() {
		if !seen[c.Chemistry] {
			seen[c.Chemistry] = true
			chem = append(chem, c.Chemistry)
		}
	}
	return nil, fmt.Errorf("unknown chemistry %q: give a library cell id (%s) or a chemistry (%s)", id, strings.Join(curves.IDs(), ", "), strings.Join(chem, ", "))
}

// Cell turns a fit into a cell: the open-circuit curve (extended past the
// deepest log towards the end-point, see Model.Extend) as a rest-voltage
// curve (ref_current 0), R0 against depth, the branches, Peukert 1 (the
// rate effect comes from the sag alone), rated at the largest charge a log
// delivered to its last loaded sample, at that log's current.
func (r *Result) Cell(opt CellOptions) (*curves.Cell, error) {
	end := opt.EndPoint
	if end == 0 && opt.Borrow != nil {
		end = opt.Borrow.EndPoint
	}
	if end == 0 {
		end = math.Inf(1)
		for _, f := range r.Fits {
			end = math.Min(end, f.LastV)
		}
	}
	m := r.Model.Extend(end)
	fc, fr := 1.0, 1.0
	c := &curves.Cell{ID: opt.ID, Chemistry: "custom", Peukert: 1, RefCurrent: r.TermCurrent, EndPoint: end}
	if b := opt.Borrow; b != nil {
		c.Chemistry = b.Chemistry
		c.Temperature = append([]curves.TempPoint(nil), b.Temperature...)
		c.SelfDischarge = b.SelfDischarge
		c.Rechargeable, c.CycleLife, c.ChargeEfficiency = b.Rechargeable, b.CycleLife, b.ChargeEfficiency
		fc, fr = c.TempFactors(opt.TempC)
	}
	var names []string
	for _, f := range r.Fits {
		names = append(names, safeName(f.Log.Name))
	}
	c.Name = "fitted to " + strings.Join(names, ", ")
	c.Source = fmt.Sprintf("headroom cells fit: %s at %g °C", strings.Join(names, ", "), opt.TempC)
	if opt.Borrow != nil {
		c.Source += fmt.Sprintf("; temperature, self-discharge and cycle terms from the library's %s (typical, from memory)", opt.Borrow.ID)
	}
	q := make([]float64, len(m.QE))
	for i, x := range m.QE {
		q[i] = x / fc
	}
	curve, err := curves.NewCurve(q, m.E)
	if err != nil {
		return nil, fmt.Errorf("%w: the open-circuit curve is not a valid curve: %v", ErrNoConvergence, err)
	}
	c.Curve = curve
	if !(end < m.E[0]) {
		return nil, fmt.Errorf("the end-point %g V is not below the fitted full open-circuit voltage %.4g V", end, m.E[0])
	}
	qEnd := curve.End()
	for i, x := range m.QR {
		d := x / fc / qEnd
		if i == len(m.QR)-1 {
			d = math.Min(d, 1)
		}
		c.Resistance = append(c.Resistance, curves.ResistancePoint{Depth: d, Ohm: m.R0[i] / fr})
	}
	for _, s := range m.RC {
		c.RC = append(c.RC, rc.Stage{R: s.R / fr, Tau: s.Tau})
	}
	best := 0
	for i, f := range r.Fits {
		if f.ChargeMAh > r.Fits[best].ChargeMAh {
			best = i
		}
	}
	c.RatedMAh = r.Fits[best].ChargeMAh / fc
	c.RatedCurrent = r.Fits[best].Log.Level()
	c.NominalV = curve.At(qEnd / 2)
	if err := c.Validate(); err != nil {
		return nil, fmt.Errorf("the fitted cell is not valid: %w", err)
	}
	return c, nil
}
