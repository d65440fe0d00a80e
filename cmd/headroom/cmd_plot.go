package main

import (
	"bytes"
	"errors"
	"fmt"
	"image/color"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"headroom/discharge"
	"headroom/internal/guard"
	"headroom/internal/scenario"
	"headroom/internal/ticks"
)

var plotCmd = &command{
	name:  "plot",
	run:   runPlot,
	args:  "[scenario.toml] -o CHART.svg|CHART.png [--by time|charge] [--force]",
	short: "chart pack and load voltage over the run for each protection option",
	help: `
Draws the scenario's design once for every protection element in its
[options] (or its one element): the load voltage (solid) and the pack voltage
during the heaviest phase (dashed) against hours of use, or against the
charge drawn with --by charge. The floor is a horizontal line and each
cut-off is marked with a cross. With no file the built-in demo is used.

The chart is written whole or not at all; an existing file is kept unless
--force is given.

flags:
  -o FILE        the chart to write: .svg or .png
  --by AXIS      time (hours of use, the default) or charge (mAh drawn)
  --force        replace FILE if it exists

design flags (as in headroom run; --protect draws that element alone):
` + designFlagHelp() + `
examples:
  headroom plot -o demo.svg
  headroom plot testdata/scenarios/example.toml -o example.png --by charge
`,
}

// palette is a set of colours that stay apart on white and for the common
// colour-vision deficiencies (the Okabe–Ito set, common practice).
var palette = []color.RGBA{
	{0, 114, 178, 255},   // blue
	{213, 94, 0, 255},    // vermilion
	{0, 158, 115, 255},   // bluish green
	{204, 121, 167, 255}, // reddish purple
	{230, 159, 0, 255},   // orange
	{86, 180, 233, 255},  // sky blue
	{0, 0, 0, 255},       // black
	{240, 228, 66, 255},  // yellow
}

// maxPlotLines is the most protection options one chart draws: each is
// an evaluation and two lines, and past a dozen or so they cannot be told
// apart (20,000 options once took 20 s and 2.25 GB).
const maxPlotLines = 16

// tracePoints is how many points each curve has: smooth at chart size.
const tracePoints = 200

func runPlot(c *cli, args []string) error {
	fs := newFlags("plot")
	addDesignFlags(fs)
	out := fs.String("o", "", "")
	by := fs.String("by", "time", "")
	force := fs.Bool("force", false, "")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if err := wantArgs("plot", pos, 0, 1, "a scenario file"); err != nil {
		return err
	}
	if *out == "" {
		return errors.New("plot: -o is required: the chart to write, e.g. -o chart.svg or -o chart.png")
	}
	ext := strings.ToLower(strings.TrimPrefix(filepath.Ext(*out), "."))
	if ext != "svg" && ext != "png" {
		return fmt.Errorf("-o: %q: expected a file name ending in .svg or .png", *out)
	}
	byCharge := false
	switch strings.ToLower(strings.TrimSpace(*by)) {
	case "time":
	case "charge":
		byCharge = true
	default:
		return fmt.Errorf("--by: %q: expected time or charge", *by)
	}
	s, err := designScenario(fs, pos)
	if err != nil {
		return err
	}
	fromFlags(fs, s, pos)
	if n := len(s.Protects); n > maxPlotLines {
		return fmt.Errorf("plot: %d protection options; a chart draws at most %d (more could not be told apart): list fewer in [options] protect, or use headroom table", n, maxPlotLines)
	}
	data, err := chart(s, byCharge, ext)
	if err != nil {
		return err
	}
	if err := writeOutput("-o", *out, data, *force); err != nil {
		return err
	}
	_, err = fmt.Fprintf(c.stdout, "wrote %s: %s\n", *out, plotWords(len(s.Protects), byCharge))
	return err
}

