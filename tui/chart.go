package tui

import (
	"fmt"
	"math"
	"strings"

	"github.com/charmbracelet/lipgloss"

	"headroom/discharge"
	"headroom/internal/units"
)

// chartModel is the chart panel: pack and load voltage against hours of
// use, drawn with braille dots (2 × 4 per character cell), with the floor
// as a line and the cut-off marked.
type chartModel struct {
	width, height int
}

// SetSize sets the panel's size in columns and lines, labels included.
func (m *chartModel) SetSize(w, h int) { m.width, m.height = w, h }

// layer is one kind of mark on the plot; a higher layer's colour wins in a
// cell where two meet.
type layer uint8

const (
	layerNone layer = iota
	layerCutoff
	layerFloor
	layerPack
	layerLoad
	layerBand // the p10–p90 spread of the cut-off, along the bottom
)

// dots is a braille canvas of w × h character cells.
type dots struct {
	w, h int
	bits []uint8
	top  []layer
}

func newDots(w, h int) *dots {
	return &dots{w: w, h: h, bits: make([]uint8, w*h), top: make([]layer, w*h)}
}

// brailleBit[y][x] is the dot bit for sub-position x (0–1), y (0–3) in a
// cell (Unicode braille patterns, U+2800 block).
var brailleBit = [4][2]uint8{{0x01, 0x08}, {0x02, 0x10}, {0x04, 0x20}, {0x40, 0x80}}

// set marks dot (x, y), y = 0 at the top.
func (d *dots) set(x, y int, l layer) {
	if x < 0 || y < 0 || x >= 2*d.w || y >= 4*d.h {
		return
	}
	i := (y/4)*d.w + x/2
	d.bits[i] |= brailleBit[y%4][x%2]
	if l > d.top[i] {
		d.top[i] = l
	}
}

