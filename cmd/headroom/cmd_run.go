package main

import (
	"bytes"
	"flag"
	"fmt"
	"math"
	"strings"

	"headroom/discharge"
	"headroom/internal/scenario"
	"headroom/internal/units"
	"headroom/tolerance"
)

var runCmd = &command{
	name:  "run",
	run:   runDesign,
	args:  "[scenario.toml] [flags]",
	short: "evaluate one design: runtime, stranded capacity, heat, cost",
	help: `
Evaluates one design: the scenario file's design (the first entry of every
option list), with any flag below set over it. With no file the flags start
from the built-in demo's design (see headroom demo): a 2×AA toy with a motor
pulse, 1 h of use a day and a 30 µA standby drain.

flags:
` + designFlagHelp() + `  --spread                      add the spread over the tolerances (see headroom spread),
                                with its --samples, --seed and --tol
  --format text|json|csv|md     output format (default text)

Values take SI prefixes (n, u or µ, m, k) and units (V A W ohm Ω h min s % C);
a bare number is the flag's own unit where that is unambiguous.

examples:
  headroom run --cell hr6 --series 2 --protect schottky --load 150mA --floor 2.0
  headroom run testdata/scenarios/example.toml --protect pmos --format json
  headroom run --load 450mA/3s,120mA/2s,15mA/25s --floor 1.8 --temp -10C
`,
}

func runDesign(c *cli, args []string) error {
	fs := newFlags("run")
	addDesignFlags(fs)
	formatFlag := fs.String("format", "text", "")
	spreadFlag := fs.Bool("spread", false, "")
	sf := addSpreadFlags(fs)
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if err := wantArgs("run", pos, 0, 1, "a scenario file"); err != nil {
		return err
	}
	f, err := parseFormat(*formatFlag)
	if err != nil {
		return err
	}
	s, err := designScenario(fs, pos)
	if err != nil {
		return err
	}
	fromFlags(fs, s, pos)
	if err := sf.apply(s); err != nil {
		return err
	}
	var changed []string
	var spreadOnly string
	fs.Visit(func(fl *flag.Flag) {
		if sf.given(fl.Name) && spreadOnly == "" {
			spreadOnly = fl.Name
		}
		if fl.Name != "format" && fl.Name != "spread" && !sf.given(fl.Name) {
			changed = append(changed, "--"+fl.Name)
		}
	})
	if len(changed) > 0 && s.Name != "" && s.Name != flagsDesignName {
		s.Name += " with " + strings.Join(changed, ", ")
	}
	if spreadOnly != "" && !*spreadFlag {
		return fmt.Errorf("--%s: sets the spread, so it needs --spread", spreadOnly)
	}
	d := s.Design
	r, err := discharge.Evaluate(&d)
	if err != nil {
		return fmt.Errorf("design: %w", err)
	}
	var rep *tolerance.Report
	if *spreadFlag {
		if rep, err = tolerance.Analyse(&d, s.Tolerances, s.Samples, s.Seed); err != nil {
			return fmt.Errorf("spread: %w", err)
		}
	}
	if f == formatText {
		out := runText(s, &d, r)
		if rep != nil {
			b := bytes.NewBuffer(out)
			fmt.Fprintf(b, "\nspread over the tolerances (headroom spread)\n")
			spreadText(b, s, rep)
			out = b.Bytes()
		}
		_, err = c.stdout.Write(out)
		return err
	}
	rec := runRecord(s, &d, r)
	if rep != nil {
		rec = append(rec, spreadRecord(s, rep, f == formatCSV || f == formatMD)...)
	}
	return writeRecord(c.stdout, f, rec)
}

// hoursPerDay is the design's daily hours of use; 0 means continuous.
func hoursPerDay(d *discharge.Design) float64 {
	if d.HoursPerDay == 0 {
		return 24
	}
	return d.HoursPerDay
}

// strandedPct is the stranded share in percent; NaN (written "—", null or
// empty) when the design never starts and the share means nothing.
func strandedPct(r *discharge.Result) float64 {
	f, ok := r.StrandedShare()
	if !ok {
		return math.NaN()
	}
	return 100 * f
}

// dedupe drops repeated lines, keeping the first.
func dedupe(xs []string) []string {
	seen := map[string]bool{}
	out := []string{}
	for _, x := range xs {
		if !seen[x] {
			seen[x] = true
			out = append(out, x)
		}
	}
	return out
}

