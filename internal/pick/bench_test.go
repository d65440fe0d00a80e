package pick

import (
	"testing"

	"headroom/internal/scenario"
)

// BenchmarkPickDemo runs the demo product's search at a 20 h target: as
// the demo file narrows it (its [options] and its $1.50 budget), over the
// whole space with that budget (--all), and over the whole space with no
// budget at all. Reported per search: engine evaluations and candidates
// skipped as unable to win.
func BenchmarkPickDemo(b *testing.B) {
	s := scenario.Demo()
	for _, at := range []string{"nominal", "worst", "p10"} {
		for _, c := range []struct {
			name   string
			all    bool
			budget float64
		}{{"file", false, s.Budget}, {"all", true, s.Budget}, {"all-nobudget", true, 0}} {
			b.Run(at+"/"+c.name, func(b *testing.B) {
				sp, err := SpaceOf(s, c.all)
				if err != nil {
					b.Fatal(err)
				}
				st, err := StatisticFor(at, s.Tolerances, s.Seed)
				if err != nil {
					b.Fatal(err)
				}
				lim := DefaultLimits()
				lim.Need, lim.Budget, lim.At = 20, c.budget, at
				var out *Outcome
				for b.Loop() {
					if out, err = Search(sp, lim, st, nil); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(out.Evaluated), "evaluated")
				b.ReportMetric(float64(out.Pruned), "pruned")
				b.ReportMetric(float64(out.Space), "space")
			})
		}
	}
}