// chart draws the scenario and returns the file's bytes.
func chart(s *scenario.Scenario, byCharge bool, ext string) ([]byte, error) {
	p := plot.New()
	d0 := s.Design
	title := s.Name
	if title == "" {
		title = guard.Clean(filepath.Base(s.Path))
	}
	p.Title.Text = fmt.Sprintf("%s\n%s; %s", title, packWords(&d0), loadWords(&d0))
	p.Title.TextStyle.Font.Size = vg.Points(11)
	p.X.Label.Text = "hours of use (h)"
	if byCharge {
		p.X.Label.Text = "charge drawn from the pack (mAh)"
	}
	p.Y.Label.Text = "voltage (V)"
	p.X.Tick.Marker, p.Y.Tick.Marker = ticks.Plain{}, ticks.Plain{}
	p.Add(plotter.NewGrid())
	// Voltages fall from the top left to the floor: the top right is free.
	p.Legend.Top = true
	p.Legend.XOffs = -vg.Points(6)
	p.Legend.TextStyle.Font.Size = vg.Points(9)

	xmax, vmax := 0.0, d0.Floor
	type drawn struct {
		label      string
		load, pack plotter.XYs
		cut        plotter.XYs
	}
	var all []drawn
	for i, el := range s.Protects {
		d := d0
		d.Protect = el
		d.TracePoints = tracePoints
		r, err := discharge.Evaluate(&d)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", s.ProtectSpecs[i], err)
		}
		dr := drawn{label: fmt.Sprintf("%s: %s h", s.ProtectSpecs[i], sig(r.RuntimeH, 3))}
		if r.RuntimeH == 0 {
			dr.label = s.ProtectSpecs[i] + ": does not start"
		}
		for _, tp := range r.Trace {
			x := tp.Hours
			if byCharge {
				x = tp.MAh
			}
			if !finite(x) || !finite(tp.LoadV) || !finite(tp.PackV) {
				continue
			}
			dr.load = append(dr.load, plotter.XY{X: x, Y: tp.LoadV})
			dr.pack = append(dr.pack, plotter.XY{X: x, Y: tp.PackV})
			xmax, vmax = max(xmax, x), max(vmax, tp.PackV)
		}
		if n := len(dr.load); n > 0 {
			dr.cut = plotter.XYs{dr.load[n-1]}
		}
		all = append(all, dr)
	}
	for i, dr := range all {
		col := palette[i%len(palette)]
		if len(dr.load) < 2 {
			// Nothing to draw: still say so in the legend.
			sc, _ := plotter.NewScatter(plotter.XYs{{X: 0, Y: d0.Floor}})
			sc.GlyphStyle = draw.GlyphStyle{Color: col, Radius: vg.Points(3), Shape: draw.CrossGlyph{}}
			p.Add(sc)
			p.Legend.Add(dr.label, sc)
			continue
		}
		pack, err := plotter.NewLine(dr.pack)
		if err != nil {
			return nil, err
		}
		pack.LineStyle = draw.LineStyle{Color: col, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(4), vg.Points(3)}}
		load, err := plotter.NewLine(dr.load)
		if err != nil {
			return nil, err
		}
		load.LineStyle = draw.LineStyle{Color: col, Width: vg.Points(1.6)}
		cut, err := plotter.NewScatter(dr.cut)
		if err != nil {
			return nil, err
		}
		cut.GlyphStyle = draw.GlyphStyle{Color: col, Radius: vg.Points(4), Shape: draw.CrossGlyph{}}
		p.Add(pack, load, cut)
		p.Legend.Add(dr.label, load)
	}
	if xmax <= 0 {
		xmax = 1
	}
	floor, err := plotter.NewLine(plotter.XYs{{X: 0, Y: d0.Floor}, {X: xmax, Y: d0.Floor}})
	if err != nil {
		return nil, err
	}
	floor.LineStyle = draw.LineStyle{Color: color.RGBA{120, 120, 120, 255}, Width: vg.Points(1.2), Dashes: []vg.Length{vg.Points(1), vg.Points(2)}}
	p.Add(floor)
	p.Legend.Add(fmt.Sprintf("floor %s V", fixed(d0.Floor, 2)), floor)
	key, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: d0.Floor}, {X: 0, Y: d0.Floor}})
	key.LineStyle = draw.LineStyle{Color: color.RGBA{120, 120, 120, 255}, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(4), vg.Points(3)}}
	p.Legend.Add("dashed: pack, solid: load", key)
	keyCut, _ := plotter.NewScatter(plotter.XYs{{X: 0, Y: d0.Floor}})
	keyCut.GlyphStyle = draw.GlyphStyle{Color: color.RGBA{120, 120, 120, 255}, Radius: vg.Points(4), Shape: draw.CrossGlyph{}}
	p.Legend.Add("cut-off", keyCut)

	p.X.Min, p.X.Max = 0, xmax*1.02
	p.Y.Min = max(0, d0.Floor-0.15*(vmax-d0.Floor)-0.1)
	p.Y.Max = vmax + 0.05*(vmax-p.Y.Min)
	wt, err := p.WriterTo(9*vg.Inch, 5.5*vg.Inch, ext)
	if err != nil {
		return nil, fmt.Errorf("plot: %w", err)
	}
	var b bytes.Buffer
	if _, err := wt.WriteTo(&b); err != nil {
		return nil, fmt.Errorf("plot: %w", err)
	}
	return b.Bytes(), nil
}

// plotWords says what the chart drew: "1 protection option, voltage
// against hours of use".
func plotWords(n int, byCharge bool) string {
	s := fmt.Sprintf("%d protection options", n)
	if n == 1 {
		s = "1 protection option"
	}
	if byCharge {
		return s + ", voltage against the charge drawn"
	}
	return s + ", voltage against hours of use"
}
