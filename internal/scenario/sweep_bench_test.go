package scenario

import (
	"fmt"
	"runtime/metrics"
	"sync"
	"sync/atomic"
	"testing"
	"time"
)

// sweep100k loads the invented 100,800-combination scenario.
func sweep100k(tb testing.TB) *Scenario {
	tb.Helper()
	s, err := Load("../../testdata/scenarios/sweep100k.toml")
	if err != nil {
		tb.Fatal(err)
	}
	if n := s.Count(); n != 14*9*20*40 {
		tb.Fatalf("sweep100k has %d combinations, want 14×9×20×40 = 100800", n)
	}
	return s
}

// TestSweep100kScenario checks the benchmark's scenario: 100,800
// combinations as documented, every one a valid design (an invalid one
// would be skipped cheaply and flatter the benchmark). Only a sample is
// evaluated, to keep the test fast.
func TestSweep100kScenario(t *testing.T) {
	s := sweep100k(t)
	for i := 0; i < s.Count(); i += 997 {
		c := s.Combo(i)
		if err := c.Design.Validate(); err != nil {
			t.Fatalf("combination %d (%s, %s, %s, %g V): %v", i, c.CellID, c.Protect, c.Load, c.Floor, err)
		}
	}
}

// heapPeak samples the live heap every 10 ms until stop is closed
// and returns the highest value seen, bytes. runtime/metrics reads it
// without stopping the world.
func heapPeak(stop <-chan struct{}) <-chan uint64 {
	out := make(chan uint64, 1)
	go func() {
		sample := []metrics.Sample{{Name: "/memory/classes/heap/objects:bytes"}}
		var peak uint64
		tick := time.NewTicker(10 * time.Millisecond)
		defer tick.Stop()
		for {
			metrics.Read(sample)
			peak = max(peak, sample[0].Value.Uint64())
			select {
			case <-stop:
				out <- peak
				return
			case <-tick.C:
			}
		}
	}()
	return out
}

// BenchmarkSweep100k runs the whole invented sweep (every library cell,
// every element kind, twenty loads, forty floors: 100,800 evaluations) on
// all cores, consuming the rows as `headroom table` does. It reports
// combinations per second and the peak live heap, and, with every
// fourth, second and first floor, the same at about 10k, 50k and 100k
// combinations so that growth can be read off:
//
//	go test ./internal/scenario -run XXX -bench Sweep100k -benchtime 3x
func BenchmarkSweep100k(b *testing.B) {
	full := sweep100k(b)
	for _, every := range []int{10, 2, 1} {
		s := *full
		s.Floors = nil
		for i := 0; i < len(full.Floors); i += every {
			s.Floors = append(s.Floors, full.Floors[i])
		}
		n := s.Count()
		b.Run(fmt.Sprintf("combos=%d", n), func(b *testing.B) {
			var peak uint64
			var mu sync.Mutex
			for b.Loop() {
				stop := make(chan struct{})
				got := heapPeak(stop)
				var rows, failed atomic.Int64
				s.Sweep(func(r Row) bool {
					rows.Add(1)
					if r.Err != nil {
						failed.Add(1)
					}
					return true
				})
				close(stop)
				mu.Lock()
				peak = max(peak, <-got)
				mu.Unlock()
				if rows.Load() != int64(n) || failed.Load() != 0 {
					b.Fatalf("%d rows, %d errors; want %d rows, none failed", rows.Load(), failed.Load(), n)
				}
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "combos/s")
			b.ReportMetric(float64(peak)/(1<<20), "MB-heap-peak")
		})
	}
}
