package pick

import "headroom/discharge"

// Statistic is how a design's runtime is judged: the nominal result, a
// low percentile over part tolerances, or the worst corner.
type Statistic interface {
	// Name is the statistic's short name, as --at takes it.
	Name() string
	// Evaluate returns the design's figures at the statistic. It must be
	// safe to call from many goroutines.
	Evaluate(d *discharge.Design) (*discharge.Result, error)
	// Monotone reports whether the statistic keeps the engine's order
	// between two designs that share every sample or corner: when one
	// design runs at least as long as another in every case, it does at
	// the statistic too. The search's runtime bound relies on it.
	Monotone() bool
}

// Nominal is the engine's result with every part at its typical value.
type Nominal struct{}

func (Nominal) Name() string { return "nominal" }

func (Nominal) Evaluate(d *discharge.Design) (*discharge.Result, error) {
	return discharge.Evaluate(d)
}

func (Nominal) Monotone() bool { return true }
