package pick

import (
	"fmt"
	"math"
	"runtime"
	"sort"
	"sync"
	"sync/atomic"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/scenario"
	"headroom/protect"
)

// Constraint names one requirement a design can fail.
type Constraint string

const (
	Runtime  Constraint = "runtime"  // runtime at the statistic below the target
	Budget   Constraint = "budget"   // unit cost above the budget
	Cells    Constraint = "cells"    // more cells than allowed
	Stranded Constraint = "stranded" // stranded share above the limit
	Junction Constraint = "junction" // element junction above the limit
	Reverse  Constraint = "reverse"  // a reversed pack not blocked, or a flipped cell reversing the load
	Input    Constraint = "input"    // fresh pack above the product's maximum input
)

// Candidate is one point of the space: a pack and an element.
type Candidate struct {
	Cell     *curves.Cell
	Series   int
	Parallel int
	Element  protect.Element
	Spec     string  // protect.Short of Element: what run --protect takes
	UnitCost float64 // cells plus element, dollars
	FreshV   float64 // fresh open-circuit pack voltage at the ambient

	packPrice float64 // the price Evaluate uses for the pack
	pack      int     // index of the pack, for its runtime bound
	order     int     // position in the space, for stable ties
}

// Miss is one constraint a design fails.
type Miss struct {
	Constraint Constraint
	Gap        float64 // how far off, as a fraction of the limit (0.1: 10 % short or over)
	Detail     string  // in words: "runtime 18.2 h, below the 20 h target"
}

// Design is an evaluated candidate.
type Design struct {
	Candidate
	Result  *discharge.Result
	Reverse protect.Reversal
	Misses  []Miss // empty when the design meets every constraint
}

// StrandedShare is the stranded charge over the reference charge, 0 to 1.
func (d *Design) StrandedShare() float64 { return strandedShare(d.Result) }

func strandedShare(r *discharge.Result) float64 {
	if r.ReferenceMAh <= 0 {
		return 0
	}
	return r.StrandedMAh / r.ReferenceMAh
}

// Passes reports whether the design meets every constraint.
func (d *Design) Passes() bool { return len(d.Misses) == 0 }

// Outcome is what a search found.
type Outcome struct {
	Limits   Limits
	MaxInput float64 // the input limit used, volts
	// Designs are the passing designs, ranked, at most Limits.Top.
	Designs []Design
	// Front is the Pareto front of unit cost against runtime among the
	// designs that run at all and meet every constraint but the runtime
	// target, cheapest
	// first: none on it is both dearer and shorter-running than another.
	Front []Design
	// NearMisses are designs that fail exactly one constraint, by a
	// quarter or less, and are cheaper than the first passing design (any
	// cost when none passes), closest first; at most five.
	NearMisses []Design
	// Others are every evaluated design that runs at all and meets every
	// constraint but the runtime target (the front's population), for
	// charts.
	Others []Design
	// Longest is the longest-running design meeting every constraint but
	// the target; nil when none does.
	Longest *Design

	Space     int                // candidates in the space
	Screened  map[Constraint]int // candidates refused before evaluation, by the first constraint they fail
	NoStart   int                // series counts left out because the fresh pack is not above the floor
	Evaluated int                // designs evaluated at the statistic
	Nominal   int                // nominal evaluations made only for runtime bounds
	Pruned    int                // candidates skipped because they could not win
	Errors    int                // candidates the engine refused (a design that never runs the pack down)
	Passing   int                // passing designs among those evaluated
}

// nearGap is the largest miss, as a fraction of its limit, that counts as
// near.
const nearGap = 0.25

// boundSlack widens the no-element runtime bound against the engine's
// solver tolerance, so rounding never prunes a design that could win.
const boundSlack = 1e-4

