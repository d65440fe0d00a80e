package protect

import (
	"math"
	"testing"
)

// Every element, over a wide grid of currents, input voltages and
// temperatures: Drop and Quiescent are finite and at least 0, Drop is 0 at
// no current and never falls as current rises, and Limit is not NaN. The
// engine relies on all of this (it root-finds on Drop).
func TestElementSweep(t *testing.T) {
	currents := []float64{-1, 0, 1e-9, 1e-6, 1e-3, 0.01, 0.1, 0.5, 1, 3, 10, 100}
	volts := []float64{-3, 0, 0.5, 0.9, 1.9, 3, 4.5, 6, 9, 13.5, 24}
	temps := []float64{-40, 0, 25, 60, 85, 125}
	for _, k := range Kinds() {
		e := Default(k)
		for _, tc := range temps {
			l := e.Limit(tc)
			if math.IsNaN(l.Clamp) || math.IsNaN(l.Trip) || l.Clamp < 0 || l.Trip < 0 {
				t.Errorf("%s at %g °C: limit %+v", k, tc, l)
			}
			for _, v := range volts {
				q := e.Quiescent(v, tc)
				if !finite(q) || q < 0 {
					t.Errorf("%s: Quiescent(%g V, %g °C) = %g", k, v, tc, q)
				}
				prev := 0.0
				for _, i := range currents {
					d := e.Drop(i, v, tc)
					if !finite(d) || d < 0 {
						t.Errorf("%s: Drop(%g A, %g V, %g °C) = %g", k, i, v, tc, d)
					}
					if i <= 0 && d != 0 {
						t.Errorf("%s: Drop(%g A) = %g, want 0", k, i, d)
					}
					if d < prev {
						t.Errorf("%s at %g V %g °C: drop falls from %g to %g V at %g A", k, v, tc, prev, d, i)
					}
					prev = d
				}
			}
		}
	}
}

// The engine calls Drop many thousands of times per scenario: it must not
// allocate.
func TestDropDoesNotAllocate(t *testing.T) {
	for _, k := range Kinds() {
		e := Default(k)
		n := testing.AllocsPerRun(100, func() { _ = e.Drop(0.3, 2.7, 25) + e.Quiescent(2.7, 25) })
		if n != 0 {
			t.Errorf("%s: %g allocations per Drop", k, n)
		}
	}
}

var sink float64

func BenchmarkDrop(b *testing.B) {
	for _, k := range Kinds() {
		e := Default(k)
		b.Run(k, func(b *testing.B) {
			i, s := 0.0, 0.0
			for b.Loop() {
				i += 1e-4
				if i > 1 {
					i = 1e-4
				}
				s += e.Drop(i, 2.7, 25)
			}
			sink = s
		})
	}
}
