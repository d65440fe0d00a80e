package curves

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"headroom/internal/rc"
	"headroom/internal/units"
)

func TestReadCellTOMLExample(t *testing.T) {
	c, err := Load(filepath.Join("..", "testdata", "cells", "example-cell.toml"))
	if err != nil {
		t.Fatal(err)
	}
	// The example file's own values (invented): units parsed, percentages
	// as fractions. Exact: each is one decimal parse, or a parse times a
	// power of ten for "400mA" and "20%" (tolerance 1e-15 for those).
	want := Cell{ID: "example-aa", Name: "invented 1.2 V AA cell", Chemistry: "nimh", Designation: "HR6",
		NominalV: 1.2, EndPoint: 1.0, RatedMAh: 2000, RatedCurrent: 0.4, RefCurrent: 0.4, Peukert: 1.05,
		SelfDischarge: 0.2, Rechargeable: true, CycleLife: 500, ChargeEfficiency: 0.75, Price: 2.80}
	if c.ID != want.ID || c.Name != want.Name || c.Chemistry != want.Chemistry || c.Designation != want.Designation ||
		c.NominalV != want.NominalV || c.EndPoint != want.EndPoint || c.RatedMAh != want.RatedMAh ||
		math.Abs(c.RatedCurrent-want.RatedCurrent) > 1e-15 || c.RefCurrent != want.RefCurrent ||
		c.Peukert != want.Peukert || math.Abs(c.SelfDischarge-want.SelfDischarge) > 1e-15 || !c.Rechargeable ||
		c.CycleLife != want.CycleLife || math.Abs(c.ChargeEfficiency-want.ChargeEfficiency) > 1e-15 || c.Price != want.Price {
		t.Errorf("got  %+v\nwant %+v", *c, want)
	}
	if c.Curve.Len() != 8 || len(c.Resistance) != 4 || len(c.Temperature) != 4 {
		t.Errorf("%d curve, %d resistance, %d temperature points; want 8, 4, 4", c.Curve.Len(), len(c.Resistance), len(c.Temperature))
	}
	// Like the built-in NiMH cells, the example is rated at 0.2 It to
	// 1.0 V (IEC 61951-2) and its curve crosses 1.0 V at the rating.
	if q, _ := c.Curve.ChargeAt(c.EndPoint); math.Abs(q/c.RatedMAh-1) > 0.01 {
		t.Errorf("example crosses %g V at %g mAh, rated %g", c.EndPoint, q, c.RatedMAh)
	}
}

func TestReadCellTOMLDefaults(t *testing.T) {
	// Minimal file: only a curve. Defaults documented on CellDef.Cell.
	c, err := ReadCellTOML(strings.NewReader("curve = [[0, 1.6], [100, 1.2], [200, 0.8]]\n"), "x/min.toml")
	if err != nil {
		t.Fatal(err)
	}
	// end_point = last voltage; rated = crossing = 200; nominal = curve at
	// 100 mAh = 1.2 V; all exact values from the points given.
	if c.ID != "min" || c.Name != "min" || c.Chemistry != "custom" || c.EndPoint != 0.8 || c.RatedMAh != 200 ||
		c.NominalV != 1.2 || c.Peukert != 1 || c.RefCurrent != 0 || c.RatedCurrent != 0 {
		t.Errorf("got %+v", c)
	}
	// Units in strings: "1V" and "0.15Ah" (= 150 mAh, the curve's own
	// 1.0 V crossing, halfway between (100, 1.2) and (200, 0.8));
	// tolerance 1e-12 for 0.15 × 1000 in binary.
	c, err = ReadCellTOML(strings.NewReader("curve = [[0, 1.6], [100, 1.2], [200, 0.8]]\nend_point = \"1V\"\nrated_mAh = \"0.15Ah\"\n"), "y.toml")
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(c.RatedMAh-150) > 1e-12 || c.EndPoint != 1 {
		t.Errorf("rated %g mAh, end %g V; want 150, 1", c.RatedMAh, c.EndPoint)
	}
}