// Search runs the search. progress, when not nil, is called from the
// calling goroutine with the candidates done so far and the total.
func Search(sp *Space, lim Limits, st Statistic, progress func(done, total int)) (*Outcome, error) {
	if err := lim.check(&sp.Base); err != nil {
		return nil, err
	}
	top := lim.Top
	if top == 0 {
		top = DefaultTop
	}
	out := &Outcome{Limits: lim, Screened: map[Constraint]int{}}
	out.MaxInput = MaxInput(&sp.Base, lim)
	cands, over := out.candidates(sp, lim)

	// Packs and their runtime bound: the same pack with no element.
	packs := map[int]*discharge.Design{}
	for _, c := range append(append([]Candidate(nil), cands...), over...) {
		if _, ok := packs[c.pack]; !ok {
			d := sp.design(c.With(protect.None{}))
			packs[c.pack] = d
		}
	}
	bounds := map[int]float64{}
	bare := map[int]*discharge.Result{}
	if st.Capped() && boundable(sp.Base.Profile) {
		keys := make([]int, 0, len(packs))
		for k := range packs {
			keys = append(keys, k)
		}
		sort.Ints(keys)
		res := make([]*discharge.Result, len(keys))
		parallelFor(len(keys), func(i int) {
			r, err := discharge.Evaluate(packs[keys[i]])
			if err == nil {
				res[i] = r
			}
		})
		out.Nominal += len(keys)
		for i, k := range keys {
			if res[i] != nil {
				bounds[k] = res[i].RuntimeH*(1+boundSlack) + 1e-9
				if st.Name() == "nominal" {
					bare[k] = res[i]
				}
			} else {
				bounds[k] = math.Inf(1)
			}
		}
	}
	bound := func(c *Candidate) float64 {
		if b, ok := bounds[c.pack]; ok {
			return b
		}
		return math.Inf(1)
	}

	sort.SliceStable(cands, func(i, j int) bool { return less(&cands[i], &cands[j]) })

	// Search state, updated in cost order after each chunk.
	var (
		keys       []float64 // ranking keys of the best passing designs, sorted, at most top
		maxBelow   = math.Inf(-1)
		groupCost  = math.Inf(-1)
		maxGroup   = math.Inf(-1)
		cheapPass  = math.Inf(1)
		passing    []Design
		singleMiss []Design
	)
	maxCheaper := func(cost float64) float64 {
		if cost > groupCost {
			return math.Max(maxBelow, maxGroup)
		}
		return maxBelow
	}
	needed := func(c *Candidate, b float64) bool {
		if b > maxCheaper(c.UnitCost) { // could be on the front
			return true
		}
		if b >= lim.Need { // could pass: is there room in the list?
			if len(keys) < top || lowKey(c, b, lim.By) <= keys[top-1] {
				return true
			}
		}
		// Could be a near miss.
		return b >= (1-nearGap)*lim.Need && c.UnitCost < cheapPass
	}

	workers := runtime.GOMAXPROCS(0)
	chunk := 32 * workers
	results := make([]*Design, chunk)
	for start := 0; start < len(cands); start += chunk {
		end := min(start+chunk, len(cands))
		todo := make([]int, 0, end-start)
		for i := start; i < end; i++ {
			if needed(&cands[i], bound(&cands[i])) {
				todo = append(todo, i)
			} else {
				out.Pruned++
			}
		}
		if st.Name() != "nominal" && st.Capped() {
			// A dearer statistic: the design's own nominal runtime is a
			// tighter bound, at one engine evaluation.
			own := make([]float64, len(todo))
			parallelFor(len(todo), func(k int) {
				own[k] = math.Inf(1)
				if r, err := discharge.Evaluate(sp.design(cands[todo[k]])); err == nil {
					own[k] = r.RuntimeH*(1+boundSlack) + 1e-9
				}
			})
			out.Nominal += len(todo)
			kept := todo[:0]
			for k, i := range todo {
				if needed(&cands[i], own[k]) {
					kept = append(kept, i)
				} else {
					out.Pruned++
				}
			}
			todo = kept
		}
		clear(results)
		parallelFor(len(todo), func(k int) {
			i := todo[k]
			c := &cands[i]
			var r *discharge.Result
			if c.Element.Kind() == "none" && bare[c.pack] != nil {
				r = bare[c.pack]
			} else {
				var err error
				if r, err = st.Evaluate(sp.design(*c)); err != nil {
					return
				}
			}
			results[i-start] = sp.judge(c, r, lim)
		})
		for _, i := range todo {
			c := &cands[i]
			if !(c.Element.Kind() == "none" && bare[c.pack] != nil) {
				out.Evaluated++
			}
			d := results[i-start]
			if d == nil {
				out.Errors++
				continue
			}
			if c.UnitCost > groupCost {
				maxBelow = math.Max(maxBelow, maxGroup)
				groupCost, maxGroup = c.UnitCost, math.Inf(-1)
			}
			if onlyRuntime(d) && d.Result.RuntimeH > 0 {
				maxGroup = math.Max(maxGroup, d.Result.RuntimeH)
				out.Others = append(out.Others, *d)
			}
			switch {
			case d.Passes():
				passing = append(passing, *d)
				out.Passing++
				cheapPass = math.Min(cheapPass, c.UnitCost)
				k := key(d, lim.By)
				at := sort.SearchFloat64s(keys, k)
				keys = append(keys, 0)
				copy(keys[at+1:], keys[at:])
				keys[at] = k
				if len(keys) > top {
					keys = keys[:top]
				}
			case len(d.Misses) == 1 && d.Misses[0].Gap <= nearGap:
				singleMiss = append(singleMiss, *d)
			}
		}
		if progress != nil {
			progress(end, len(cands))
		}
	}

	// Over budget: only worth a look as a near miss when nothing passes.
	if len(passing) == 0 && len(over) > 0 {
		var todo []int
		for i := range over {
			if bound(&over[i]) >= lim.Need {
				todo = append(todo, i)
			}
		}
		res := make([]*Design, len(todo))
		parallelFor(len(todo), func(k int) {
			c := &over[todo[k]]
			r, err := st.Evaluate(sp.design(*c))
			if err == nil {
				res[k] = sp.judge(c, r, lim)
			}
		})
		out.Evaluated += len(todo)
		for _, d := range res {
			if d != nil && len(d.Misses) == 1 && d.Misses[0].Constraint == Budget {
				singleMiss = append(singleMiss, *d)
			}
		}
	}

	sort.SliceStable(passing, func(i, j int) bool {
		a, b := &passing[i], &passing[j]
		if ka, kb := key(a, lim.By), key(b, lim.By); ka != kb {
			return ka < kb
		}
		return tie(a, b)
	})
	out.Designs = passing[:min(top, len(passing))]
	out.Front = Front(out.Others)
	if n := len(out.Front); n > 0 {
		l := out.Front[n-1]
		out.Longest = &l
	}
	var near []Design
	for _, d := range singleMiss {
		if d.UnitCost < cheapPass || len(passing) == 0 {
			near = append(near, d)
		}
	}
	sort.SliceStable(near, func(i, j int) bool {
		if near[i].Misses[0].Gap != near[j].Misses[0].Gap {
			return near[i].Misses[0].Gap < near[j].Misses[0].Gap
		}
		return less(&near[i].Candidate, &near[j].Candidate)
	})
	out.NearMisses = near[:min(5, len(near))]
	return out, nil
}

