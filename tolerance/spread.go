package tolerance

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sort"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distmv"
	"gonum.org/v1/gonum/stat/distuv"
	"gonum.org/v1/gonum/stat/samplemv"

	"headroom/discharge"
)

// MaxSamples is the most samples Spread takes.
const MaxSamples = 1_000_000

// Side is one tolerance at its two limits with every other at nominal:
// the sensitivity the engineer ranks ("what do I tighten?").
type Side struct {
	Name            string
	Low, High       float64 // the limits: values in the parameter's unit, or signed fractions for percentage parameters
	LowText         string  // the low limit for people: "1.75 V", "−5 %"
	HighText        string
	LowH, HighH     float64 // runtime at each limit, hours of use
	LowMAh, HighMAh float64 // delivered charge at each limit
	// LostH is how much the worse side shortens the runtime against
	// nominal, hours (0 when neither does).
	LostH float64
	// WorstLow is true when the low limit is the shortening side.
	WorstLow  bool
	low, high *discharge.Result
}

// Corner is the worst and best corners of a design: every tolerance at
// its shortening (lengthening) limit at once, each side found by
// evaluation.
type Corner struct {
	Nominal *discharge.Result
	Worst   *discharge.Result
	Best    *discharge.Result
	// Sides lists each tolerance that applies, ranked by LostH, largest
	// first (ties by name).
	Sides []Side
}

// NominalH, WorstH and BestH are the corners' runtimes in hours of use.
func (c Corner) NominalH() float64 { return c.Nominal.RuntimeH }
func (c Corner) WorstH() float64   { return c.Worst.RuntimeH }
func (c Corner) BestH() float64    { return c.Best.RuntimeH }

// Stats is the spread of runtime and delivered charge over the samples.
type Stats struct {
	Samples int
	Seed    uint64
	// Quantiles of runtime (hours of use) and delivered charge (mAh), by
	// gonum stat.Quantile (empirical).
	P10H, P50H, P90H       float64
	P10MAh, P50MAh, P90MAh float64
	MinH, MaxH             float64
	// Causes counts the samples by what stopped them.
	Causes map[discharge.Cause]int
	// Hours is every sample's runtime, sorted.
	Hours []float64
}

// workers is how many goroutines evaluate: every core the process has.
func workers(n int) int {
	w := runtime.GOMAXPROCS(0)
	if w > n {
		w = n
	}
	if w < 1 {
		w = 1
	}
	return w
}

// each runs f(i) for i in [0, n) on every core; the first error wins.
func each(n int, f func(i int) error) error {
	var next atomic.Int64
	var mu sync.Mutex
	var first error
	var wg sync.WaitGroup
	for range workers(n) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				i := int(next.Add(1)) - 1
				if i >= n {
					return
				}
				if err := f(i); err != nil {
					mu.Lock()
					if first == nil {
						first = err
					}
					mu.Unlock()
					return
				}
			}
		}()
	}
	wg.Wait()
	return first
}

func (m *model) nominals() []float64 {
	v := make([]float64, len(m.act))
	for i, a := range m.act {
		v[i] = a.nom
	}
	return v
}

func (m *model) eval(vals []float64) (*discharge.Result, error) {
	d, err := m.design(vals)
	if err != nil {
		return nil, err
	}
	return discharge.Evaluate(d)
}

// Worst finds the worst and best corners of d under tols, and each
// tolerance's sensitivity on the way. Tolerances that do not apply to the
// design (a MOSFET threshold behind a diode) are left out.
func Worst(d *discharge.Design, tols []Tol) (Corner, error) {
	m, err := newModel(d, tols)
	if err != nil {
		return Corner{}, err
	}
	return m.worst()
}

// Sensitivity is Worst's ranked sides alone.
func Sensitivity(d *discharge.Design, tols []Tol) ([]Side, error) {
	c, err := Worst(d, tols)
	return c.Sides, err
}

func (m *model) worst() (Corner, error) {
	k := len(m.act)
	nom := m.nominals()
	res := make([]*discharge.Result, 2*k+1)
	err := each(2*k+1, func(j int) error {
		v := append([]float64(nil), nom...)
		if j < 2*k {
			a := m.act[j/2]
			if j%2 == 0 {
				v[j/2] = a.lo
			} else {
				v[j/2] = a.hi
			}
		}
		r, err := m.eval(v)
		res[j] = r
		return err
	})
	if err != nil {
		return Corner{}, err
	}
	c := Corner{Nominal: res[2*k]}
	worst := append([]float64(nil), nom...)
	best := append([]float64(nil), nom...)
	for i, a := range m.act {
		lo, hi := res[2*i], res[2*i+1]
		s := Side{Name: a.p.name, Low: showValue(a, a.lo), High: showValue(a, a.hi),
			LowText: a.p.show(showValue(a, a.lo)), HighText: a.p.show(showValue(a, a.hi)),
			LowH: lo.RuntimeH, HighH: hi.RuntimeH, LowMAh: lo.DeliveredMAh, HighMAh: hi.DeliveredMAh,
			low: lo, high: hi}
		s.WorstLow = shorter(lo, hi)
		if s.WorstLow {
			worst[i], best[i] = a.lo, a.hi
		} else {
			worst[i], best[i] = a.hi, a.lo
		}
		s.LostH = math.Max(0, c.Nominal.RuntimeH-math.Min(lo.RuntimeH, hi.RuntimeH))
		c.Sides = append(c.Sides, s)
	}
	sort.SliceStable(c.Sides, func(i, j int) bool {
		if c.Sides[i].LostH != c.Sides[j].LostH {
			return c.Sides[i].LostH > c.Sides[j].LostH
		}
		return c.Sides[i].Name < c.Sides[j].Name
	})
	var pair [2]*discharge.Result
	err = each(2, func(j int) error {
		v := worst
		if j == 1 {
			v = best
		}
		r, err := m.eval(v)
		pair[j] = r
		return err
	})
	if err != nil {
		return Corner{}, err
	}
	c.Worst, c.Best = pair[0], pair[1]
	return c, nil
}

