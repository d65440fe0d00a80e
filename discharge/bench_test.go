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
// current. Goal: median ≤ 10 µs per evaluation (README §Performance has
// the medians on a quiet machine). History: 17.4 µs before the first
// speed pass, 12.2 µs with the junctions settled at every charge, the
// cells' self-heating and the shared memos (51 node solves, 23
// allocations). Then the stranded split's run without the floor resuming
// at the bare cells' cut-off (51 → 43 node solves), secant steps in the
// narrowing (→ 41), the margins' lower bound in the scan (surely.go,
// → 29) and the evaluator's arrays kept across evaluations (23 → 6
// allocations): 11.1 → 8.4 µs, medians of 10 interleaved runs on the
// quiet machine (×0.77) — the goal is met.
func BenchmarkEvaluateConstant(b *testing.B) {
	d := benchDesign(b, "120mA")
	benchEvaluate(b, d)
}

// BenchmarkEvaluatePulsed: the same pack on a three-phase toy profile.
// Goal: median ≤ 25 µs per evaluation (met; README §Performance). 34.2
// µs before the first speed pass, about 16 µs with the shared memos (49
// node solves, 23 allocations); the changes listed under
// BenchmarkEvaluateConstant make it 28 node solves and 6 allocations:
// 18.3 → 12.4 µs in the same interleaved runs (×0.68).
func BenchmarkEvaluatePulsed(b *testing.B) {
	d := benchDesign(b, "450mA/3s,120mA/2s,15mA/25s")
	benchEvaluate(b, d)
}

// BenchmarkEvaluatePower: a 0.8 W converter at 85 %, the costliest load law
// (a Newton solve per phase per charge). No goal met yet (1 ms wanted):
// about 7.2 ms median of 10 and 1,348 allocations once the junctions settle
// at every charge and the cells heat (224 µs before the speed pass), and
// about 3.4 ms and 818 allocations with the exact shortcuts of newtonPower
// and scanMisses and junctions' trial solves unfixed (README §Performance;
// 4.07 → 3.41 ms against main with the speed pass, 15 interleaved runs). Most of it is the cut-off searches bisecting (heat.go, byWork; the
// stranded split's run without the floor towards the load's collapse),
// about 40 steps each, every step a junction settle from ambient, and the
// charges near the collapse taking the node's 40 damped electro-thermal
// passes (cellheat.go). The memos shared across evaluations change it
// little: 4.23 → 4.14 ms (×0.98), 862 → 858 allocations, medians of 10
// interleaved runs of 40 evaluations against main.
//
// Cheaper solves inside the settles, the same settles (their number and
// their steps unchanged): the junction's law worked out once per solve
// (protect.Forward, the same drops to the bit) and Newton's slope from
// it instead of a second solve of the law (its result the same to the
// step's 1e-13; TestNewtonSlopeMatchesDifference). 470 → 441 node
// solves (the cut-off searches' steps land a few ulps apart), 846 → 788
// allocations; against main (with the cut-off search's secant steps and
// margin bound) in interleaved runs of 40 evaluations on the busy
// machine (load 2–8): medians 4.47 → 2.74 ms (×0.61, 8 pairs), and
// ×0.62–0.70 in three earlier sets of 8–10 pairs. On the quiet machine,
// against the tree before this session's work: 4.17 → 2.53 ms (×0.61,
// medians of 8 interleaved runs of 100 evaluations).
func BenchmarkEvaluatePower(b *testing.B) {
	d := benchDesign(b, "0.8W@85%")
	benchEvaluate(b, d)
}

// benchEvaluate evaluates d as Evaluate does, reporting the node solves
// an evaluation makes (nodes/op) beside the time and the allocations:
// the work, which a busy machine does not move.
func benchEvaluate(b *testing.B, d *Design) {
	b.ReportAllocs()
	nodes := 0
	for b.Loop() {
		_, e, err := evaluateWith(d, gaussX, gaussW, false)
		if err != nil {
			b.Fatal(err)
		}
		nodes += e.nodes
		evaluators.Put(e)
	}
	b.ReportMetric(float64(nodes)/float64(b.N), "nodes/op")
}
