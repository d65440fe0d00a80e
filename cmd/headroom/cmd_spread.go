package main

import (
	"bytes"
	"flag"
	"fmt"
	"strconv"
	"strings"

	"headroom/discharge"
	"headroom/internal/scenario"
	"headroom/internal/units"
	"headroom/tolerance"
)

var spreadCmd = &command{
	name:  "spread",
	run:   runSpread,
	args:  "[scenario.toml] [flags] [--samples N] [--seed S] [--tol NAME=SPREAD]",
	short: "runtime over the parts' tolerances: worst corner, p10/p50/p90, what to tighten",
	help: `
Spreads one design (as headroom run takes it) over the tolerances of its
cells, load, floor, ambient and protection part: the worst corner (every
tolerance at the limit that shortens the runtime, each side found by
evaluation), the best corner, a seeded Latin-hypercube spread of runtime
and delivered charge (p10, p50, p90), and each tolerance's sensitivity:
the runtime at its two limits with the rest nominal, ranked by the hours
it can cost. The tolerances are the scenario's [tolerance] table over
typical defaults (from memory): check them against your data sheets.

tolerances: ` + strings.Join(tolerance.Names(), ", ") + `

flags:
` + designFlagHelp() + `  --samples N                   samples of the spread, 1 to 1000000 (default: the scenario's, else 2000)
  --seed S                      seed of the spread, 0 or more (default: the scenario's, else 1)
  --tol NAME=SPREAD             set one tolerance: 5%, 50mV, MIN..MAX (0C..40C, -5%..+10%),
                                with ,normal or ,uniform; repeat for more
  --format text|json|csv|md     output format (default text)

examples:
  headroom spread
  headroom spread --protect pmos --samples 5000 --seed 7
  headroom spread --protect ic --tol ilim=10% --format json
  headroom spread testdata/scenarios/example.toml --tol ambient=0C..40C,uniform
`,
}

// tolFlags collects repeated --tol NAME=SPREAD.
type tolFlags []string

func (t *tolFlags) String() string     { return strings.Join(*t, " ") }
func (t *tolFlags) Set(v string) error { *t = append(*t, v); return nil }

// spreadFlags are the flags spread and run --spread share.
type spreadFlags struct {
	samples, seed *string
	tols          tolFlags
}

func addSpreadFlags(fs *flag.FlagSet) *spreadFlags {
	sf := &spreadFlags{samples: fs.String("samples", "", ""), seed: fs.String("seed", "", "")}
	fs.Var(&sf.tols, "tol", "")
	return sf
}

// apply sets the scenario's sample count, seed and tolerances from the
// flags given.
func (sf *spreadFlags) apply(s *scenario.Scenario) error {
	if t := strings.TrimSpace(*sf.samples); t != "" {
		n, err := strconv.Atoi(t)
		if err != nil || n < 1 || n > tolerance.MaxSamples {
			return fmt.Errorf("--samples: %q must be a whole number from 1 to %d", *sf.samples, tolerance.MaxSamples)
		}
		s.Samples = n
	}
	if t := strings.TrimSpace(*sf.seed); t != "" {
		n, err := strconv.ParseInt(t, 10, 64)
		if err != nil || n < 0 {
			return fmt.Errorf("--seed: %q must be a whole number, 0 or more", *sf.seed)
		}
		s.Seed = uint64(n)
	}
	for _, v := range sf.tols {
		name, spec, ok := strings.Cut(v, "=")
		name = strings.TrimSpace(name)
		if !ok || name == "" {
			return fmt.Errorf("--tol: %q: expected NAME=SPREAD, as in floor=50mV (names: %s)", v, strings.Join(tolerance.Names(), ", "))
		}
		t, err := tolerance.ParseSpread(name, spec)
		if err != nil {
			return fmt.Errorf("--tol: %w", err)
		}
		s.Tolerances = tolerance.With(s.Tolerances, t)
	}
	return nil
}

func (sf *spreadFlags) given(name string) bool {
	return name == "samples" || name == "seed" || name == "tol"
}

