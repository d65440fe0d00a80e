package cellfit

import (
	"bytes"
	"fmt"
	"image/color"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"

	"headroom/internal/ticks"
)

// Colours that stay apart for the common colour-vision deficiencies
// (from the Okabe–Ito set, common practice).
var (
	measuredColour = color.RGBA{0, 114, 178, 255} // blue
	modelColour    = color.RGBA{213, 94, 0, 255}  // vermilion
)

// Plot draws, for each log, the measured terminal voltage (dots) and the
// fitted model's (line) against time, one panel a log, stacked. format is
// "svg" or "png".
func (r *Result) Plot(format string) ([]byte, error) {
	n := len(r.Fits)
	plots := make([][]*plot.Plot, n)
	for i, f := range r.Fits {
		p := plot.New()
		p.X.Tick.Marker, p.Y.Tick.Marker = ticks.Plain{}, ticks.Plain{}
		p.Title.Text = fmt.Sprintf("%s: residual RMS %.1f mV, worst %.0f mV", safeName(f.Log.Name), f.RMS*1e3, f.Worst*1e3)
		p.Title.TextStyle.Font.Size = vg.Points(10)
		p.X.Label.Text = "time (min)"
		p.Y.Label.Text = "cell voltage (V)"
		p.Add(plotter.NewGrid())
		meas := make(plotter.XYs, f.Log.Len())
		mod := make(plotter.XYs, f.Log.Len())
		for k := range meas {
			x := (f.Log.T[k] - f.Log.T[0]) / 60
			meas[k] = plotter.XY{X: x, Y: f.Log.V[k]}
			mod[k] = plotter.XY{X: x, Y: f.Model[k]}
		}
		sc, err := plotter.NewScatter(meas)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: measuredColour, Radius: vg.Points(1.3), Shape: draw.CircleGlyph{}}
		ln, err := plotter.NewLine(mod)
		if err != nil {
			return nil, err
		}
		ln.LineStyle = draw.LineStyle{Color: modelColour, Width: vg.Points(1)}
		p.Add(sc, ln)
		p.Legend.Add("measured", sc)
		p.Legend.Add("fitted model", ln)
		p.Legend.Top = true
		p.Legend.TextStyle.Font.Size = vg.Points(9)
		plots[i] = []*plot.Plot{p}
	}
	w, h := 8*vg.Inch, vg.Length(n)*3.2*vg.Inch
	var c vg.CanvasWriterTo
	switch strings.ToLower(format) {
	case "svg":
		c = vgsvg.New(w, h)
	case "png":
		c = vgimg.PngCanvas{Canvas: vgimg.New(w, h)}
	default:
		return nil, fmt.Errorf("plot format %q: want svg or png", format)
	}
	dc := draw.New(c)
	tiles := draw.Tiles{Rows: n, Cols: 1, PadX: vg.Millimeter, PadY: 4 * vg.Millimeter, PadTop: 2 * vg.Millimeter, PadBottom: 2 * vg.Millimeter, PadLeft: 2 * vg.Millimeter, PadRight: 4 * vg.Millimeter}
	canvases := plot.Align(plots, tiles, dc)
	for i := range plots {
		plots[i][0].Draw(canvases[i][0])
	}
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return nil, fmt.Errorf("plot: %w", err)
	}
	return b.Bytes(), nil
}
