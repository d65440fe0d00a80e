package pick

import (
	"fmt"

	"headroom/discharge"
	"headroom/tolerance"
)

// Statistic is how a design's runtime is judged: the nominal result, a
// low percentile over part tolerances, or the worst corner.
type Statistic interface {
	// Name is the statistic's short name, as --at takes it.
	Name() string
	// Evaluate returns the design's figures at the statistic. It must be
	// safe to call from many goroutines.
	Evaluate(d *discharge.Design) (*discharge.Result, error)
	// Capped reports whether the statistic's runtime is never above the
	// design's nominal runtime. The search's runtime bound (the nominal
	// runtime of the same pack with no element) relies on it.
	Capped() bool
}

// StatisticFor returns the statistic --at names: nominal, p10 or worst,
// the last two over tols (nil: tolerance.Defaults()), p10 seeded by seed.
func StatisticFor(name string, tols []tolerance.Tol, seed uint64) (Statistic, error) {
	if tols == nil {
		tols = tolerance.Defaults()
	}
	switch name {
	case "", "nominal":
		return Nominal{}, nil
	case "worst":
		return Worst{Tols: tols}, nil
	case "p10":
		return P10{Tols: tols, Samples: DefaultSamples, Seed: seed}, nil
	}
	return nil, fmt.Errorf("at: %q: expected nominal, p10 or worst", name)
}

// Nominal is the engine's result with every part at its typical value.
type Nominal struct{}

func (Nominal) Name() string { return "nominal" }

func (Nominal) Evaluate(d *discharge.Design) (*discharge.Result, error) {
	return discharge.Evaluate(d)
}

func (Nominal) Capped() bool { return true }

// Worst is the worst corner of the tolerances (tolerance.Worst): every
// tolerance at its shortening limit at once. Where that corner runs longer
// than nominal (the limits interact), the nominal result is taken: the
// worst case is never better than the typical one.
type Worst struct{ Tols []tolerance.Tol }

func (Worst) Name() string { return "worst" }

func (w Worst) Evaluate(d *discharge.Design) (*discharge.Result, error) {
	c, err := tolerance.Worst(d, w.Tols)
	if err != nil {
		return nil, err
	}
	if c.Worst.RuntimeH < c.Nominal.RuntimeH {
		return c.Worst, nil
	}
	return c.Nominal, nil
}

func (Worst) Capped() bool { return true }

// DefaultSamples is how many Latin-hypercube samples P10 takes per design:
// enough for a tenth percentile to settle within a few per cent on the
// demo (a compromise with speed; the spread command takes more).
const DefaultSamples = 64

// P10 is the runtime that nine products in ten beat: the tenth percentile
// of a seeded Latin-hypercube spread over the tolerances
// (tolerance.Spread). The other figures are the nominal design's; the
// runtime, days and cost per hour are scaled to the percentile. Where the
// percentile comes out above nominal, nominal is taken.
type P10 struct {
	Tols    []tolerance.Tol
	Samples int
	Seed    uint64
}

func (P10) Name() string { return "p10" }

func (p P10) Evaluate(d *discharge.Design) (*discharge.Result, error) {
	r, err := discharge.Evaluate(d)
	if err != nil {
		return nil, err
	}
	st, err := tolerance.Spread(d, p.Tols, p.Samples, p.Seed)
	if err != nil {
		return nil, err
	}
	if !(st.P10H < r.RuntimeH) {
		return r, nil
	}
	out := *r
	out.RuntimeH = st.P10H
	f := st.P10H / r.RuntimeH
	out.RuntimeDays *= f
	if st.P10H > 0 {
		out.CostPerHour /= f
	} else {
		out.CostPerHour = 0
	}
	return &out, nil
}

func (P10) Capped() bool { return true }
