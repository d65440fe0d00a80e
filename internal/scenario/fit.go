package scenario

import (
	"math"

	"headroom/curves"
	"headroom/discharge"
)

// FreshLimit is how far above the design's fresh pack voltage another
// chemistry's fresh pack may start and still count as fitting the product.
const FreshLimit = 1.5

// FitSeries picks the series count for cell in the product of design d, or
// 0 when none fits: the count whose nominal pack voltage is closest to the
// design's (ties go to fewer cells), among those whose fresh pack starts
// above the floor and at most FreshLimit times the design's fresh voltage.
// The command line's compare and the screen's line-up share this rule.
func FitSeries(cell *curves.Cell, d *discharge.Design) int {
	nomD := float64(d.Series) * d.Cell.NominalV
	freshD := float64(d.Series) * d.Cell.OpenCircuit(0, d.TempC)
	ocv := cell.OpenCircuit(0, d.TempC)
	best, bestDiff := 0, math.Inf(1)
	for s := 1; s <= discharge.MaxSeries; s++ {
		fresh := float64(s) * ocv
		if fresh > FreshLimit*freshD {
			break
		}
		if fresh <= d.Floor {
			continue
		}
		if diff := math.Abs(float64(s)*cell.NominalV - nomD); diff < bestDiff-1e-9 {
			best, bestDiff = s, diff
		}
	}
	return best
}
