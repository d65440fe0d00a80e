package curves

import (
	"container/heap"
	"math"
)

// Long curves are thinned on load. The engine walks a curve breakpoint by
// breakpoint, so its time grows with the points: a 1 MB file of 52,955
// points took 11 s a run. A discharge curve needs a few dozen points; a
// thinned curve keeps at most MaxCurvePoints, chosen so the dropped points
// lie as close as the budget allows to the straight lines between the kept
// ones, and within ThinTolerance volts where that budget allows it (the
// largest error is stated in Cell.Thinned).
const (
	// MaxCurvePoints is the most points a cell's curve and resistance
	// table keep together after loading.
	MaxCurvePoints = 200
	// ThinTolerance is the voltage error, in volts, a thinned curve aims
	// to stay within: 1 mV, below what a logger resolves on a cell.
	ThinTolerance = 0.001
)

// Thinning says that a curve was thinned on load: from how many points,
// and the largest voltage difference, in volts, between a dropped point
// and the thinned curve.
type Thinning struct {
	From int
	ErrV float64
}

// thin picks at most max(2, limit) of the points (x strictly increasing),
// always the first and the last, greedily splitting the span whose
// dropped points lie farthest (in y) from its chord, until every dropped
// point is within tol or the budget is spent. It returns the indices kept,
// in order, and the largest error left. Work is O(n·limit).
func thin(x, y []float64, tol float64, limit int) ([]int, float64) {
	n := len(x)
	if n <= 2 {
		idx := make([]int, n)
		for i := range idx {
			idx[i] = i
		}
		return idx, 0
	}
	limit = max(limit, 2)
	keep := make([]bool, n)
	keep[0], keep[n-1] = true, true
	kept := 2
	h := &spanHeap{}
	push := func(a, b int) {
		if b-a < 2 {
			return
		}
		k, e := worst(x, y, a, b)
		heap.Push(h, span{a, b, k, e})
	}
	push(0, n-1)
	for h.Len() > 0 && kept < limit {
		s := (*h)[0]
		if s.err <= tol {
			break
		}
		heap.Pop(h)
		keep[s.k] = true
		kept++
		push(s.a, s.k)
		push(s.k, s.b)
	}
	errMax := 0.0
	for _, s := range *h {
		errMax = math.Max(errMax, s.err)
	}
	idx := make([]int, 0, kept)
	for i, k := range keep {
		if k {
			idx = append(idx, i)
		}
	}
	return idx, errMax
}

// worst finds the point strictly between a and b farthest in y from the
// chord from a to b, and that distance.
func worst(x, y []float64, a, b int) (int, float64) {
	k, e := a+1, -1.0
	slope := (y[b] - y[a]) / (x[b] - x[a])
	for i := a + 1; i < b; i++ {
		d := math.Abs(y[i] - (y[a] + slope*(x[i]-x[a])))
		if d > e {
			k, e = i, d
		}
	}
	return k, e
}

type span struct {
	a, b, k int
	err     float64
}

// spanHeap is a max-heap of spans by error.
type spanHeap []span

func (h spanHeap) Len() int           { return len(h) }
func (h spanHeap) Less(i, j int) bool { return h[i].err > h[j].err }
func (h spanHeap) Swap(i, j int)      { h[i], h[j] = h[j], h[i] }
func (h *spanHeap) Push(v any)        { *h = append(*h, v.(span)) }
func (h *spanHeap) Pop() any {
	old := *h
	v := old[len(old)-1]
	*h = old[:len(old)-1]
	return v
}

// pick returns xs at the indices idx.
func pick(xs []float64, idx []int) []float64 {
	out := make([]float64, len(idx))
	for i, j := range idx {
		out[i] = xs[j]
	}
	return out
}

// thinCell thins c's curve and resistance table when together they hold
// more than MaxCurvePoints points (the curve always, with force, as for an
// imported log), and records it in c.Thinned. With a resistance table each
// gets half the budget, so the CSV WriteCSV makes of the cell (the union of
// both tables' points) stays within MaxCurvePoints and reads back as it was
// written. The curve stays valid: a subset of strictly increasing charges
// and non-rising voltages keeps both properties.
func thinCell(c *Cell, force bool) {
	n, nr := c.Curve.Len(), len(c.Resistance)
	if n+nr <= MaxCurvePoints && !force {
		return
	}
	budget := MaxCurvePoints
	if nr > 0 {
		budget = MaxCurvePoints / 2
	}
	if n > budget || (force && n > 2) {
		idx, e := thin(c.Curve.q, c.Curve.v, ThinTolerance, budget)
		if len(idx) < n {
			c.Curve = &Curve{q: pick(c.Curve.q, idx), v: pick(c.Curve.v, idx)}
			c.Thinned = &Thinning{From: n, ErrV: e}
		}
	}
	if nr > MaxCurvePoints/2 {
		d := make([]float64, nr)
		r := make([]float64, nr)
		for i, p := range c.Resistance {
			d[i], r[i] = p.Depth, p.Ohm
		}
		// Resistance to within 1 mΩ where the budget allows.
		idx, _ := thin(d, r, 0.001, MaxCurvePoints/2)
		out := make([]ResistancePoint, len(idx))
		for i, j := range idx {
			out[i] = c.Resistance[j]
		}
		c.Resistance = out
	}
}
