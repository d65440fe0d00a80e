package curves

import (
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"
)

// WriteCellTOML writes the cell as a cell TOML file that ReadCellTOML
// reads back to the same cell: every number in the shortest decimal that
// round-trips, every key stated (no defaults left to the reader). comment
// lines, if any, open the file, each prefixed "# ".
func WriteCellTOML(w io.Writer, c *Cell, comment []string) error {
	if err := c.Validate(); err != nil {
		return err
	}
	var b strings.Builder
	for _, l := range comment {
		b.WriteString(strings.TrimRight("# "+l, " ") + "\n")
	}
	if len(comment) > 0 {
		b.WriteString("\n")
	}
	writeCellKeys(&b, c)
	_, err := io.WriteString(w, b.String())
	return err
}

// WriteCellKeys writes the cell's keys, one table's worth (a cell file's
// body, or a scenario's [[define_cell]] table after its header), so that
// CellDef reads them back to the same cell: every number in the shortest
// decimal that round-trips, every key stated. The one home of a cell's
// TOML form: the cell file writer and the scenario writer both call it.
func WriteCellKeys(w io.Writer, c *Cell) error {
	var b strings.Builder
	writeCellKeys(&b, c)
	_, err := io.WriteString(w, b.String())
	return err
}

func writeCellKeys(b *strings.Builder, c *Cell) {
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	fmt.Fprintf(b, "id = %s\nname = %s\nchemistry = %s\n", TOMLString(c.ID), TOMLString(c.Name), TOMLString(c.Chemistry))
	if c.Designation != "" {
		fmt.Fprintf(b, "designation = %s\n", TOMLString(c.Designation))
	}
	fmt.Fprintf(b, "nominal = %s\nend_point = %s\nrated_mAh = %s\nrated_current = %s\nref_current = %s\n",
		g(c.NominalV), g(c.EndPoint), g(c.RatedMAh), g(c.RatedCurrent), g(c.RefCurrent))
	fmt.Fprintf(b, "peukert = %s\nself_discharge = %s\nprice = %s\n", g(c.Peukert), g(c.SelfDischarge), g(c.Price))
	if c.Rechargeable {
		fmt.Fprintf(b, "rechargeable = true\ncycle_life = %d\ncharge_efficiency = %s\n", c.CycleLife, g(c.ChargeEfficiency))
	}
	if c.CutoffV > 0 {
		fmt.Fprintf(b, "cutoff_v = %s\ncutoff_delay = %s\n", g(c.CutoffV), g(c.CutoffDelay))
	}
	if c.ThermalRes > 0 || c.HeatCapacity > 0 {
		fmt.Fprintf(b, "heat_capacity = %s\nthermal_resistance = %s\n", g(c.HeatCapacity), g(c.ThermalRes))
	}
	fmt.Fprintf(b, "source = %s\n", TOMLString(c.Source))
	array := func(key, unit string, rows [][]float64) {
		if len(rows) == 0 {
			return
		}
		fmt.Fprintf(b, "\n# %s\n%s = [\n", unit, key)
		for _, r := range rows {
			s := make([]string, len(r))
			for i, x := range r {
				s[i] = g(x)
			}
			fmt.Fprintf(b, "  [%s],\n", strings.Join(s, ", "))
		}
		b.WriteString("]\n")
	}
	var rows [][]float64
	for i := 0; i < c.Curve.Len(); i++ {
		q, v := c.Curve.Point(i)
		rows = append(rows, []float64{q, v})
	}
	what := "rest (open-circuit) voltage"
	if c.RefCurrent > 0 {
		what = "terminal voltage at " + g(c.RefCurrent) + " A"
	}
	array("curve", "[mAh, V]: "+what, rows)
	rows = rows[:0]
	for _, r := range c.Resistance {
		rows = append(rows, []float64{r.Depth, r.Ohm})
	}
	array("resistance", "[depth of discharge 0–1, ohm]: the instant resistance R0", rows)
	rows = rows[:0]
	for _, s := range c.RC {
		rows = append(rows, []float64{s.R, s.Tau})
	}
	array("rc", "[ohm, time constant s]: polarisation branches", rows)
	rows = rows[:0]
	for _, t := range c.Temperature {
		rows = append(rows, []float64{t.Celsius, t.Capacity, t.Resistance})
	}
	array("temperature", "[°C, capacity factor, resistance factor]", rows)
}

// TOMLString is s as a TOML basic string (valid UTF-8, escaped by the
// TOML encoder itself: Go's %q writes escapes such as \a and \x.. that
// TOML does not have).
func TOMLString(s string) string {
	s = strings.ToValidUTF8(s, "\uFFFD")
	var b strings.Builder
	if err := toml.NewEncoder(&b).Encode(struct {
		V string `toml:"v"`
	}{s}); err != nil {
		panic("curves: encoding a string: " + err.Error()) // a string always encodes
	}
	return strings.TrimSuffix(strings.TrimPrefix(b.String(), "v = "), "\n")
}
