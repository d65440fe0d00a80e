package scenario

import (
	"strings"
	"testing"

	"headroom/tolerance"
)

// The [tolerance] table: each form a scenario may write reads back as
// the tolerance it says, over the defaults; samples and seed too.
func TestToleranceTable(t *testing.T) {
	src := `cell = "lr6"
series = 2
floor = "1.8V"

[tolerance]
capacity = "4%"
floor = "50mV"
shelf = 6
ambient = { min = "0C", max = "40C", dist = "uniform" }
load = { min = "-5%", max = "+15%" }
ilim = { spread = "10%", dist = "uniform" }
samples = 500
seed = 42
`
	s, err := Parse([]byte(src), "t.toml", "")
	if err != nil {
		t.Fatal(err)
	}
	if s.Samples != 500 || s.Seed != 42 {
		t.Errorf("samples %d, seed %d: want 500 and 42", s.Samples, s.Seed)
	}
	got := map[string]tolerance.Tol{}
	for _, x := range s.Tolerances {
		got[x.Name] = x
	}
	want := map[string]tolerance.Tol{
		"capacity": {Name: "capacity", Form: tolerance.Percent, Pct: 0.04, Dist: tolerance.Normal},
		"floor":    {Name: "floor", Form: tolerance.Offset, Delta: 0.05, Dist: tolerance.Normal},
		"shelf":    {Name: "shelf", Form: tolerance.Offset, Delta: 6, Dist: tolerance.Uniform},
		"ambient":  {Name: "ambient", Form: tolerance.Range, Min: 0, Max: 40, Dist: tolerance.Uniform},
		"load":     {Name: "load", Form: tolerance.Range, Min: -0.05, Max: 0.15, Dist: tolerance.Normal},
		"ilim":     {Name: "ilim", Form: tolerance.Percent, Pct: 0.10, Dist: tolerance.Uniform},
	}
	for name, w := range want {
		if got[name] != w {
			t.Errorf("%s: got %+v, want %+v", name, got[name], w)
		}
	}
	// Names the table leaves out keep their defaults.
	def, _ := tolerance.Default("vf")
	if got["vf"] != def {
		t.Errorf("vf: got %+v, want the default %+v", got["vf"], def)
	}
	if len(s.Tolerances) != len(tolerance.Names()) {
		t.Errorf("%d tolerances, want one per name (%d)", len(s.Tolerances), len(tolerance.Names()))
	}
	// No table: the defaults, 2000 samples, seed 1.
	d := Demo()
	if d.Samples != DefaultSamples || d.Seed != DefaultSeed || len(d.Tolerances) != len(tolerance.Names()) {
		t.Errorf("demo: samples %d, seed %d, %d tolerances", d.Samples, d.Seed, len(d.Tolerances))
	}
}

// Bad entries name the file, the table's line and the key.
func TestToleranceTableErrors(t *testing.T) {
	head := "cell = \"lr6\"\nfloor = \"1.8V\"\n\n[tolerance]\n"
	for _, c := range []struct{ body, want string }{
		{`floor = "-2%"`, `t.toml:5: [tolerance] floor: spread -2% is negative`},
		{`capacity = "120%"`, `t.toml:5: [tolerance] capacity: spread 120% would take`},
		{`ambient = "5%"`, `t.toml:5: [tolerance] ambient: a percentage means nothing`},
		{`floor = { min = "1.9V", max = "1.7V" }`, `t.toml:5: [tolerance] floor: min 1.9 V is above max 1.7 V`},
		{`floor = { min = "1.7V" }`, `t.toml:5: [tolerance] floor: give both min and max`},
		{`floor = { spread = "1%", dist = "lognormal" }`, `t.toml:5: [tolerance] floor: dist "lognormal"`},
		{`load = "50mV"`, `t.toml:5: [tolerance] load: "50mV": expected a percentage`},
		{`samples = 0`, `t.toml:5: [tolerance] samples: 0 must be a whole number from 1 to 1000000`},
		{`samples = 2000000`, `t.toml:5: [tolerance] samples: 2000000 must be`},
		{`seed = -3`, `t.toml:5: [tolerance] seed: -3 must be a whole number`},
		{`vt = "5%"`, `t.toml:5: [tolerance] unknown key "vt": expected samples, seed or a tolerance (capacity, lot_capacity,`},
	} {
		_, err := Parse([]byte(head+c.body+"\n"), "t.toml", "")
		if err == nil || !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("%s: got %v, want %q…", c.body, err, c.want)
		}
	}
}

// A saved scenario writes the tolerances that differ from the defaults,
// and Parse reads them back exactly (every form and distribution).
func TestToleranceTableRoundTrip(t *testing.T) {
	s := Demo()
	tols := tolerance.Defaults()
	for _, x := range []tolerance.Tol{
		{Name: "capacity", Form: tolerance.Percent, Pct: 0.07, Dist: tolerance.Uniform},
		{Name: "floor", Form: tolerance.Offset, Delta: 0.035, Dist: tolerance.Normal},
		{Name: "shelf", Form: tolerance.Offset, Delta: 18, Dist: tolerance.Uniform},
		{Name: "ambient", Form: tolerance.Range, Min: -5, Max: 45, Dist: tolerance.Uniform},
		{Name: "load", Form: tolerance.Range, Min: -0.05, Max: 0.15, Dist: tolerance.Normal},
		{Name: "ilim", Form: tolerance.Range, Min: 0.4, Max: 0.6, Dist: tolerance.Normal},
	} {
		tols = tolerance.With(tols, x)
	}
	text := Format(Saved{Name: "x", Design: s.Design, Tolerances: tols, Samples: 777, Seed: 9})
	back, err := Parse(text, "saved.toml", "")
	if err != nil {
		t.Fatalf("%v\n%s", err, text)
	}
	if back.Samples != 777 || back.Seed != 9 {
		t.Errorf("samples %d, seed %d read back; want 777 and 9", back.Samples, back.Seed)
	}
	for i := range tols {
		if back.Tolerances[i] != tols[i] {
			t.Errorf("%s: wrote %+v, read back %+v\n%s", tols[i].Name, tols[i], back.Tolerances[i], text)
		}
	}
	// Defaults only: no table at all.
	if text := Format(Saved{Name: "x", Design: s.Design, Tolerances: tolerance.Defaults()}); strings.Contains(string(text), "[tolerance]") {
		t.Errorf("defaults wrote a [tolerance] table:\n%s", text)
	}
}
