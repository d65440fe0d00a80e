package discharge

import (
	"slices"
	"sync"

	"headroom/curves"
)

// cellBreaks is breakpointsTo shared across evaluations: a sweep
// evaluates the same cell thousands of times, and its corners depend on
// its curve's charges and its resistance table's depths alone. Entries
// are found by the cell's pointer and used only when those inputs are
// still equal to the bit (a cell rebuilt or edited in place is worked out
// afresh, never given a stale answer); the result is copied into buf, so
// no evaluation writes into a shared array.
func cellBreaks(buf []float64, c *curves.Cell) []float64 {
	breakMemo.mu.RLock()
	m, ok := breakMemo.m[c]
	breakMemo.mu.RUnlock()
	if ok && m.same(c) {
		return append(buf[:0], m.out...)
	}
	out := breakpointsTo(buf, c)
	m = &breakInputs{out: slices.Clone(out), q: make([]float64, c.Curve.Len()), depth: make([]float64, len(c.Resistance))}
	for i := range m.q {
		m.q[i], _ = c.Curve.Point(i)
	}
	for i, r := range c.Resistance {
		m.depth[i] = r.Depth
	}
	breakMemo.mu.Lock()
	if len(breakMemo.m) >= breakCacheMax {
		clear(breakMemo.m)
	}
	breakMemo.m[c] = m
	breakMemo.mu.Unlock()
	return out
}

// breakInputs is what one cell's corners were worked out from, and them.
type breakInputs struct {
	q, depth, out []float64
}

// same reports whether c still has the charges and depths m was made from.
func (m *breakInputs) same(c *curves.Cell) bool {
	if c.Curve.Len() != len(m.q) || len(c.Resistance) != len(m.depth) {
		return false
	}
	for i, q := range m.q {
		if x, _ := c.Curve.Point(i); !sameBits(x, q) {
			return false
		}
	}
	for i, r := range c.Resistance {
		if !sameBits(r.Depth, m.depth[i]) {
			return false
		}
	}
	return true
}

const breakCacheMax = 256

var breakMemo = struct {
	mu sync.RWMutex
	m  map[*curves.Cell]*breakInputs
}{m: map[*curves.Cell]*breakInputs{}}
