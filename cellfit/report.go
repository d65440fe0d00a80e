package cellfit

import (
	"fmt"
	"path/filepath"
	"strings"
	"unicode"

	"headroom/curves"
)

// LogReport is what the report says about one log. Voltages in volts,
// charges in mAh, currents in amperes; values at the logs' temperature.
type LogReport struct {
	File      string   `json:"file"`
	Samples   int      `json:"samples"`
	LoadA     float64  `json:"load_A"`
	Delivered float64  `json:"delivered_mAh"` // trapezoid rule, to the last loaded sample
	LastV     float64  `json:"last_loaded_V"` // the measured voltage there
	RMSmV     float64  `json:"rms_mV"`        // residual, measured − model
	WorstmV   float64  `json:"worst_mV"`      // the largest |residual|
	WorstLine int      `json:"worst_line"`    // its line in the file
	ModelMAh  float64  `json:"model_mAh"`     // the written cell run on this log's current to LastV
	ModelOK   bool     `json:"model_reached"` // false: it had not fallen to LastV by 10 % past the log
	TempC     *float64 `json:"start_temp_C"`  // nil when the log has none
	Skipped   []string `json:"skipped,omitempty"`
}

// BranchReport is one polarisation branch.
type BranchReport struct {
	Ohm float64 `json:"ohm"`
	Tau float64 `json:"tau_s"`
}

// Report is the fit's whole account: per log, the fitted values and the
// warnings. JSON field order is fixed, so the same logs give the same
// bytes.
type Report struct {
	Logs        []LogReport    `json:"logs"`
	TempC       float64        `json:"temp_C"`
	FullV       float64        `json:"full_ocv_V"`
	HalfV       float64        `json:"half_ocv_V"`    // at half the deepest charge
	DeepestV    float64        `json:"deepest_ocv_V"` // at the deepest charge
	DeepestMAh  float64        `json:"deepest_mAh"`   // where the logs end; the curve past it is extrapolated
	CurveEndMAh float64        `json:"curve_end_mAh"` // the written curve's end
	CurveEndV   float64        `json:"curve_end_V"`
	CurvePoints int            `json:"curve_points"`
	R0          [][2]float64   `json:"r0_depth_ohm"` // [depth 0–1, ohm]
	Branches    []BranchReport `json:"rc"`
	RefCurrent  float64        `json:"ref_current_A"`
	EndPoint    float64        `json:"end_point_V"`
	Levels      []float64      `json:"load_levels_A"`
	Steps       int            `json:"current_steps"`
	Warnings    []string       `json:"warnings"`
}

// Report describes the fit and the cell written from it. Fitted values
// are stated at the logs' temperature tempC (the file holds them at
// curves.RefTempC when a temperature table moved them).
func (r *Result) Report(c *curves.Cell, tempC float64) *Report {
	rep := &Report{TempC: tempC, RefCurrent: c.RefCurrent, EndPoint: c.EndPoint, Levels: r.Levels, Steps: r.Steps, Warnings: r.Warnings}
	m := ModelOf(c, tempC)
	rep.FullV = m.E[0]
	rep.CurvePoints = len(m.E)
	rep.CurveEndMAh, rep.CurveEndV = m.QE[len(m.QE)-1], m.E[len(m.E)-1]
	rep.DeepestMAh = r.Model.QE[len(r.Model.QE)-1]
	rep.HalfV, rep.DeepestV = m.OCV(rep.DeepestMAh/2), m.OCV(rep.DeepestMAh)
	for i, p := range c.Resistance {
		rep.R0 = append(rep.R0, [2]float64{p.Depth, m.R0[i]})
	}
	for _, s := range m.RC {
		rep.Branches = append(rep.Branches, BranchReport{Ohm: s.R, Tau: s.Tau})
	}
	for _, f := range r.Fits {
		l := f.Log
		lr := LogReport{
			File: l.Name, Samples: l.Len(), LoadA: l.Level(), Delivered: f.ChargeMAh, LastV: f.LastV,
			RMSmV: f.RMS * 1e3, WorstmV: f.Worst * 1e3, WorstLine: f.WorstLine, Skipped: l.Skipped,
		}
		if l.TempC != nil {
			lr.TempC = &l.TempC[0]
		}
		_, q, ok := m.Cutoff(l.LoadCurrent(1.1*f.ChargeMAh), f.LastV, restCurrent(l.Peak()))
		lr.ModelMAh, lr.ModelOK = q, ok
		rep.Logs = append(rep.Logs, lr)
	}
	if rep.CurveEndMAh > rep.DeepestMAh*(1+1e-9) {
		rep.Warnings = append(rep.Warnings, fmt.Sprintf(
			"the open-circuit curve past %.0f mAh, the deepest any log went, is extrapolated with its last slope to %.3g V at %.0f mAh: predictions that go further rest on no measurement",
			rep.DeepestMAh, rep.CurveEndV, rep.CurveEndMAh))
	}
	return rep
}

// Comment is the block of comment lines that opens the written cell file:
// which logs, how well the model fits each, and the warnings.
func (rep *Report) Comment() []string {
	out := []string{"Cell fitted by `headroom cells fit` to bench logs (Thevenin model: open-circuit",
		"curve and R0 against charge, polarisation branches in rc). Logs and fit:"}
	for _, l := range rep.Logs {
		out = append(out, fmt.Sprintf("  %s: %d samples at %.3g A, %.1f mAh delivered to %.3f V; residual RMS %.1f mV, worst %.1f mV (line %d)",
			safeName(l.File), l.Samples, l.LoadA, l.Delivered, l.LastV, l.RMSmV, l.WorstmV, l.WorstLine))
	}
	for _, w := range rep.Warnings {
		out = append(out, "Warning: "+w)
	}
	out = append(out, "Estimates from one sample of cells: the maker's data and local codes come first.")
	return out
}

// safeName is a file's base name fit for one comment line: control
// characters become '?'.
func safeName(path string) string {
	return strings.Map(func(r rune) rune {
		if unicode.IsControl(r) {
			return '?'
		}
		return r
	}, filepath.Base(path))
}