// runRecord is the result as named fields, in the units the keys name.
func runRecord(s *scenario.Scenario, d *discharge.Design, r *discharge.Result) []field {
	return []field{
		{"name", "name", s.Name},
		{"cell", "cell", d.Cell.ID},
		{"cell_name", "cell name", d.Cell.Name},
		{"chemistry", "chemistry", d.Cell.Chemistry},
		{"series", "cells in series", d.Series},
		{"parallel", "strings in parallel", d.Parallel},
		{"protect", "protection", s.ProtectSpec},
		{"load", "load", s.LoadSpec},
		{"floor_V", "floor (V)", d.Floor},
		{"temp_C", "ambient (°C)", d.TempC},
		{"hours_per_day", "hours of use a day", hoursPerDay(d)},
		{"standby_A", "standby current (A)", d.Standby},
		{"pack_price", "pack price ($)", r.PackPrice},
		{"fresh_V", "fresh pack voltage (V)", r.FreshV},
		{"runtime_h", "runtime (h of use)", r.RuntimeH},
		{"runtime_days", "runtime (days)", r.RuntimeDays},
		{"delivered_mAh", "delivered (mAh)", r.DeliveredMAh},
		{"delivered_Wh", "delivered to the load (Wh)", r.DeliveredWh},
		{"reference_mAh", "reference (mAh)", r.ReferenceMAh},
		{"stranded_mAh", "stranded (mAh)", r.StrandedMAh},
		{"stranded_pct", "stranded (% of reference)", strandedPct(r)},
		{"stranded_by_protection_mAh", "stranded by the protection drop (mAh)", noise(r.StrandedByProtectionMAh, r.ReferenceMAh)},
		{"stranded_by_floor_mAh", "stranded by the floor (mAh)", noise(r.StrandedByFloorMAh, r.ReferenceMAh)},
		{"protection_loss_Wh", "burnt in the protection element (Wh)", r.ProtectionLossWh},
		{"cell_loss_Wh", "burnt in the cells' resistance (Wh)", r.CellLossWh},
		{"cell_peak_C", "the cells at their hottest (°C, self-heating)", r.CellPeakC},
		{"protection_peak_W", "element peak dissipation (W)", r.ProtectionPeakW},
		{"junction_C", "element junction at the peak of the hottest pulse (°C)", r.JunctionC},
		{"junction_mean_C", "element junction over a profile cycle (°C)", r.JunctionMeanC},
		{"quiescent_A", "element standing drain (A)", r.QuiescentA},
		{"standby_mAh", "standby drain (mAh)", r.StandbyMAh},
		{"self_discharge_mAh", "self-discharge (mAh)", r.SelfDischargeMAh},
		{"standby_share_pct", "standby and self-discharge (% of delivered)", 100 * r.StandbyShare},
		{"cost_per_hour", "cost per hour of use ($/h)", orNaN(r.RuntimeH, r.CostPerHour)},
		{"cutoff_phase", "cut-off phase", r.CutoffPhase},
		{"cutoff_cause", "cut-off cause", string(r.CutoffCause)},
		{"cutoff_load_V", "load voltage at cut-off (V)", r.CutoffLoadV},
		{"cutoff_pack_V", "pack voltage at cut-off (V)", r.CutoffPackV},
		{"cutoff_A", "current at cut-off (A)", r.CutoffAmps},
		{"cutoff_text", "cut-off", d.CutoffText(r)},
		{"warnings", "warnings", append([]string{}, r.Warnings...)},
		{"cautions", "cautions", dedupe(r.Cautions)},
	}
}

// loadWords lists the profile for people (discharge.ProfileWords, the
// screen's words too).
func loadWords(d *discharge.Design) string { return discharge.ProfileWords(d.Profile) }

func packWords(d *discharge.Design) string {
	s := fmt.Sprintf("%d × %s", d.Series, d.Cell.ID)
	if d.Cell.Name != "" && d.Cell.Name != d.Cell.ID {
		s += " (" + d.Cell.Name + ")"
	}
	if d.Parallel > 1 {
		s += fmt.Sprintf(", %d strings in parallel", d.Parallel)
	}
	return s
}

// noise returns 0 for x below a billionth of scale: the difference of two
// root-found charges that agree to rounding, not a charge anyone stranded.
func noise(x, scale float64) float64 {
	if math.Abs(x) < 1e-9*math.Abs(scale) {
		return 0
	}
	return x
}