// With returns c with element e (and its cost) instead.
func (c Candidate) With(e protect.Element) Candidate {
	c.UnitCost += e.Cost() - c.Element.Cost()
	c.Element, c.Spec = e, protect.Short(e)
	return c
}

// less orders candidates by unit cost, then by their place in the space.
func less(a, b *Candidate) bool {
	if a.UnitCost != b.UnitCost {
		return a.UnitCost < b.UnitCost
	}
	return a.order < b.order
}

// tie orders designs of equal ranking key: longer runtime, then cheaper,
// then the space's order.
func tie(a, b *Design) bool {
	if a.Result.RuntimeH != b.Result.RuntimeH {
		return a.Result.RuntimeH > b.Result.RuntimeH
	}
	return less(&a.Candidate, &b.Candidate)
}

// key is a passing design's ranking key.
func key(d *Design, by Order) float64 {
	if by == ByCostPerHour {
		return d.Result.CostPerHour
	}
	return d.UnitCost
}

// lowKey is the lowest ranking key candidate c could have with a runtime
// of at most b hours. Cost per hour is at least the pack's price over its
// cycle life (1 for a primary cell) per hour of runtime.
func lowKey(c *Candidate, b float64, by Order) float64 {
	if by != ByCostPerHour {
		return c.UnitCost
	}
	if math.IsInf(b, 1) {
		return 0
	}
	life := 1.0
	if c.Cell.Rechargeable && c.Cell.CycleLife > 0 {
		life = float64(c.Cell.CycleLife)
	}
	return c.packPrice / life / b
}

