package discharge

import (
	"fmt"
	"math/rand/v2"
	"sync"
	"testing"
)

// The evaluators are recycled through a sync.Pool (engine.go) while
// sweeps, the pick search and the screen evaluate from several
// goroutines at once. A recycled evaluator must carry nothing of the
// evaluation before it: random library designs (constant currents,
// resistors, converters, every element kind, cells that heat themselves
// and cells at the ambient,
// traces on) evaluated concurrently in shuffled orders give results
// identical, field for field, to the same designs evaluated one at a
// time. Run with -race to check the pool shares no memory between
// goroutines; without it the check still fails if one evaluation's
// arrays leak into another's figures.
func TestEvaluatorPoolConcurrent(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 11))
	var designs []*Design
	for len(designs) < 48 {
		d := shortcutDesign(rng)
		if rng.IntN(3) == 0 { // a converter phase: the junctions move with charge
			d.Profile[0].Load = Load{Kind: ConstantPower, Watts: 0.05 + rng.Float64()*1.5, Efficiency: 0.85}
		}
		if rng.IntN(2) == 0 { // a cell at the ambient (a CSV cell): the kept-rate shortcut, its arrays recycled
			c := *d.Cell
			c.ThermalRes, c.HeatCapacity = 0, 0
			d.Cell = &c
		}
		d.TracePoints = 8
		designs = append(designs, d)
	}
	checkConcurrent(t, designs, 3, describeDesign)
}

// checkConcurrent evaluates designs one at a time, then on four
// goroutines in shuffled orders (seeded by seed), and reports every
// concurrent result that differs, field for field, from the serial one
// (named by describe).
func checkConcurrent(t *testing.T, designs []*Design, seed uint64, describe func(*Design) string) {
	t.Helper()
	result := func(d *Design) string {
		r, err := Evaluate(d)
		if err != nil {
			return fmt.Sprintf("%+v %v", r, err)
		}
		return fmt.Sprintf("%+v", *r)
	}
	want := make([]string, len(designs))
	for i, d := range designs {
		want[i] = result(d)
	}
	const workers = 4
	var wg sync.WaitGroup
	errs := make(chan string, workers*len(designs))
	for w := range workers {
		order := rand.New(rand.NewPCG(uint64(w), seed)).Perm(len(designs))
		wg.Go(func() {
			for _, i := range order {
				if result(designs[i]) != want[i] {
					errs <- fmt.Sprintf("worker %d, design %d (%s): concurrent result differs from the serial one", w, i, describe(designs[i]))
				}
			}
		})
	}
	wg.Wait()
	close(errs)
	for e := range errs {
		t.Error(e)
	}
}
