package pick

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"headroom/internal/units"
)

// Order is how passing designs are ranked.
type Order int

const (
	ByCost        Order = iota // cheapest unit cost first
	ByCostPerHour              // cheapest per hour of use first
)

func (o Order) String() string {
	if o == ByCostPerHour {
		return "cost-per-hour"
	}
	return "cost"
}

// Limits are the target and the constraints of a search.
type Limits struct {
	// Need is the runtime target in hours of use; above 0.
	Need float64
	// At names the statistic the runtime is judged at: "nominal", "p10"
	// or "worst".
	At string
	// Budget is the most a unit may cost (cells plus element), dollars;
	// 0 for no budget.
	Budget float64
	// MaxCells is the most cells a pack may hold; 0 for no limit.
	MaxCells int
	// MaxParallel is the most strings in parallel tried; 0 means
	// DefaultMaxParallel.
	MaxParallel int
	// MaxStranded is the largest stranded share allowed, 0 to 1; 1 for
	// no limit.
	MaxStranded float64
	// MaxJunction is the hottest the element's junction may run, °C;
	// +Inf for no limit (the part's own Tj max still shows as a warning).
	MaxJunction float64
	// BlockReversed requires the whole pack put in backwards to be
	// blocked (no current worth naming reaches the load).
	BlockReversed bool
	// MaxInput is the highest fresh open-circuit pack voltage the product
	// takes, volts; 0 means FreshLimit times the design's own.
	MaxInput float64
	// By is the ranking.
	By Order
	// Top is how many passing designs to list; 0 means DefaultTop.
	Top int
}

// DefaultMaxParallel and DefaultTop are the search's defaults.
const (
	DefaultMaxParallel = 4
	DefaultTop         = 10
)

// DefaultLimits has no target yet and no constraint but the defaults.
func DefaultLimits() Limits {
	return Limits{At: "nominal", MaxStranded: 1, MaxJunction: math.Inf(1)}
}

// Key is one setting of Limits, shared by a flag (--max-cells) and a
// [pick] key (max_cells): the same parser for both.
type Key struct {
	Name  string // file key; the flag is the same with dashes
	Arg   string // the flag's value placeholder
	Usage string
	Set   func(l *Limits, v string) error
}

// Flag is the key's flag name: max_cells → max-cells.
func (k Key) Flag() string { return strings.ReplaceAll(k.Name, "_", "-") }

// Keys lists every setting in the order help shows them.
var Keys = []Key{
	{"need", "TIME", "runtime target in hours of use (20h, 90min, 3d; a bare number is hours)", setNeed},
	{"at", "STAT", "the runtime judged at: nominal, p10 or worst", setAt},
	{"budget", "DOLLARS", "most a unit may cost, cells plus element ($1.50 or 1.50; none lifts the file's)", setBudget},
	{"max_cells", "N", "most cells in the pack", func(l *Limits, v string) error {
		n, err := parseCount(v, 1, 48*16)
		l.MaxCells = n
		return err
	}},
	{"max_parallel", "N", "most strings in parallel tried, 1 to 16 (default 4)", func(l *Limits, v string) error {
		n, err := parseCount(v, 1, 16)
		l.MaxParallel = n
		return err
	}},
	{"max_stranded", "PCT", "largest stranded share (30% or 30)", setStranded},
	{"max_junction", "CELSIUS", "hottest the element's junction may run (125C or 125)", setJunction},
	{"block_reversed", "", "the whole pack put in backwards must be blocked", func(l *Limits, v string) error {
		b, err := strconv.ParseBool(strings.TrimSpace(v))
		if err != nil {
			return fmt.Errorf("%q: expected true or false", v)
		}
		l.BlockReversed = b
		return nil
	}},
	{"max_input", "VOLTS", "highest fresh pack voltage the product takes (6V or 6)", setMaxInput},
	{"by", "KEY", "rank by cost (unit cost) or cost-per-hour", func(l *Limits, v string) error {
		switch strings.ToLower(strings.TrimSpace(v)) {
		case "cost":
			l.By = ByCost
		case "cost-per-hour", "cost_per_hour":
			l.By = ByCostPerHour
		default:
			return fmt.Errorf("%q: expected cost or cost-per-hour", v)
		}
		return nil
	}},
	{"top", "N", "how many passing designs to list (default 10)", func(l *Limits, v string) error {
		n, err := parseCount(v, 1, 1000)
		l.Top = n
		return err
	}},
}