func TestReadCellTOMLCurveCSV(t *testing.T) {
	dir := t.TempDir()
	pts := "mAh,V,ohm\n0,1.5,0.1\n100,1.2,0.2\n"
	if err := os.WriteFile(filepath.Join(dir, "pts.csv"), []byte(pts), 0o644); err != nil {
		t.Fatal(err)
	}
	good := filepath.Join(dir, "cell.toml")
	if err := os.WriteFile(good, []byte("id = \"c\"\ncurve_csv = \"pts.csv\"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	c, err := Load(good)
	if err != nil {
		t.Fatal(err)
	}
	// Rest voltage 1.35 V and 0.15 Ω halfway: 1 A gives 1.2 V (1e-12).
	if v := c.Terminal(50, 1, RefTempC); math.Abs(v-1.2) > 1e-12 || len(c.Resistance) != 2 {
		t.Errorf("terminal %g V with %d resistance points; want 1.2 V, 2", v, len(c.Resistance))
	}
	bad := filepath.Join(dir, "bad.toml")
	if err := os.WriteFile(bad, []byte("id = \"c\"\n\nref_current = 0.1\ncurve_csv = \"pts.csv\"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Load(bad); err == nil || !strings.Contains(err.Error(), "bad.toml line 3: ref_current: must be 0") {
		t.Errorf("got %v", err)
	}
	missing := filepath.Join(dir, "missing.toml")
	if err := os.WriteFile(missing, []byte("curve_csv = \"nope.csv\"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Load(missing); err == nil || !strings.Contains(err.Error(), "missing.toml line 1: curve_csv: ") || !strings.Contains(err.Error(), "nope.csv: no such file") {
		t.Errorf("got %v", err)
	}
}

func TestReadCellTOMLErrors(t *testing.T) {
	const curve = "curve = [[0, 1.6], [100, 1.2], [200, 0.8]]\n"
	cases := []struct{ name, in, want string }{
		{"syntax", "id = \"a\"\ncurve = [[0, 1.6],\n  [100 1.2]]\n", "c.toml line 3: curve: expected a comma"},
		{"duplicate key", "id = \"a\"\nid = \"b\"\n", "c.toml line 2: id: "},
		{"type mismatch", curve + "id = 3\n", "c.toml line 2: id: incompatible types: TOML value has type int64"},
		{"unknown key", curve + "\nvoltage = 3\n", `c.toml line 3: unknown key "voltage"`},
		{"unknown table", curve + "[extra]\nx = 1\n", `c.toml line 2: unknown key "extra"`},
		{"wrong unit", curve + "end_point = \"1A\"\n", `c.toml line 2: end_point: "1A" is a current (A), expected a voltage (V)`},
		{"bad type", curve + "end_point = true\n", "c.toml line 2: end_point: expected a number or a quoted value with units, got bool"},
		{"no curve", "id = \"a\"\n", "c.toml: curve: missing"},
		{"both curves", curve + "curve_csv = \"a.csv\"\n", "c.toml line 2: curve_csv: give either curve or curve_csv"},
		{"curve pair", "curve = [\n [0, 1.6],\n [100],\n]\n", "c.toml line 3: curve point 2: want [mAh, V], got 1 numbers"},
		{"curve rises", "curve = [\n [0, 1.6], # start\n [100, 1.2],\n [200, 1.25],\n]\n", "c.toml line 4: curve point 3: voltage rises from 1.2 V to 1.25 V"},
		{"end above curve", curve + "end_point = 1.7\n", "c.toml line 2: end_point: 1.7 V is not below the curve's first voltage 1.6 V"},
		{"peukert", curve + "peukert = 2.5\n", "c.toml line 2: peukert: 2.5 must be between 1 and 2"},
		{"percent", curve + "self_discharge = \"125%\"\n", "c.toml line 2: self_discharge: 1.25 per month"},
		{"bare percent string", curve + "self_discharge = \"25\"\n", `c.toml line 2: self_discharge: "25" has no unit`},
		{"rechargeable", curve + "rechargeable = true\ncharge_efficiency = 0.8\n", "c.toml: cycle_life: 0 must be at least 1"},
		{"resistance point", curve + "resistance = [[0, 0.1], [0.5, 0.2], [0.4, 0.3]]\n", "c.toml line 2: resistance point 3: depth 0.4 must be above the previous 0.5"},
		{"temperature row", curve + "temperature = [\n[-20, 0.5],\n]\n", "c.toml line 3: temperature point 1: want [°C, capacity factor, resistance factor]"},
		{"binary", "\x00id = 1", "c.toml: not a text file"},
		{"too big", strings.Repeat("#\n", MaxFileSize/2+1), "c.toml: larger than the 1048576-byte limit"},
	}
	for _, k := range cases {
		_, err := ReadCellTOML(strings.NewReader(k.in), "c.toml")
		if err == nil || !strings.HasPrefix(err.Error(), k.want) {
			t.Errorf("%s: got %v, want an error starting %q", k.name, err, k.want)
		}
	}
}

func TestCellDefInCode(t *testing.T) {
	d := CellDef{
		ID:         "scn",
		Curve:      [][]float64{{0, 3}, {10, 2}},
		RefCurrent: units.RawText("5mA"),
		Price:      units.RawText("$0.40"),
	}
	c, err := d.Cell("scenario.toml [[cell]] 2")
	if err != nil {
		t.Fatal(err)
	}
	// "5mA" is 5e-3 A, "$0.40" is 0.4 dollars: one decimal parse times a
	// power of ten, tolerance 1e-15.
	if math.Abs(c.RefCurrent-0.005) > 1e-15 || math.Abs(c.Price-0.4) > 1e-15 {
		t.Errorf("ref %g A, price %g", c.RefCurrent, c.Price)
	}
	d.ID = ""
	_, err = d.Cell("scenario.toml [[cell]] 2")
	var fe *FieldError
	if err == nil || err.Error() != "scenario.toml [[cell]] 2: id: missing" || !errors.As(err, &fe) || fe.Key != "id" {
		t.Errorf("got %v", err)
	}
}

// The polarisation branches and the pack cut-off read from TOML, and bad
// values are refused naming the key (the cell-memory fields).
func TestCellTOMLPolarisation(t *testing.T) {
	good := "curve = [[0, 4.1], [2000, 3.0]]\nrc = [[0.02, 8], [0.03, 900]]\ncutoff_v = \"2.5V\"\ncutoff_delay = \"50ms\"\n"
	c, err := ReadCellTOML(strings.NewReader(good), "pol.toml")
	if err != nil {
		t.Fatal(err)
	}
	if len(c.RC) != 2 || c.RC[1].R != 0.03 || c.RC[1].Tau != 900 || c.CutoffV != 2.5 || math.Abs(c.CutoffDelay-0.05) > 1e-15 {
		t.Errorf("read %+v, cutoff %v V after %v s", c.RC, c.CutoffV, c.CutoffDelay)
	}
	for _, bad := range []struct{ text, want string }{
		{"rc = [[0.02, 0]]", "rc point 1"},
		{"rc = [[0, 5]]", "rc point 1"},
		{"rc = [[-0.1, 5]]", "rc point 1"},
		{"rc = [[0.02]]", "rc point 1"},
		{"rc = [[0.1, 1], [0.1, 2], [0.1, 3], [0.1, 4]]", "at most 3"},
		{"cutoff_v = 2.5", "cutoff_delay"},
		{"cutoff_v = 2.5\ncutoff_delay = -1", "cutoff_delay"},
		{"cutoff_v = -1", "cutoff_v"},
	} {
		_, err := ReadCellTOML(strings.NewReader("curve = [[0, 4.1], [2000, 3.0]]\n"+bad.text+"\n"), "bad.toml")
		if err == nil || !strings.Contains(err.Error(), bad.want) || !strings.Contains(err.Error(), "bad.toml") {
			t.Errorf("%q: error %v, want one naming the file and %q", bad.text, err, bad.want)
		}
	}
}

// The cell's thermal data read from TOML, written back by WriteCellTOML
// and read back the same; bad values refused naming the key (the
// self-heating fields).
func TestCellTOMLHeat(t *testing.T) {
	good := "curve = [[0, 4.1], [2000, 3.0]]\nheat_capacity = 45\nthermal_resistance = 24\n"
	c, err := ReadCellTOML(strings.NewReader(good), "heat.toml")
	if err != nil {
		t.Fatal(err)
	}
	if c.HeatCapacity != 45 || c.ThermalRes != 24 || c.ThermalStage().Tau != 45*24 {
		t.Errorf("read C %v J/K, θ %v K/W, stage %+v", c.HeatCapacity, c.ThermalRes, c.ThermalStage())
	}
	var b strings.Builder
	if err := WriteCellTOML(&b, c, nil); err != nil {
		t.Fatal(err)
	}
	back, err := ReadCellTOML(strings.NewReader(b.String()), "back.toml")
	if err != nil {
		t.Fatalf("%v\n%s", err, b.String())
	}
	if back.HeatCapacity != c.HeatCapacity || back.ThermalRes != c.ThermalRes {
		t.Errorf("read back C %v θ %v from\n%s", back.HeatCapacity, back.ThermalRes, b.String())
	}
	// Without the keys the cell stays at the ambient.
	plain, err := ReadCellTOML(strings.NewReader("curve = [[0, 4.1], [2000, 3.0]]\n"), "plain.toml")
	if err != nil || plain.SelfHeats() || plain.ThermalStage() != (rc.Stage{}) {
		t.Errorf("a cell without thermal data: %v, heats %v", err, plain != nil && plain.SelfHeats())
	}
	// Quoted with their units, as the other keys may be, they read the same.
	quoted, err := ReadCellTOML(strings.NewReader("curve = [[0, 4.1], [2000, 3.0]]\nheat_capacity = \"45 J/K\"\nthermal_resistance = \"24K/W\"\n"), "quoted.toml")
	if err != nil || quoted.HeatCapacity != 45 || quoted.ThermalRes != 24 {
		t.Errorf("quoted with units: %v, C %v θ %v", err, quoted.HeatCapacity, quoted.ThermalRes)
	}
	for _, bad := range []struct{ text, want string }{
		// one line naming the file, the line and the key, and what is wrong
		{"heat_capacity = \"lots\"\nthermal_resistance = 20", `bad.toml line 2: heat_capacity: "lots" is not a number of J/K`},
		{"heat_capacity = 20\nthermal_resistance = \"20 J/K\"", `bad.toml line 3: thermal_resistance: "20 J/K" is not a number of K/W`},
		{"heat_capacity = 45", "bad.toml line 2: heat_capacity: given without thermal_resistance"},
		{"thermal_resistance = 24", "bad.toml line 2: thermal_resistance: given without heat_capacity"},
		{"thermal_resistance = -1\nheat_capacity = 10", "thermal_resistance"},
		{"thermal_resistance = 5000\nheat_capacity = 10", "thermal_resistance"},
		{"thermal_resistance = 20", "heat_capacity"},
		{"thermal_resistance = 20\nheat_capacity = 0", "heat_capacity"},
		{"heat_capacity = -3", "heat_capacity"},
		{"heat_capacity = 1e9\nthermal_resistance = 20", "heat_capacity"},
		{"heat_capacity = \"45 J/K\"", "heat_capacity"},
		{"thermal_resistance = nan\nheat_capacity = 10", "thermal_resistance"},
	} {
		_, err := ReadCellTOML(strings.NewReader("curve = [[0, 4.1], [2000, 3.0]]\n"+bad.text+"\n"), "bad.toml")
		if err == nil || !strings.Contains(err.Error(), bad.want) || !strings.Contains(err.Error(), "bad.toml") {
			t.Errorf("%q: error %v, want one naming the file and %q", bad.text, err, bad.want)
		}
	}
}