// onlyRuntime reports whether d meets every constraint but perhaps the
// runtime target.
func onlyRuntime(d *Design) bool {
	for _, m := range d.Misses {
		if m.Constraint != Runtime {
			return false
		}
	}
	return true
}

// boundable reports whether every phase draws no less current at a lower
// voltage, so that an element can only shorten the run.
func boundable(p []discharge.Phase) bool {
	for _, ph := range p {
		if ph.Load.Kind != discharge.ConstantCurrent && ph.Load.Kind != discharge.ConstantPower {
			return false
		}
	}
	return true
}

// design builds the engine's design for candidate c.
func (sp *Space) design(c Candidate) *discharge.Design {
	d := sp.Base
	d.Cell, d.Series, d.Parallel, d.Protect = c.Cell, c.Series, c.Parallel, c.Element
	d.PackPrice = 0
	if c.Cell == sp.Base.Cell && c.Series == sp.Base.Series && c.Parallel == sp.Base.Parallel {
		d.PackPrice = sp.Base.PackPrice
	}
	return &d
}

// Design returns the engine's design for candidate c, as the search
// evaluates it.
func (sp *Space) Design(c Candidate) *discharge.Design { return sp.design(c) }

// MaxInput is the input limit a search uses: the limit given, or
// scenario.FreshLimit times the design's own fresh pack voltage.
func MaxInput(base *discharge.Design, lim Limits) float64 {
	if lim.MaxInput > 0 {
		return lim.MaxInput
	}
	return scenario.FreshLimit * float64(base.Series) * base.Cell.OpenCircuit(0, base.TempC)
}

// candidates lists the space's candidates that pass every check made
// before evaluation, and those that fail only the budget by a quarter or
// less (near misses, evaluated when nothing else passes).
func (out *Outcome) candidates(sp *Space, lim Limits) (cands, over []Candidate) {
	maxPar := lim.MaxParallel
	if maxPar == 0 {
		maxPar = DefaultMaxParallel
	}
	par := sp.Parallel
	if par == nil {
		for p := 1; p <= maxPar; p++ {
			par = append(par, p)
		}
	}
	// Each element's short spec, once: it is the same in every pack, and
	// working it out (a parse back of the spec) cost a fifth of a search.
	specs := make([]string, len(sp.Elements))
	for i, e := range sp.Elements {
		specs[i] = protect.Short(e)
	}
	order, pack := 0, 0
	for _, cell := range sp.Cells {
		ocv := cell.OpenCircuit(0, sp.Base.TempC)
		series := sp.Series
		if series == nil {
			for s := 1; s <= 48 && float64(s)*ocv <= out.MaxInput; s++ {
				series = append(series, s)
			}
		}
		for _, s := range series {
			fresh := float64(s) * ocv
			if fresh <= sp.Base.Floor {
				out.NoStart++ // a series count that cannot start
				continue
			}
			for _, p := range par {
				pack++
				c0 := Candidate{Cell: cell, Series: s, Parallel: p, FreshV: fresh, pack: pack}
				c0.packPrice = cell.Price * float64(s*p)
				if d := sp.design(c0); d.PackPrice > 0 {
					c0.packPrice = d.PackPrice
				}
				rp := discharge.ReversePack(sp.design(c0))
				for i, e := range sp.Elements {
					order++
					c := c0
					c.Element, c.Spec, c.order = e, specs[i], order
					c.UnitCost = c.packPrice + e.Cost()
					out.Space++
					switch {
					case fresh > out.MaxInput:
						out.Screened[Input]++
					case lim.MaxCells > 0 && s*p > lim.MaxCells:
						out.Screened[Cells]++
					case !reverseOK(e.Reverse(rp), lim):
						out.Screened[Reverse]++
					case lim.Budget > 0 && c.UnitCost > lim.Budget:
						out.Screened[Budget]++
						if c.UnitCost <= (1+nearGap)*lim.Budget {
							over = append(over, c)
						}
					default:
						cands = append(cands, c)
					}
				}
			}
		}
	}
	return cands, over
}

