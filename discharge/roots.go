// One-dimensional root finding shared by the operating points.

package discharge

import (
	"math"
)

// bracketRoot finds the root of an increasing g on [lo, hi] with g(lo) ≤ 0
// ≤ g(hi) by the Illinois variant of regula falsi, to about 1e-13 relative.
func bracketRoot(g func(float64) float64, lo, hi float64) float64 {
	return bracketRootF(g, lo, hi, g(lo), g(hi))
}

// bracketRootF is bracketRoot with g(lo) and g(hi) already known.
func bracketRootF(g func(float64) float64, lo, hi, flo, fhi float64) float64 {
	if flo >= 0 {
		return lo
	}
	if fhi <= 0 {
		return hi
	}
	side := 0
	for k := 0; k < 100; k++ {
		x := (lo*fhi - hi*flo) / (fhi - flo)
		if !(x > lo && x < hi) {
			x = 0.5 * (lo + hi)
		}
		fx := g(x)
		if math.Abs(fx) <= 1e-14 || hi-lo <= 1e-13*math.Max(hi, 1e-12) {
			return x
		}
		if fx < 0 {
			lo, flo = x, fx
			if side == -1 {
				fhi /= 2
			}
			side = -1
		} else {
			hi, fhi = x, fx
			if side == 1 {
				flo /= 2
			}
			side = 1
		}
	}
	return 0.5 * (lo + hi)
}