func runSpread(c *cli, args []string) error {
	fs := newFlags("spread")
	addDesignFlags(fs)
	sf := addSpreadFlags(fs)
	formatFlag := fs.String("format", "text", "")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if err := wantArgs("spread", pos, 0, 1, "a scenario file"); err != nil {
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
	if err := sf.apply(s); err != nil {
		return err
	}
	var changed []string
	fs.Visit(func(fl *flag.Flag) {
		if fl.Name != "format" && !sf.given(fl.Name) {
			changed = append(changed, "--"+fl.Name)
		}
	})
	if len(changed) > 0 && s.Name != "" {
		s.Name += " with " + strings.Join(changed, ", ")
	}
	d := s.Design
	rep, err := tolerance.Analyse(&d, s.Tolerances, s.Samples, s.Seed)
	if err != nil {
		return fmt.Errorf("spread: %w", err)
	}
	switch f {
	case formatText:
		var b bytes.Buffer
		if s.Name != "" {
			fmt.Fprintf(&b, "%s\n", s.Name)
		}
		fmt.Fprintf(&b, "%-10s %s, %s\n", "design", packWords(&d), s.ProtectSpec)
		fmt.Fprintf(&b, "%-10s %s\n\n", "load", loadWords(&d))
		spreadText(&b, s, rep)
		_, err = c.stdout.Write(b.Bytes())
		return err
	case formatMD:
		var b bytes.Buffer
		spreadMarkdown(&b, rep)
		// As the text and the report say it: the tables alone would pass
		// remembered defaults off as the parts' data.
		b.WriteString("\nThe default tolerances are typical values from memory: set yours in the scenario's [tolerance] table from your data sheets.\n")
		_, err = c.stdout.Write(b.Bytes())
		return err
	}
	return writeRecord(c.stdout, f, append([]field{{"name", "name", s.Name}}, spreadRecord(s, rep, f == formatCSV)...))
}

// spreadRecord is the spread as named fields. With flat (CSV) the
// sensitivities are columns NAME_low_h and NAME_high_h; otherwise one
// "sensitivity" list of {name, low_h, high_h, lost_h, low, high}.
func spreadRecord(s *scenario.Scenario, rep *tolerance.Report, flat bool) []field {
	c, st := rep.Corner, rep.Stats
	rec := []field{
		{"nominal_h", "nominal runtime (h of use)", c.NominalH()},
		{"worst_h", "worst corner (h of use)", c.WorstH()},
		{"best_h", "best corner (h of use)", c.BestH()},
		{"p10_h", "p10 runtime (h of use)", st.P10H},
		{"p50_h", "p50 runtime (h of use)", st.P50H},
		{"p90_h", "p90 runtime (h of use)", st.P90H},
		{"p10_mAh", "p10 delivered (mAh)", st.P10MAh},
		{"p50_mAh", "p50 delivered (mAh)", st.P50MAh},
		{"p90_mAh", "p90 delivered (mAh)", st.P90MAh},
		{"samples", "samples", st.Samples},
		{"seed", "seed", int(st.Seed)},
	}
	if flat {
		for _, sd := range c.Sides {
			rec = append(rec, field{sd.Name + "_low_h", sd.Name + " low (h)", sd.LowH}, field{sd.Name + "_high_h", sd.Name + " high (h)", sd.HighH})
		}
	} else {
		var b bytes.Buffer
		b.WriteString("[")
		for i, sd := range c.Sides {
			if i > 0 {
				b.WriteString(",")
			}
			b.WriteString("\n    {\"name\": ")
			b.Write(jsonString(sd.Name))
			b.WriteString(", \"low_h\": ")
			writeJSONValue(&b, sd.LowH)
			b.WriteString(", \"high_h\": ")
			writeJSONValue(&b, sd.HighH)
			b.WriteString(", \"lost_h\": ")
			writeJSONValue(&b, sd.LostH)
			b.WriteString(", \"low\": ")
			b.Write(jsonString(sd.LowText))
			b.WriteString(", \"high\": ")
			b.Write(jsonString(sd.HighText))
			b.WriteString("}")
		}
		if len(c.Sides) > 0 {
			b.WriteString("\n  ")
		}
		b.WriteString("]")
		rec = append(rec, field{"sensitivity", "sensitivity", rawJSON(b.Bytes())})
	}
	return append(rec, field{"spread_warnings", "spread warnings", append([]string{}, rep.Warnings...)})
}

// tolText is a tolerance as the scenario gives it, for the sensitivity
// list.
func tolText(tols []tolerance.Tol, name string) string {
	for _, t := range tols {
		if t.Name == name {
			return t.String()
		}
	}
	return ""
}

// hoursWords is a runtime for people: "6.2 h", "43.9 min", "0 h (does not
// start)".
func hoursWords(h float64) string {
	if h == 0 {
		return "0 h (does not start)"
	}
	return units.Duration(h, 3)
}

// spreadText writes the spread block: the three runtimes, the quantiles,
// the sensitivities as bars, and the warnings.
func spreadText(b *bytes.Buffer, s *scenario.Scenario, rep *tolerance.Report) {
	c, st := rep.Corner, rep.Stats
	line := func(k, format string, a ...any) { fmt.Fprintf(b, "%-10s %s\n", k, fmt.Sprintf(format, a...)) }
	if c.NominalH() > 0 {
		line("nominal", "%s of use", hoursWords(c.NominalH()))
	} else {
		line("nominal", "%s", hoursWords(0)) // not "0 h (does not start) of use"
	}
	if st.P10H > 0 {
		line("p10", "at least %s in 9 of 10 products", units.Duration(st.P10H, 3))
	} else {
		line("p10", "0 h: more than 1 product in 10 does not start")
	}
	line("spread", "p10 %s, p50 %s, p90 %s (%d samples, seed %d, Latin hypercube)", units.Duration(st.P10H, 3), units.Duration(st.P50H, 3), units.Duration(st.P90H, 3), st.Samples, st.Seed)
	line("delivered", "p10 %s, p50 %s, p90 %s", mAh(st.P10MAh), mAh(st.P50MAh), mAh(st.P90MAh))
	line("worst", "%s: every tolerance at the limit that shortens the runtime", hoursWords(c.WorstH()))
	line("best", "%s: every tolerance at the other limit", hoursWords(c.BestH()))
	if len(c.Sides) > 0 {
		fmt.Fprintf(b, "\nsensitivity: each tolerance alone at its limits, the rest nominal; ranked by hours lost\n")
		maxLost := 0.0
		nameW, tolW := 4, 6
		for _, sd := range c.Sides {
			maxLost = max(maxLost, sd.LostH)
			nameW = max(nameW, len(sd.Name))
			tolW = max(tolW, len([]rune(tolText(s.Tolerances, sd.Name))))
		}
		fmt.Fprintf(b, "  %s  %s  %21s  %21s  %8s\n", pad("name", nameW, false), pad("spread", tolW, false), "at low", "at high", "lost")
		for _, sd := range c.Sides {
			bar := ""
			if maxLost > 0 {
				bar = strings.Repeat("█", int(12*sd.LostH/maxLost+0.5))
				if bar == "" && sd.LostH > 0 {
					bar = "▏"
				}
			}
			fmt.Fprintf(b, "  %s  %s  %21s  %21s  %8s  %s\n", pad(sd.Name, nameW, false), pad(tolText(s.Tolerances, sd.Name), tolW, false),
				pad(sd.LowText, 10, true)+" "+pad(sig(sd.LowH, 3)+" h", 10, true),
				pad(sd.HighText, 10, true)+" "+pad(sig(sd.HighH, 3)+" h", 10, true),
				sig(sd.LostH, 3)+" h", bar)
		}
	}
	if len(rep.Warnings) > 0 {
		fmt.Fprintf(b, "\nwarnings:\n")
		for _, w := range rep.Warnings {
			fmt.Fprintf(b, "  - %s\n", w)
		}
	}
	fmt.Fprintf(b, "\nThe default tolerances are typical values from memory: set yours in the scenario's [tolerance] table from your data sheets.\n")
}

// spreadMarkdown writes the spread as two Markdown tables.
func spreadMarkdown(b *bytes.Buffer, rep *tolerance.Report) {
	c, st := rep.Corner, rep.Stats
	b.WriteString("| quantity | runtime (h of use) |\n|---|---:|\n")
	for _, r := range []struct {
		k string
		v float64
	}{{"nominal", c.NominalH()}, {"worst corner", c.WorstH()}, {"best corner", c.BestH()},
		{"p10", st.P10H}, {"p50", st.P50H}, {"p90", st.P90H}} {
		fmt.Fprintf(b, "| %s | %s |\n", r.k, sig(r.v, 4))
	}
	fmt.Fprintf(b, "\n%d samples, seed %d.\n\n| tolerance | low | at low (h) | high | at high (h) | lost (h) |\n|---|---:|---:|---:|---:|---:|\n", st.Samples, st.Seed)
	for _, sd := range c.Sides {
		fmt.Fprintf(b, "| %s | %s | %s | %s | %s | %s |\n", sd.Name, mdEscape(sd.LowText), sig(sd.LowH, 4), mdEscape(sd.HighText), sig(sd.HighH, 4), sig(sd.LostH, 3))
	}
	if len(rep.Warnings) > 0 {
		b.WriteString("\n")
		for _, w := range rep.Warnings {
			fmt.Fprintf(b, "- %s\n", mdEscape(w))
		}
	}
}

// rankKeys are the spread figures table and compare can rank by.
var rankKeys = map[string]string{"worst": "worst corner", "p10": "p10"}

// rankFigure is design d's worst-corner runtime ("worst") or p10 runtime
// ("p10") under the scenario's tolerances, hours of use.
func rankFigure(s *scenario.Scenario, d *discharge.Design, key string) (float64, error) {
	if key == "worst" {
		c, err := tolerance.Worst(d, s.Tolerances)
		if err != nil {
			return 0, err
		}
		return c.WorstH(), nil
	}
	st, err := tolerance.Spread(d, s.Tolerances, s.Samples, s.Seed)
	return st.P10H, err
}

// rankColumn is the column that shows the figure a table is ranked by.
func rankColumn[T any](key string, get func(T) float64) column[T] {
	return column[T]{key: key + "_h", head: key + " h", right: true, human: true, machine: true, width: 7,
		text: func(r T) string { return fixed(get(r), 2) }, val: func(r T) any { return get(r) }}
}
