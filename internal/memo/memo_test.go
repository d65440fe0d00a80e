package memo

import (
	"math"
	"sync"
	"testing"
)

type k2 struct{ a, b float64 }

func (x k2) Same(o k2) bool { return SameBits(x.a, o.a) && SameBits(x.b, o.b) }

// Entries under one hash are told apart by their inputs (a collision never
// returns another's value), a NaN input finds its own entry, and past max
// entries the table starts afresh.
func TestTable(t *testing.T) {
	tb := New[k2, string](3)
	tb.Keep(7, k2{1, 2}, "one-two")
	tb.Keep(7, k2{2, 1}, "two-one") // the same hash: a forced collision
	if v, ok := tb.Find(7, k2{2, 1}); !ok || v != "two-one" {
		t.Errorf("collision: got %q, %v", v, ok)
	}
	if _, ok := tb.Find(7, k2{1, 3}); ok {
		t.Error("found a key never kept")
	}
	nan := k2{math.NaN(), 0}
	tb.Keep(9, nan, "nan")
	if v, ok := tb.Find(9, nan); !ok || v != "nan" {
		t.Errorf("NaN key: got %q, %v", v, ok)
	}
	tb.Keep(11, k2{5, 5}, "fourth") // past 3: afresh, then kept
	if tb.Len() != 1 {
		t.Errorf("after the bound: %d entries, want 1", tb.Len())
	}
	if _, ok := tb.Find(7, k2{1, 2}); ok {
		t.Error("an entry survived the table starting afresh")
	}
}

// The hash of equal inputs is equal, and the order of the floats counts.
func TestHash(t *testing.T) {
	a := Start().Float(1).Floats([]float64{2, 3})
	if a != Start().Float(1).Floats([]float64{2, 3}) {
		t.Error("equal inputs hash apart")
	}
	if a == Start().Float(1).Floats([]float64{3, 2}) {
		t.Error("reordered floats hash alike")
	}
}

// Readers and writers at once (run with -race).
func TestTableConcurrent(t *testing.T) {
	tb := New[k2, float64](64)
	var wg sync.WaitGroup
	for g := range 4 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range 500 {
				k := k2{float64(i % 50), float64(g)}
				if v, ok := tb.Find(uint64(i%50), k); ok && v != k.a+k.b {
					t.Errorf("got %v for %v", v, k)
					return
				}
				tb.Keep(uint64(i%50), k, k.a+k.b)
			}
		}()
	}
	wg.Wait()
}