func mAh(x float64) string { return units.MAh(x, 3) }

// runText is the result for people: a short block to read or paste.
func runText(s *scenario.Scenario, d *discharge.Design, r *discharge.Result) []byte {
	var b bytes.Buffer
	if s.Name != "" {
		fmt.Fprintf(&b, "%s\n", s.Name)
	}
	line := func(k, format string, a ...any) { fmt.Fprintf(&b, "%-10s %s\n", k, fmt.Sprintf(format, a...)) }
	line("pack", "%s, %s V fresh, %s", packWords(d), fixed(r.FreshV, 2), money(r.PackPrice))
	line("protect", "%s", s.ProtectSpec)
	line("load", "%s", loadWords(d))
	use := "continuous use"
	if d.HoursPerDay > 0 {
		use = short(d.HoursPerDay) + " h of use a day"
	}
	line("conditions", "floor %s V, %s, %s, standby %s", fixed(d.Floor, 2), human(d.TempC, units.Temperature), use, human(d.Standby, units.Current))
	b.WriteByte('\n')

	switch {
	case !(r.RuntimeH > 0):
		// Not "0 h of use = 0 h at 1 h a day": the cut-off line says why.
		line("runtime", "0 h: the product does not start")
	case d.HoursPerDay > 0 && d.HoursPerDay < 24:
		sep := " = "
		if r.RuntimeH > 0 && r.RuntimeH < d.HoursPerDay {
			sep = ", " // "49.0 min of use, within the first day"
		}
		line("runtime", "%s of use%s%s at %s h a day", units.Duration(r.RuntimeH, 3), sep, d.CalendarText(r), short(d.HoursPerDay))
	default:
		line("runtime", "%s of continuous use", units.Duration(r.RuntimeH, 3))
	}
	line("delivered", "%s from the pack, %s into the load", mAh(r.DeliveredMAh), units.Prefixed(r.DeliveredWh, 3, "Wh"))
	line("reference", "%s: the cells at this load to their %s V end-point, no element, no floor", mAh(r.ReferenceMAh), short(d.Cell.EndPoint))
	if _, ok := r.StrandedShare(); ok {
		line("stranded", "%s = %s %% of the reference: %s, %s by the floor",
			mAh(r.StrandedMAh), fixed(strandedPct(r), 1), r.ProtectionShareText(), mAh(r.StrandedByFloorMAh))
	} else {
		line("stranded", "— (the product never starts, so no share of the charge is stranded; see the cut-off)")
	}
	if d.Protect == nil || d.Protect.Kind() == "none" {
		line("element", "none: nothing burnt, no junction")
	} else if r.JunctionRunaway {
		line("element", "%s burnt in it; peak %s, junction runs away (no settled temperature: see the warnings)",
			units.Prefixed(r.ProtectionLossWh, 3, "Wh"), units.Eng(r.ProtectionPeakW, units.Power, 3))
	} else {
		line("element", "%s burnt in it; peak %s, junction %s °C at the hottest pulse (%s °C over a cycle)",
			units.Prefixed(r.ProtectionLossWh, 3, "Wh"), units.Eng(r.ProtectionPeakW, units.Power, 3), fixed(r.JunctionC, 0), fixed(r.JunctionMeanC, 0))
	}
	if d.Cell.SelfHeats() {
		line("cells", "%s burnt in their internal resistance; hottest %s °C", units.Prefixed(r.CellLossWh, 3, "Wh"), fixed(r.CellPeakC, 1))
	} else {
		line("cells", "%s burnt in their internal resistance; taken at the ambient (the cell has no thermal data)", units.Prefixed(r.CellLossWh, 3, "Wh"))
	}
	line("standby", "%s of the charge goes to standby drain and self-discharge", units.Eng(r.StandbyShare, units.Fraction, 2))
	if r.RuntimeH > 0 {
		line("cost", "%s per hour of use", money(r.CostPerHour))
	} else {
		line("cost", "— per hour of use: the product does not run")
	}
	line("cut-off", "%s", d.CutoffText(r))
	list := func(title string, xs []string) {
		if len(xs) == 0 {
			return
		}
		fmt.Fprintf(&b, "\n%s:\n", title)
		for _, x := range xs {
			fmt.Fprintf(&b, "  - %s\n", x)
		}
	}
	list("warnings", r.Warnings)
	list("cautions", dedupe(r.Cautions))
	return b.Bytes()
}
