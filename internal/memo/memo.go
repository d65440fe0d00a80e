// Package memo keeps results by their inputs for work a sweep repeats (the
// cells' polarisation factors, a thermal network's exponentials, a still
// junction's settle): a bounded, goroutine-safe table looked up by a hash
// of the inputs' bits, whose entries are used only when every input is
// equal, so that no collision can change a result. It is a leaf: it
// imports nothing of headroom.
package memo

import (
	"math"
	"slices"
	"sync"
)

// Key is a table's inputs: Same reports whether two are equal, bit for
// bit where they hold numbers.
type Key[K any] interface{ Same(K) bool }

// Table holds at most max entries, then starts afresh: a sweep uses a
// few, a fuzzer many.
type Table[K Key[K], V any] struct {
	mu  sync.RWMutex
	m   map[uint64][]entry[K, V]
	n   int
	max int
}

type entry[K Key[K], V any] struct {
	k K
	v V
}

// New is an empty table of at most max entries.
func New[K Key[K], V any](max int) *Table[K, V] {
	return &Table[K, V]{m: map[uint64][]entry[K, V]{}, max: max}
}

// Find returns the value kept for k under hash h, and whether there is one.
func (t *Table[K, V]) Find(h uint64, k K) (V, bool) {
	t.mu.RLock()
	defer t.mu.RUnlock()
	for _, en := range t.m[h] {
		if en.k.Same(k) {
			return en.v, true
		}
	}
	var zero V
	return zero, false
}

// Keep stores v for k under hash h. k must not share memory its caller
// will change (clone its slices first).
func (t *Table[K, V]) Keep(h uint64, k K, v V) {
	t.mu.Lock()
	defer t.mu.Unlock()
	if t.n >= t.max {
		clear(t.m)
		t.n = 0
	}
	t.m[h] = append(t.m[h], entry[K, V]{k, v})
	t.n++
}

// Hash is FNV-1a over float64 bits: start from Start, add with Float.
type Hash uint64

// Start is the empty hash.
func Start() Hash { return 14695981039346656037 }

// Float adds f's bits.
func (x Hash) Float(f float64) Hash { return (x ^ Hash(math.Float64bits(f))) * 1099511628211 }

// Floats adds each of fs (its length first).
func (x Hash) Floats(fs []float64) Hash {
	x = x.Float(float64(len(fs)))
	for _, f := range fs {
		x = x.Float(f)
	}
	return x
}

// SameBits is equality that also holds for two NaNs of the same bits, so a
// NaN input still finds its own entry.
func SameBits(a, b float64) bool { return math.Float64bits(a) == math.Float64bits(b) }

// SameFloats is SameBits over two slices.
func SameFloats(a, b []float64) bool { return slices.EqualFunc(a, b, SameBits) }

// Len is the number of entries kept.
func (t *Table[K, V]) Len() int {
	t.mu.RLock()
	defer t.mu.RUnlock()
	return t.n
}

// Clear empties the table.
func (t *Table[K, V]) Clear() {
	t.mu.Lock()
	defer t.mu.Unlock()
	clear(t.m)
	t.n = 0
}