// line draws from (x0, y0) to (x1, y1) in dots (Bresenham).
func (d *dots) line(x0, y0, x1, y1 int, l layer) {
	dx, dy := abs(x1-x0), -abs(y1-y0)
	sx, sy := 1, 1
	if x0 > x1 {
		sx = -1
	}
	if y0 > y1 {
		sy = -1
	}
	e := dx + dy
	for n := 0; n < 4*(d.w+d.h)*4; n++ {
		d.set(x0, y0, l)
		if x0 == x1 && y0 == y1 {
			return
		}
		e2 := 2 * e
		if e2 >= dy {
			e += dy
			x0 += sx
		}
		if e2 <= dx {
			e += dx
			y0 += sy
		}
	}
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// render writes row r, one styled run per stretch of equal layer.
func (d *dots) render(r int, styles [6]lipgloss.Style) string {
	var b, run strings.Builder
	cur := layerNone
	flush := func() {
		if run.Len() == 0 {
			return
		}
		if cur == layerNone {
			b.WriteString(run.String())
		} else {
			b.WriteString(styles[cur].Render(run.String()))
		}
		run.Reset()
	}
	for c := range d.w {
		i := r*d.w + c
		l := d.top[i]
		if d.bits[i] == 0 {
			l = layerNone
		}
		if l != cur {
			flush()
			cur = l
		}
		if d.bits[i] == 0 {
			run.WriteByte(' ')
		} else {
			run.WriteRune(rune(0x2800 + int(d.bits[i])))
		}
	}
	flush()
	return b.String()
}

// View draws the chart: a heading with the legend, the plot with a volt
// scale on the left and an hour scale below.
func (m chartModel) View(sh *shared) string {
	st := &sh.styles
	w, h := max(m.width, 20), max(m.height, 6)
	var b strings.Builder
	b.WriteString(st.Heading.Render("Voltage over hours of use") + "\n")
	if sh.err != nil || len(sh.res.Trace) < 2 {
		msg := "No curve to draw: the design does not run."
		if sh.err == nil {
			msg = "No curve to draw: the product stops at once (" + cutoffWords(sh.res, sh.profile(), sh.vals.floor) + ")."
		}
		b.WriteString(st.Dim.Render(wrap(msg, w)))
		return b.String()
	}
	r := sh.res
	ylo, yhi, floorOff := chartRange(r.Trace, sh.vals.floor)
	floorKey := st.FloorLine.Render("⠒⠒ floor")
	if floorOff {
		floorKey = st.FloorLine.Render("floor " + units.Eng(sh.vals.floor, units.Voltage, 3) + ", below the chart")
	}
	legend := []string{
		st.PackLine.Render("⣿ pack V") + st.Dim.Render(" (upper line)"),
		st.LoadLine.Render("⣿ load V") + st.Dim.Render(" (after the protection)"),
		st.Dim.Render("both on the " + peakLabel(sh.profile()) + " peak"),
		floorKey,
		st.CutoffLine.Render("⡇ cut-off"),
	}
	p10, p90, band := sh.spreadBand()
	if band {
		legend = append(legend, st.Warn.Render("⣤⣤")+st.Dim.Render(" p10–p90 cut-off"))
	}
	for _, l := range joinItems(legend, w, "  ") {
		b.WriteString(l + "\n")
	}
	used := strings.Count(b.String(), "\n")
	const gutter = 8 // "  3.20 V" then the axis
	pw := w - gutter - 1
	ph := h - used - 2 // x axis and its labels
	if pw < 4 || ph < 2 {
		return strings.TrimRight(b.String(), "\n")
	}

	// Ranges: hours from 0 to a little past the cut-off; volts fitted to
	// the curves drawn, with the floor in the range when it lies near them
	// (within a quarter of their span below); a floor far below is named
	// under the chart instead of leaving most of it empty.
	xmax := r.RuntimeH * 1.06
	if band {
		xmax = max(xmax, p90*1.06)
	}
	if !(xmax > 0) {
		xmax = 1
	}
	d := newDots(pw, ph)
	X := func(hr float64) int { return int(math.Round(hr / xmax * float64(2*pw-1))) }
	Y := func(v float64) int { return int(math.Round((yhi - v) / (yhi - ylo) * float64(4*ph-1))) }

	xc := X(r.RuntimeH)
	for y := 0; y < 4*ph; y += 2 {
		d.set(xc, y, layerCutoff)
	}
	yf := Y(sh.vals.floor)
	for x := 0; x < 2*pw; x += 2 {
		d.set(x, yf, layerFloor)
	}
	plot := func(v func(discharge.TracePoint) float64, l layer) {
		px, py := -1, -1
		for _, p := range r.Trace {
			x, y := X(p.Hours), Y(v(p))
			if px >= 0 {
				d.line(px, py, x, y, l)
			} else {
				d.set(x, y, l)
			}
			px, py = x, y
		}
	}
	if band {
		for x := X(p10); x <= X(p90); x++ {
			d.set(x, 4*ph-1, layerBand)
			d.set(x, 4*ph-2, layerBand)
		}
	}
	plot(func(p discharge.TracePoint) float64 { return p.PackV }, layerPack)
	plot(func(p discharge.TracePoint) float64 { return p.LoadV }, layerLoad)

	styles := [6]lipgloss.Style{layerNone: st.Axis, layerCutoff: st.CutoffLine, layerFloor: st.FloorLine, layerPack: st.PackLine, layerLoad: st.LoadLine, layerBand: st.Warn}
	yLabel := func(row int) string {
		v := yhi - (float64(row)*4+1.5)/float64(4*ph-1)*(yhi-ylo)
		return fmt.Sprintf("%6.2f V", v)
	}
	floorRow := yf / 4
	for row := range ph {
		lab := strings.Repeat(" ", gutter)
		switch {
		case row == floorRow:
			lab = st.FloorLine.Render(fmt.Sprintf("%6.2f V", sh.vals.floor))
		case row == 0 || row == ph-1 || (row == ph/2 && abs(row-floorRow) > 1):
			lab = st.Axis.Render(yLabel(row))
		}
		b.WriteString(lab + st.Axis.Render("┤") + d.render(row, styles) + "\n")
	}
	b.WriteString(strings.Repeat(" ", gutter) + st.Axis.Render("└"+strings.Repeat("─", pw)) + "\n")

	// Hour labels: 0, the middle, and the cut-off, where they fit.
	axis := []rune(strings.Repeat(" ", pw+gutter+1))
	place := func(col int, s string) {
		rs := []rune(s)
		start := min(max(0, col-len(rs)/2), len(axis)-len(rs))
		for i := start; i < start+len(rs); i++ {
			if axis[i] != ' ' {
				return
			}
		}
		copy(axis[start:], rs)
	}
	place(gutter+1, "0 h")
	cut := "cut-off " + hours(r.RuntimeH)
	place(gutter+1+xc/2, cut)
	place(gutter+1+X(xmax/2)/2, hours(xmax/2))
	b.WriteString(st.Axis.Render(strings.TrimRight(string(axis), " ")))
	return b.String()
}

// joinItems lays styled items out on as few lines of width w as it can.
func joinItems(items []string, w int, sep string) []string {
	var out []string
	line, lw := "", 0
	for _, it := range items {
		iw := lipgloss.Width(it)
		switch {
		case lw == 0:
			line, lw = it, iw
		case lw+len(sep)+iw <= w:
			line, lw = line+sep+it, lw+len(sep)+iw
		default:
			out = append(out, line)
			line, lw = it, iw
		}
	}
	return append(out, line)
}

// chartRange is the voltage axis for a trace: the curves' own span with a
// margin of 6 % each side, widened to take in the floor when it lies
// within a quarter of that span below the lowest curve or inside it.
// floorOff is true when the floor stays out of the range.
func chartRange(tr []discharge.TracePoint, floor float64) (lo, hi float64, floorOff bool) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, p := range tr {
		lo = math.Min(lo, math.Min(p.LoadV, p.PackV))
		hi = math.Max(hi, math.Max(p.PackV, p.LoadV))
	}
	span := hi - lo
	if !(span > 0) {
		span = math.Max(0.1, 0.1*math.Abs(hi))
	}
	switch {
	case floor >= lo-0.25*span && floor <= hi:
		lo = math.Min(lo, floor)
	case floor > hi:
		hi = floor
	default:
		floorOff = true
	}
	span = math.Max(hi-lo, 1e-3)
	return math.Max(0, lo-0.06*span), hi + 0.06*span, floorOff
}
