package discharge

import (
	"flag"
	"image/color"
	"os"
	"strings"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"headroom/curves"
)

var cellChart = flag.String("cell-chart", "", "write the README's cell-model chart (SVG) to this file")

// TestCellModelChart draws the README's chart of the cell model: an
// alkaline AA (the library's LR6, typical values from memory) at 250 mA,
// continuously and for 1 minute in every 10, its voltage at the end of
// each pulse against the charge delivered, to the 0.9 V end-point. It
// checks what the chart shows — the rests deliver more charge — and
// writes the SVG only when asked:
//
//	go test ./discharge -run TestCellModelChart -cell-chart ../docs/cell-model.svg
func TestCellModelChart(t *testing.T) {
	c, _ := curves.Lookup("lr6")
	load := Load{Kind: ConstantCurrent, Amps: 0.25}
	runs := []struct {
		name    string
		profile []Phase
		col     color.Color
	}{
		{"continuous 250 mA", []Phase{{Load: load, Seconds: 1}}, color.RGBA{200, 60, 40, 255}},
		{"250 mA for 1 min in every 10", []Phase{{Load: load, Seconds: 60}, {Load: Load{Kind: ConstantCurrent}, Seconds: 540}}, color.RGBA{30, 100, 190, 255}},
	}
	p := plot.New()
	p.Title.Text = "Alkaline AA (LR6, typical values) at 250 mA: voltage at the end of each pulse"
	p.X.Label.Text = "charge delivered, mAh"
	p.Y.Label.Text = "cell voltage, V"
	p.Add(plotter.NewGrid())
	p.Legend.Top = true
	var got []float64
	for _, r := range runs {
		res := mustEval(t, &Design{Cell: c, Series: 1, Parallel: 1, TempC: 20, Profile: r.profile, TracePoints: 120})
		got = append(got, res.DeliveredMAh)
		xy := make(plotter.XYs, len(res.Trace))
		for i, tp := range res.Trace {
			xy[i] = plotter.XY{X: tp.MAh, Y: tp.LoadV}
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			t.Fatal(err)
		}
		l.LineStyle = draw.LineStyle{Color: r.col, Width: vg.Points(1.6)}
		p.Add(l)
		p.Legend.Add(r.name+" ("+itoa(int(res.DeliveredMAh+0.5))+" mAh)", l)
	}
	// The chart's point, checked: resting delivers more (TestIntermittentBeatsContinuous
	// holds the size of the gain to its bounds).
	if !(got[1] > got[0]) {
		t.Errorf("intermittent %.0f mAh, continuous %.0f mAh: want more from the rests", got[1], got[0])
	}
	if *cellChart == "" {
		return
	}
	ext := "svg"
	if strings.HasSuffix(*cellChart, ".png") {
		ext = "png"
	}
	wt, err := p.WriterTo(8*vg.Inch, 4.5*vg.Inch, ext)
	if err != nil {
		t.Fatal(err)
	}
	f, err := os.Create(*cellChart)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if _, err := wt.WriteTo(f); err != nil {
		t.Fatal(err)
	}
}