// reverseOK: a reversed pack must be blocked when asked; a flipped cell
// must never put a reversed voltage on the load.
func reverseOK(r protect.Reversal, lim Limits) bool {
	if lim.BlockReversed && r.WholePack.Outcome != protect.Blocked {
		return false
	}
	return r.OneCell.Volts >= 0
}

// judge checks an evaluated candidate against every constraint.
func (sp *Space) judge(c *Candidate, r *discharge.Result, lim Limits) *Design {
	d := &Design{Candidate: *c, Result: r, Reverse: c.Element.Reverse(discharge.ReversePack(sp.design(*c)))}
	if r.RuntimeH < lim.Need {
		d.Misses = append(d.Misses, Miss{Runtime, (lim.Need - r.RuntimeH) / lim.Need,
			fmt.Sprintf("runs %.3g h, below the %.3g h target", r.RuntimeH, lim.Need)})
	}
	if lim.Budget > 0 && c.UnitCost > lim.Budget {
		d.Misses = append(d.Misses, Miss{Budget, (c.UnitCost - lim.Budget) / lim.Budget,
			fmt.Sprintf("costs $%.2f, above the $%.2f budget", c.UnitCost, lim.Budget)})
	}
	if s := strandedShare(r); s > lim.MaxStranded {
		d.Misses = append(d.Misses, Miss{Stranded, (s - lim.MaxStranded) / math.Max(lim.MaxStranded, 0.01),
			fmt.Sprintf("strands %.1f %%, above the %.3g %% limit", 100*s, 100*lim.MaxStranded)})
	}
	if r.JunctionC > lim.MaxJunction {
		d.Misses = append(d.Misses, Miss{Junction, (r.JunctionC - lim.MaxJunction) / math.Max(math.Abs(lim.MaxJunction), 1),
			junctionMiss(r.JunctionC, lim.MaxJunction, r.JunctionRunaway)})
	}
	return d
}

// check refuses limits that contradict each other or the product.
func (l Limits) check(base *discharge.Design) error {
	switch {
	case !(l.Need > 0):
		return fmt.Errorf("need: no runtime target: give one, e.g. --need 20h")
	case l.MaxInput > 0 && l.MaxInput <= base.Floor:
		return fmt.Errorf("max_input: %.3g V is not above the floor %.3g V: no pack can start", l.MaxInput, base.Floor)
	case l.MaxJunction <= base.TempC:
		return fmt.Errorf("max_junction: %.3g °C is not above the ambient %.3g °C: no part runs that cool", l.MaxJunction, base.TempC)
	case l.MaxCells > 0 && l.MaxParallel > l.MaxCells:
		return fmt.Errorf("max_parallel: %d strings cannot fit in at most %d cells", l.MaxParallel, l.MaxCells)
	}
	return nil
}

// parallelFor runs f(0..n-1) on every core.
func parallelFor(n int, f func(i int)) {
	workers := min(runtime.GOMAXPROCS(0), n)
	var next atomic.Int64
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				i := int(next.Add(1)) - 1
				if i >= n {
					return
				}
				f(i)
			}
		}()
	}
	wg.Wait()
}

// junctionMiss words a junction over the limit: a runaway has no settled
// temperature, and the solve's last step is not one to quote as if held.
func junctionMiss(tj, max float64, runaway bool) string {
	if runaway {
		return fmt.Sprintf("junction runs away (no settled temperature below the %.0f °C limit)", max)
	}
	return fmt.Sprintf("junction reaches %.0f °C, above the %.0f °C limit", tj, max)
}
