package protect

import (
	"math"
	"sync"
	"testing"
)

// TestHeatingMemoSame: a Heating from the memo settles to the same bits
// as one built afresh (buildHeating, no memo), and Heatings sharing an
// entry can run on different goroutines (run with -race). The check is
// exact by construction: the shared part is the same arithmetic.
func TestHeatingMemoSame(t *testing.T) {
	th := sma
	secs := []float64{3, 2, 25}
	power := func(k int, tj float64) float64 { return 0.1*float64(k+1) + 1e-4*(tj-20) }
	want := buildHeating(th, secs)
	want.p, want.dp, want.lastT = make([]float64, 3), make([]float64, 3), make([]float64, 3)
	wtj := make([]float64, 3)
	ws := want.Settle(20, power, wtj)
	var wg sync.WaitGroup
	for range 4 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for range 50 {
				h := NewHeating(th, secs)
				tj := make([]float64, 3)
				s := h.Settle(20, power, tj)
				for k := range tj {
					if math.Float64bits(tj[k]) != math.Float64bits(wtj[k]) {
						t.Errorf("phase %d: %v from the memo, %v afresh", k, tj[k], wtj[k])
						return
					}
				}
				if s != ws {
					t.Errorf("settled %+v from the memo, %+v afresh", s, ws)
					return
				}
			}
		}()
	}
	wg.Wait()
}
