package tolerance

import "testing"

// BenchmarkSpread2000: 2,000 Latin-hypercube samples of the demo (pulsed
// profile, series diode) with the default tolerances, on every core. Goal
// at most 100 ms on this 2-core machine.
func BenchmarkSpread2000(b *testing.B) {
	d := demo(b, "diode")
	tols := Defaults()
	for b.Loop() {
		if _, err := Spread(d, tols, 2000, 1); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkWorstCorner: both corners and every sensitivity of the demo
// (pulsed profile, series diode). Goal: at most 1 ms.
func BenchmarkWorstCorner(b *testing.B) {
	d := demo(b, "diode")
	tols := Defaults()
	for b.Loop() {
		if _, err := Worst(d, tols); err != nil {
			b.Fatal(err)
		}
	}
}
