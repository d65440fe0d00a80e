package discharge

import (
	"testing"

	"headroom/curves"
	"headroom/protect"
)

func benchDesign(b *testing.B, load string) *Design {
	c, ok := curves.Lookup("lr6")
	if !ok {
		b.Fatal("no lr6")
	}
	el, err := protect.Parse("diode")
	if err != nil {
		b.Fatal(err)
	}
	ph, err := ParseProfile(load)
	if err != nil {
		b.Fatal(err)
	}
	return &Design{Cell: c, Series: 2, Parallel: 1, Protect: el, Profile: ph, Floor: 1.8, TempC: 20, HoursPerDay: 1, Standby: 30e-6}
}

// BenchmarkEvaluateConstant: 2×LR6 behind a series diode, one constant
// current. Goal: median ≤ 10 µs per evaluation (not met: 12.6 µs, 30
// allocations, median of 10 on the shared 2-core machine at load 2–3;
// 17.4 µs before the speed pass; README §Performance).
func BenchmarkEvaluateConstant(b *testing.B) {
	d := benchDesign(b, "120mA")
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Evaluate(d); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkEvaluatePulsed: the same pack on a three-phase toy profile.
// Goal: median ≤ 25 µs per evaluation (met: 19.4 µs, 34 allocations,
// median of 10 at load 2–3; 34.2 µs before the speed pass; README
// §Performance).
func BenchmarkEvaluatePulsed(b *testing.B) {
	d := benchDesign(b, "450mA/3s,120mA/2s,15mA/25s")
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Evaluate(d); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkEvaluatePower: a 0.8 W converter at 85 %, the costliest load law
// (a Newton solve per phase per charge). No goal: 228 µs median of 10
// (224 µs before the speed pass; most of it is the junctions' settling
// and the Newton solves' diode drops).
func BenchmarkEvaluatePower(b *testing.B) {
	d := benchDesign(b, "0.8W@85%")
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Evaluate(d); err != nil {
			b.Fatal(err)
		}
	}
}
