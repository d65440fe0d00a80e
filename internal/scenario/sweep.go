package scenario

import (
	"runtime"
	"sync"

	"headroom/discharge"
)

// Row is one evaluated combination; Err is set when the design is invalid.
type Row struct {
	Combo  Combo
	Result *discharge.Result
	Err    error
}

// Sweep evaluates every combination on all cores and calls emit with the
// rows in index order, streaming: at most a few thousand rows are held at
// once, whatever the count, so memory stays flat. emit runs on the calling
// goroutine; returning false stops the sweep early.
func (s *Scenario) Sweep(emit func(Row) bool) {
	n := s.Count()
	workers := runtime.GOMAXPROCS(0)
	const chunk = 256
	type batch struct {
		start int
		rows  []Row
	}
	jobs := make(chan int)
	done := make(chan batch, 2*workers)
	stop := make(chan struct{})
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for start := range jobs {
				end := min(start+chunk, n)
				rows := make([]Row, 0, end-start)
				for i := start; i < end; i++ {
					c := s.Combo(i)
					r, err := discharge.Evaluate(&c.Design)
					rows = append(rows, Row{Combo: c, Result: r, Err: err})
				}
				select {
				case done <- batch{start, rows}:
				case <-stop:
					return
				}
			}
		}()
	}
	go func() {
		defer close(jobs)
		for start := 0; start < n; start += chunk {
			select {
			case jobs <- start:
			case <-stop:
				return
			}
		}
	}()
	go func() { wg.Wait(); close(done) }()

	// Reorder: hold finished batches until the next expected one arrives.
	pending := map[int][]Row{}
	next := 0
	stopped := false
	for b := range done {
		if stopped {
			continue
		}
		pending[b.start] = b.rows
		for rows, ok := pending[next]; ok; rows, ok = pending[next] {
			delete(pending, next)
			for _, r := range rows {
				if !emit(r) {
					stopped = true
					close(stop)
					break
				}
			}
			if stopped {
				break
			}
			next += len(rows)
		}
	}
}
