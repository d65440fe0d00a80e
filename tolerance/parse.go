package tolerance

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"headroom/internal/units"
)

// Parse reads one tolerance as a scenario file's [tolerance] table gives
// it (a TOML value already decoded):
//
//	capacity = "5%"                         ± a percentage of nominal
//	floor = "50mV"                          ± an amount in the unit
//	shelf = 12                              0 to 12 months (shelf: bare months)
//	ambient = { min = "0C", max = "40C" }   limits
//	load = { min = "-5%", max = "+15%" }    limits of a percentage parameter
//	ilim = { spread = "25%", dist = "uniform" }
//
// dist is "normal" (the limits at ±3σ) or "uniform"; left out, the
// tolerance's default distribution is kept.
func Parse(name string, v any) (Tol, error) {
	p, ok := lookup(name)
	if !ok {
		return Tol{}, fmt.Errorf("unknown tolerance %q: expected one of %s", name, strings.Join(Names(), ", "))
	}
	t := Tol{Name: name, Dist: p.def.Dist}
	switch x := v.(type) {
	case map[string]any:
		keys := make([]string, 0, len(x))
		for k := range x {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		var minV, maxV, spread any
		for _, k := range keys {
			switch k {
			case "min":
				minV = x[k]
			case "max":
				maxV = x[k]
			case "spread":
				spread = x[k]
			case "dist":
				s, _ := x[k].(string)
				switch strings.ToLower(strings.TrimSpace(s)) {
				case "normal":
					t.Dist = Normal
				case "uniform":
					t.Dist = Uniform
				default:
					return Tol{}, fmt.Errorf("%s: dist %q: expected \"normal\" or \"uniform\"", name, fmt.Sprint(x[k]))
				}
			default:
				return Tol{}, fmt.Errorf("%s: unknown key %q: expected spread, or min and max, and dist", name, k)
			}
		}
		switch {
		case spread != nil && (minV != nil || maxV != nil):
			return Tol{}, fmt.Errorf("%s: give either spread or min and max, not both", name)
		case spread != nil:
			if err := t.setSpread(p, spread); err != nil {
				return Tol{}, err
			}
		case minV != nil && maxV != nil:
			t.Form = Range
			var err error
			if t.Min, err = p.limit(minV); err != nil {
				return Tol{}, fmt.Errorf("%s: min: %w", name, err)
			}
			if t.Max, err = p.limit(maxV); err != nil {
				return Tol{}, fmt.Errorf("%s: max: %w", name, err)
			}
		case minV != nil || maxV != nil:
			return Tol{}, fmt.Errorf("%s: give both min and max", name)
		default:
			return Tol{}, fmt.Errorf("%s: give spread, or min and max", name)
		}
	default:
		if err := t.setSpread(p, v); err != nil {
			return Tol{}, err
		}
	}
	if err := t.Check(); err != nil {
		return Tol{}, err
	}
	return t, nil
}

// ParseSpread reads one tolerance written as text, as on a command line:
// "5%", "50mV", or "MIN..MAX" ("0C..40C", "-5%..+15%"), with an optional
// ",uniform" or ",normal".
func ParseSpread(name, s string) (Tol, error) {
	body, dist, hasDist := strings.Cut(s, ",")
	m := map[string]any{}
	if lo, hi, isRange := strings.Cut(body, ".."); isRange {
		m["min"], m["max"] = strings.TrimSpace(lo), strings.TrimSpace(hi)
	} else {
		m["spread"] = strings.TrimSpace(body)
	}
	if hasDist {
		m["dist"] = dist
	}
	return Parse(name, m)
}

func (t *Tol) setSpread(p param, v any) error {
	s, isText := v.(string)
	if !isText {
		f, ok := number(v)
		if !ok {
			return fmt.Errorf("%s: %v: expected a spread such as %s or \"5%%\"", t.Name, v, p.example())
		}
		if p.ratio {
			return fmt.Errorf("%s: %v has no unit: expected a percentage such as \"5%%\"", t.Name, v)
		}
		t.Form, t.Delta = Offset, f
		return nil
	}
	s = strings.TrimSpace(s)
	if strings.HasSuffix(s, "%") {
		f, err := units.Parse(s, units.Fraction, false)
		if err != nil {
			return fmt.Errorf("%s: %w", t.Name, err)
		}
		t.Form, t.Pct = Percent, f
		return nil
	}
	if p.ratio {
		return fmt.Errorf("%s: %q: expected a percentage such as \"5%%\"", t.Name, s)
	}
	f, err := p.parse(s)
	if err != nil {
		return fmt.Errorf("%s: %w", t.Name, err)
	}
	t.Form, t.Delta = Offset, f
	return nil
}

// parse reads an amount in the parameter's unit; shelf takes months.
func (p param) parse(s string) (float64, error) {
	if p.name == "shelf" {
		t := strings.TrimSpace(s)
		for _, suf := range []string{"months", "month", "mo"} {
			t = strings.TrimSpace(strings.TrimSuffix(t, suf))
		}
		f, err := strconv.ParseFloat(t, 64)
		if err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
			return 0, fmt.Errorf("%q is not a number of months", s)
		}
		return f, nil
	}
	return units.Parse(s, p.kind, true)
}

// limit reads a min or max: a signed percentage for percentage
// parameters, a value in the unit otherwise.
func (p param) limit(v any) (float64, error) {
	if s, ok := v.(string); ok {
		if p.ratio {
			if !strings.HasSuffix(strings.TrimSpace(s), "%") {
				return 0, fmt.Errorf("%q: expected a percentage of nominal such as \"-5%%\"", s)
			}
			return units.Parse(strings.TrimPrefix(strings.TrimSpace(s), "+"), units.Fraction, false)
		}
		return p.parse(strings.TrimPrefix(strings.TrimSpace(s), "+"))
	}
	f, ok := number(v)
	if !ok {
		return 0, fmt.Errorf("%v is not a value", v)
	}
	if p.ratio {
		return 0, fmt.Errorf("%v has no unit: expected a percentage of nominal such as \"-5%%\"", v)
	}
	return f, nil
}

func number(v any) (float64, bool) {
	switch x := v.(type) {
	case int64:
		return float64(x), true
	case int:
		return float64(x), true
	case float64:
		return x, !math.IsNaN(x) && !math.IsInf(x, 0)
	}
	return 0, false
}

// TOML writes t as a value of the [tolerance] table that Parse reads back
// to t exactly.
func (t Tol) TOML() string {
	p, _ := lookup(t.Name)
	num := func(v float64) string {
		if p.name == "shelf" {
			return strconv.FormatFloat(v, 'g', -1, 64)
		}
		if p.ratio {
			return strconv.Quote(units.Format(v, units.Fraction))
		}
		return strconv.Quote(units.Format(v, p.kind))
	}
	var parts []string
	switch t.Form {
	case Percent:
		parts = append(parts, "spread = "+strconv.Quote(units.Format(t.Pct, units.Fraction)))
	case Offset:
		parts = append(parts, "spread = "+num(t.Delta))
	case Range:
		parts = append(parts, "min = "+num(t.Min), "max = "+num(t.Max))
	}
	if t.Dist != p.def.Dist || len(parts) == 2 {
		parts = append(parts, "dist = "+strconv.Quote(t.Dist.String()))
	}
	if len(parts) == 1 {
		return strings.TrimPrefix(parts[0], "spread = ")
	}
	return "{ " + strings.Join(parts, ", ") + " }"
}