// LookupKey finds a setting by file key or flag name.
func LookupKey(name string) (Key, bool) {
	n := strings.ReplaceAll(strings.ToLower(strings.TrimSpace(name)), "-", "_")
	for _, k := range Keys {
		if k.Name == n {
			return k, true
		}
	}
	return Key{}, false
}

func setNeed(l *Limits, v string) error {
	t := strings.TrimSpace(v)
	h, err := strconv.ParseFloat(t, 64)
	if days, ok := strings.CutSuffix(t, "d"); err != nil && ok {
		// Days of use are not a unit the unit parser knows: 3d is 72 h.
		if h, err = strconv.ParseFloat(strings.TrimSpace(days), 64); err == nil {
			h *= 24
		}
	}
	if err != nil {
		sec, perr := units.Parse(t, units.Time, false)
		if perr != nil {
			return fmt.Errorf("%q: expected a time such as 20h, 90min or 3d", v)
		}
		h = sec / 3600
	}
	if math.IsNaN(h) || math.IsInf(h, 0) || h <= 0 {
		return fmt.Errorf("%s: the target must be above 0 hours", t)
	}
	if h > 24*365*20 {
		return fmt.Errorf("%s: more than 20 years of use", t)
	}
	l.Need = h
	return nil
}

func setAt(l *Limits, v string) error {
	s := strings.ToLower(strings.TrimSpace(v))
	switch s {
	case "nominal", "p10", "worst":
		l.At = s
		return nil
	}
	return fmt.Errorf("%q: expected nominal, p10 or worst", v)
}

func setBudget(l *Limits, v string) error {
	if strings.EqualFold(strings.TrimSpace(v), "none") {
		l.Budget = 0 // lifts a budget the file gives
		return nil
	}
	b, err := units.Parse(v, units.Money, true)
	if err != nil {
		return err
	}
	if b < 0 {
		return fmt.Errorf("%s: a budget cannot be negative", strings.TrimSpace(v))
	}
	if b == 0 {
		return fmt.Errorf("%s: a budget must be above 0 (leave it out for none)", strings.TrimSpace(v))
	}
	l.Budget = b
	return nil
}

func setStranded(l *Limits, v string) error {
	t := strings.TrimSpace(v)
	f, err := strconv.ParseFloat(t, 64)
	if err == nil {
		f /= 100 // a bare number is percent
	} else if f, err = units.Parse(t, units.Fraction, false); err != nil {
		return fmt.Errorf("%q: expected a share such as 30%% or 30", v)
	}
	if math.IsNaN(f) || f < 0 || f > 1 {
		return fmt.Errorf("%s: must be 0 to 100 %%", t)
	}
	l.MaxStranded = f
	return nil
}

func setJunction(l *Limits, v string) error {
	c, err := units.Parse(v, units.Temperature, true)
	if err != nil {
		return err
	}
	if c < -40 || c > 400 {
		return fmt.Errorf("%s: must be -40 to 400 °C", strings.TrimSpace(v))
	}
	l.MaxJunction = c
	return nil
}

func setMaxInput(l *Limits, v string) error {
	x, err := units.Parse(v, units.Voltage, true)
	if err != nil {
		return err
	}
	if !(x > 0) || x > 1000 {
		return fmt.Errorf("%s: must be above 0 and at most 1000 V", strings.TrimSpace(v))
	}
	l.MaxInput = x
	return nil
}

func parseCount(v string, lo, hi int) (int, error) {
	t := strings.TrimSpace(v)
	n, err := strconv.Atoi(t)
	if err != nil {
		return 0, fmt.Errorf("%q is not a whole number", v)
	}
	if n < lo || n > hi {
		return 0, fmt.Errorf("%d: must be %d to %d", n, lo, hi)
	}
	return n, nil
}
