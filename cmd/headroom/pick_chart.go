package main

import (
	"bytes"
	"fmt"
	"image/color"
	"path/filepath"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"headroom/internal/pick"
	"headroom/internal/scenario"
	"headroom/internal/ticks"
)

// frontChart draws unit cost against runtime: every design meeting the
// limits but the target as a grey point, the Pareto front as a line with
// its points, the target as a horizontal line and the budget as a
// vertical one.
func frontChart(s *scenario.Scenario, out *pick.Outcome, ext string) ([]byte, error) {
	p := plot.New()
	p.X.Tick.Marker, p.Y.Tick.Marker = ticks.Plain{}, ticks.Plain{}
	title := s.Name
	if title == "" {
		title = filepath.Base(s.Path)
	}
	p.Title.Text = fmt.Sprintf("%s\nunit cost against runtime (%s): %d evaluated designs within the other limits", title, out.Limits.At, len(out.Others))
	p.Title.TextStyle.Font.Size = vg.Points(11)
	p.X.Label.Text = "unit cost: cells + protection part ($)"
	p.Y.Label.Text = "runtime (hours of use)"
	p.Add(plotter.NewGrid())
	// Cheap and long-running is the empty corner: the legend goes there.
	p.Legend.Top = true
	p.Legend.Left = true
	p.Legend.XOffs = vg.Points(6)
	p.Legend.TextStyle.Font.Size = vg.Points(9)

	grey := color.RGBA{150, 150, 150, 255}
	xmax, ymax := 0.0, out.Limits.Need
	var rest, front, pass plotter.XYs
	for _, d := range out.Others {
		rest = append(rest, plotter.XY{X: d.UnitCost, Y: d.Result.RuntimeH})
		xmax, ymax = max(xmax, d.UnitCost), max(ymax, d.Result.RuntimeH)
	}
	for _, d := range out.Front {
		front = append(front, plotter.XY{X: d.UnitCost, Y: d.Result.RuntimeH})
		if d.Passes() {
			pass = append(pass, plotter.XY{X: d.UnitCost, Y: d.Result.RuntimeH})
		}
	}
	if len(rest) > 0 {
		sc, err := plotter.NewScatter(rest)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: grey, Radius: vg.Points(1.6), Shape: draw.CircleGlyph{}}
		p.Add(sc)
		p.Legend.Add("design within the other limits", sc)
	}
	if len(front) > 0 {
		// The front as a staircase: a design's runtime holds until the
		// next dearer one on the front.
		var stairs plotter.XYs
		for i, pt := range front {
			if i > 0 {
				stairs = append(stairs, plotter.XY{X: pt.X, Y: front[i-1].Y})
			}
			stairs = append(stairs, pt)
		}
		ln, err := plotter.NewLine(stairs)
		if err != nil {
			return nil, err
		}
		ln.LineStyle = draw.LineStyle{Color: palette[0], Width: vg.Points(1.4)}
		sc, err := plotter.NewScatter(front)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: palette[0], Radius: vg.Points(3), Shape: draw.CircleGlyph{}}
		p.Add(ln, sc)
		p.Legend.Add("Pareto front", ln, sc)
	}
	if len(pass) > 0 {
		sc, err := plotter.NewScatter(pass)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: palette[2], Radius: vg.Points(4.5), Shape: draw.RingGlyph{}}
		p.Add(sc)
		p.Legend.Add("on the front and meets the target", sc)
	}
	if xmax <= 0 {
		xmax = 1
	}
	if out.Limits.Budget > 0 {
		xmax = max(xmax, out.Limits.Budget)
	}
	xmax *= 1.05
	target, err := plotter.NewLine(plotter.XYs{{X: 0, Y: out.Limits.Need}, {X: xmax, Y: out.Limits.Need}})
	if err != nil {
		return nil, err
	}
	target.LineStyle = draw.LineStyle{Color: palette[1], Width: vg.Points(1.2), Dashes: []vg.Length{vg.Points(4), vg.Points(3)}}
	p.Add(target)
	p.Legend.Add(fmt.Sprintf("target %s h", short(out.Limits.Need)), target)
	if b := out.Limits.Budget; b > 0 {
		bl, err := plotter.NewLine(plotter.XYs{{X: b, Y: 0}, {X: b, Y: ymax * 1.05}})
		if err != nil {
			return nil, err
		}
		bl.LineStyle = draw.LineStyle{Color: palette[3], Width: vg.Points(1.2), Dashes: []vg.Length{vg.Points(1), vg.Points(2)}}
		p.Add(bl)
		p.Legend.Add("budget "+money(b), bl)
	}
	p.X.Min, p.X.Max = 0, xmax
	p.Y.Min, p.Y.Max = 0, ymax*1.05
	wt, err := p.WriterTo(8*vg.Inch, 5*vg.Inch, ext)
	if err != nil {
		return nil, fmt.Errorf("plot: %w", err)
	}
	var b bytes.Buffer
	if _, err := wt.WriteTo(&b); err != nil {
		return nil, fmt.Errorf("plot: %w", err)
	}
	return b.Bytes(), nil
}
