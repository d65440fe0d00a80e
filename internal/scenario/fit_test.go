package scenario

import (
	"testing"

	"headroom/curves"
	"headroom/discharge"
)

// cellAt is a made-up cell of nominal voltage nom whose rest voltage
// starts at fresh (a rest-voltage curve, no resistance), so FitSeries can
// be worked by hand.
func cellAt(id string, nom, fresh float64) *curves.Cell {
	return &curves.Cell{ID: id, Curve: curves.MustCurve([]float64{0, 1000}, []float64{fresh, fresh / 2}),
		NominalV: nom, RatedMAh: 1000, EndPoint: fresh / 2, Peukert: 1}
}

// FitSeries by hand. The design: two cells of 1.5 V nominal, 1.6 V fresh:
// 3.0 V nominal, 3.2 V fresh, so a candidate may start at most at
// FreshLimit × 3.2 V = 4.8 V.
func TestFitSeries(t *testing.T) {
	d := discharge.Design{Cell: cellAt("design", 1.5, 1.6), Series: 2, Parallel: 1, Floor: 1.8, TempC: 20}
	cases := []struct {
		name      string
		nom, ocv  float64
		floor     float64
		want      int
		reasoning string
	}{
		{"same cell", 1.5, 1.6, 1.8, 2, "its own count: 3.0 V exactly"},
		{"nimh-like", 1.2, 1.4, 1.8, 2, "2.4 V and 3.6 V are both 0.6 V off 3.0 V: the tie goes to fewer cells"},
		{"li-ion-like", 3.7, 4.2, 1.8, 1, "one cell, 4.2 V fresh, is under 4.8 V; two would start at 8.4 V"},
		{"9 V block", 9, 9.6, 1.8, 0, "one block starts at 9.6 V, above 4.8 V: none fits"},
		{"at the floor", 3.0, 3.0, 3.0, 0, "one cell starts at the 3.0 V floor, not above it; two start at 6 V, above 4.8 V"},
		{"small cells", 0.5, 0.55, 1.8, 6, "six make 3.0 V and start at 3.3 V"},
	}
	for _, c := range cases {
		dd := d
		dd.Floor = c.floor
		if got := FitSeries(cellAt(c.name, c.nom, c.ocv), &dd); got != c.want {
			t.Errorf("%s: %d in series, want %d (%s)", c.name, got, c.want, c.reasoning)
		}
	}
	// The limit itself: a candidate whose single cell starts exactly at
	// FreshLimit × the design's fresh voltage still fits.
	if got := FitSeries(cellAt("edge", 4.5, FreshLimit*3.2), &d); got != 1 {
		t.Errorf("a cell starting at the limit: %d, want 1", got)
	}
}