// shorter reports whether a runs shorter than b (by delivered charge when
// the runtimes tie, as both do at 0).
func shorter(a, b *discharge.Result) bool {
	if a.RuntimeH != b.RuntimeH {
		return a.RuntimeH < b.RuntimeH
	}
	return a.DeliveredMAh <= b.DeliveredMAh
}

// Spread evaluates d at samples points of a Latin hypercube over tols
// (gonum samplemv.LatinHypercube on the unit cube, each coordinate mapped
// through its distribution's quantile function, gonum distuv), seeded by
// seed: the same seed gives the same numbers. Samples run on every core.
//
// A cell-to-cell tolerance moves the pack by the mean of its
// Series·Parallel cells: a normal distribution with the cell's σ (limits
// at ±3σ for normal, σ = width/√12 for uniform) divided by √cells, cut
// off at the tolerance's limits. That is a first-order view of a pack of
// unequal cells (series voltages add); the weakest cell's own end is not
// modelled.
func Spread(d *discharge.Design, tols []Tol, samples int, seed uint64) (Stats, error) {
	if samples < 1 || samples > MaxSamples {
		return Stats{}, fmt.Errorf("samples: %d must be 1 to %d", samples, MaxSamples)
	}
	m, err := newModel(d, tols)
	if err != nil {
		return Stats{}, err
	}
	return m.spread(samples, seed)
}

// quantile maps u in (0, 1) to a's value under its distribution.
func (a active) quantile(u float64) float64 {
	if a.hi == a.lo {
		return a.lo
	}
	mid, w := (a.lo+a.hi)/2, (a.hi-a.lo)/2
	if a.t.Dist == Uniform && a.n == 1 {
		return distuv.Uniform{Min: a.lo, Max: a.hi}.Quantile(u)
	}
	sigma := w / 3
	if a.t.Dist == Uniform {
		sigma = w / math.Sqrt(3) // the uniform's own σ
	}
	sigma /= math.Sqrt(float64(a.n))
	nd := distuv.Normal{Mu: mid, Sigma: sigma}
	plo, phi := nd.CDF(a.lo), nd.CDF(a.hi)
	x := nd.Quantile(plo + u*(phi-plo))
	return math.Min(a.hi, math.Max(a.lo, x))
}

func (m *model) spread(samples int, seed uint64) (Stats, error) {
	k := len(m.act)
	nom := m.nominals()
	var batch *mat.Dense
	if k > 0 {
		src := rand.NewPCG(seed, seed^0x9e3779b97f4a7c15)
		batch = mat.NewDense(samples, k, nil)
		samplemv.LatinHypercube{Q: distmv.NewUnitUniform(k, src), Src: src}.Sample(batch)
	}
	hours := make([]float64, samples)
	mah := make([]float64, samples)
	causes := make([]discharge.Cause, samples)
	err := each(samples, func(i int) error {
		v := append([]float64(nil), nom...)
		for j, a := range m.act {
			v[j] = a.quantile(batch.At(i, j))
		}
		r, err := m.eval(v)
		if err != nil {
			return err
		}
		hours[i], mah[i], causes[i] = r.RuntimeH, r.DeliveredMAh, r.CutoffCause
		return nil
	})
	if err != nil {
		return Stats{}, err
	}
	st := Stats{Samples: samples, Seed: seed, Causes: map[discharge.Cause]int{}}
	for _, c := range causes {
		st.Causes[c]++
	}
	sort.Float64s(hours)
	sort.Float64s(mah)
	q := func(p float64, xs []float64) float64 { return stat.Quantile(p, stat.Empirical, xs, nil) }
	st.P10H, st.P50H, st.P90H = q(0.1, hours), q(0.5, hours), q(0.9, hours)
	st.P10MAh, st.P50MAh, st.P90MAh = q(0.1, mah), q(0.5, mah), q(0.9, mah)
	st.MinH, st.MaxH = hours[0], hours[samples-1]
	st.Hours = hours
	return st, nil
}

// Report is everything the spread command prints for one design.
type Report struct {
	Corner   Corner
	Stats    Stats
	Warnings []string
}

// Analyse gives the corners, the sensitivities, the spread and the cliff
// warnings of d under tols.
func Analyse(d *discharge.Design, tols []Tol, samples int, seed uint64) (*Report, error) {
	if samples < 1 || samples > MaxSamples {
		return nil, fmt.Errorf("samples: %d must be 1 to %d", samples, MaxSamples)
	}
	m, err := newModel(d, tols)
	if err != nil {
		return nil, err
	}
	c, err := m.worst()
	if err != nil {
		return nil, err
	}
	st, err := m.spread(samples, seed)
	if err != nil {
		return nil, err
	}
	ws := m.cliffs(c)
	if n := st.Causes[discharge.CauseLimit] + st.Causes[discharge.CauseFuse]; n > 0 {
		ws = append(ws, fmt.Sprintf("%d of %d samples stop on the protection's current limit or fuse", n, st.Samples))
	}
	if c.Worst.RuntimeH == 0 && c.Nominal.RuntimeH > 0 {
		ws = append(ws, "at the worst corner the product does not start")
	}
	return &Report{Corner: c, Stats: st, Warnings: ws}, nil
}
