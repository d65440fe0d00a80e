package scenario

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"headroom/protect"
)

func TestDemoParses(t *testing.T) {
	s := Demo()
	if s.Design.Cell.ID != "lr6" || s.Design.Series != 2 || len(s.Design.Profile) != 3 {
		t.Fatalf("demo design: cell %s ×%d, %d phases", s.Design.Cell.ID, s.Design.Series, len(s.Design.Profile))
	}
	if !strings.Contains(s.Name, "invented") {
		t.Errorf("demo name %q must say it is invented", s.Name)
	}
	// 4 cells × 6 elements × 2 floors in the demo's options and sweep.
	if n := s.Count(); n != 48 {
		t.Errorf("demo has %d combinations, want 48", n)
	}
	if math.Abs(s.Design.Floor-1.8) > 1e-12 || math.Abs(s.Design.Standby-30e-6) > 1e-18 {
		t.Errorf("floor %v, standby %v", s.Design.Floor, s.Design.Standby)
	}
}

func TestComboCoversEveryOption(t *testing.T) {
	s := Demo()
	seen := map[string]bool{}
	for i := 0; i < s.Count(); i++ {
		c := s.Combo(i)
		key := c.CellID + "|" + c.Protect + "|" + strings.TrimSpace(strings.Repeat("x", int(c.Floor*10)))
		if seen[key] {
			t.Fatalf("combination %d repeats %s", i, key)
		}
		seen[key] = true
	}
}

func TestSweepStreamsInOrder(t *testing.T) {
	s := Demo()
	next := 0
	s.Sweep(func(r Row) bool {
		if r.Combo.Index != next {
			t.Fatalf("row %d arrived when %d was due", r.Combo.Index, next)
		}
		if r.Err != nil {
			t.Fatalf("row %d: %v", next, r.Err)
		}
		next++
		return true
	})
	if next != s.Count() {
		t.Fatalf("%d rows, want %d", next, s.Count())
	}
	// Stopping early is honoured.
	got := 0
	s.Sweep(func(Row) bool { got++; return got < 5 })
	if got != 5 {
		t.Fatalf("stopped sweep emitted %d rows, want 5", got)
	}
}

func TestErrorsNameTheLine(t *testing.T) {
	cases := []struct{ name, text, want string }{
		{"syntax", "name = \"x\"\nseries = = 2\n", "bad.toml:2:"},
		{"unknown key", "name = \"x\"\n\ncolour = \"red\"\n", `bad.toml:3: unknown key "colour"`},
		{"wrong unit", "floor = \"3mA\"\n", "bad.toml:1: floor:"},
		{"zero series", "series = -1\n", "bad.toml:1: series:"},
		{"unknown cell", "cell = \"aa-nope\"\n", `unknown cell "aa-nope"`},
		{"bad protect", "protect = \"diode:zz=1\"\n", "bad.toml:1: protect:"},
		// The design's own element, when the options list others, once
		// named "protect:" twice.
		{"bad design protect", "protect = \"diode:is=0\"\n[options]\nprotect = [\"none\"]\n", "bad.toml:1: protect: diode: key \"is\""},
		{"bad load", "\nload = \"12 parsecs\"\n", "bad.toml:2: load:"},
		{"zero phase", "[[phase]]\nload = \"10mA\"\nduration = \"0s\"\n", "[[phase]] 1: duration"},
		{"binary", "\x00\x01\x02", "binary data"},
		{"bad sweep", "[sweep]\nfloor = { from = \"2V\", to = \"1V\", step = \"0.1V\" }\n", "sweep floor"},
		{"efficiency", "load = \"1W@120%\"\n", "efficiency"},
	}
	for _, c := range cases {
		_, err := Parse([]byte(c.text), "bad.toml", "")
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want it to contain %q", c.name, err, c.want)
		}
	}
}

// A price above the check's ceiling is refused in words that say so (it
// once said "must be 0 or more" of 2e6).
func TestCheckPriceSaysItsRange(t *testing.T) {
	for _, v := range []float64{-1, 2e6} {
		err := CheckPrice(v)
		if err == nil || !strings.Contains(err.Error(), "0 or more and at most 1000000") {
			t.Errorf("CheckPrice(%v): %v, want the range 0 to 1000000", v, err)
		}
	}
	if err := CheckPrice(1e6); err != nil {
		t.Errorf("CheckPrice(1e6): %v, want it allowed", err)
	}
}

func TestSweepRange(t *testing.T) {
	s, err := Parse([]byte("[sweep]\nfloor = { from = \"1.6V\", to = \"2.4V\", step = \"0.1V\" }\n"), "r.toml", "")
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Floors) != 9 || s.Floors[3] != 1.9 || s.Floors[8] != 2.4 {
		t.Fatalf("floors %v, want 1.6 … 2.4 in 9 steps", s.Floors)
	}
}

func TestFormatRoundTrips(t *testing.T) {
	s := Demo()
	data := Format(Saved{Name: s.Name, Design: s.Design, ProtectSpec: s.ProtectSpec})
	back, err := Parse(data, "saved.toml", "")
	if err != nil {
		t.Fatalf("saved scenario does not parse: %v\n%s", err, data)
	}
	a, b := s.Design, back.Design
	if a.Cell.ID != b.Cell.ID || a.Series != b.Series || a.Floor != b.Floor || a.Standby != b.Standby ||
		a.HoursPerDay != b.HoursPerDay || len(a.Profile) != len(b.Profile) || a.Protect.Spec() != b.Protect.Spec() {
		t.Fatalf("round trip changed the design:\n%+v\n%+v", a, b)
	}
	for i := range a.Profile {
		if a.Profile[i] != b.Profile[i] {
			t.Errorf("phase %d: %+v → %+v", i, a.Profile[i], b.Profile[i])
		}
	}
}

func TestWriteFileNeverClobbers(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "design.toml")
	if err := WriteFile(p, []byte("one"), false); err != nil {
		t.Fatal(err)
	}
	if err := os.Chmod(p, 0o600); err != nil {
		t.Fatal(err)
	}
	if err := WriteFile(p, []byte("two"), false); !errors.Is(err, ErrExists) {
		t.Fatalf("second write without overwrite: %v, want ErrExists", err)
	}
	if b, _ := os.ReadFile(p); string(b) != "one" {
		t.Fatalf("file now %q, want the old content", b)
	}
	// A write that fails part-way leaves the old file intact and no
	// temporary file behind.
	failing := func(f *os.File, data []byte) (int, error) {
		f.Write(data[:1])
		return 1, errors.New("disk full (simulated)")
	}
	if err := writeAtomic(p, []byte("three"), true, failing); err == nil {
		t.Fatal("failing write reported success")
	}
	if b, _ := os.ReadFile(p); string(b) != "one" {
		t.Fatalf("after a failed write the file is %q, want the old content", b)
	}
	if err := WriteFile(p, []byte("four"), true); err != nil {
		t.Fatal(err)
	}
	st, _ := os.Stat(p)
	if b, _ := os.ReadFile(p); string(b) != "four" || st.Mode().Perm() != 0o600 {
		t.Fatalf("overwrite: %q mode %v, want \"four\" and the old 0600", b, st.Mode().Perm())
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Fatalf("folder holds %d entries, want only the file (no temporaries left)", len(ents))
	}
	if err := WriteFile(dir, []byte("x"), true); err == nil {
		t.Fatal("writing over a directory succeeded")
	}
}

// A scenario can name a charger's price; it reaches the design and survives
// a save.
func TestChargerPrice(t *testing.T) {
	s, err := Parse([]byte("cell = \"hr6\"\ncharger_price = 12.5\n"), "c.toml", "")
	if err != nil {
		t.Fatal(err)
	}
	if s.Design.ChargerPrice != 12.5 {
		t.Fatalf("charger price %v, want 12.5", s.Design.ChargerPrice)
	}
	back, err := Parse(Format(Saved{Name: "x", Design: s.Design, ProtectSpec: "none"}), "saved.toml", "")
	if err != nil {
		t.Fatal(err)
	}
	if back.Design.ChargerPrice != 12.5 {
		t.Errorf("saved and read back: charger price %v, want 12.5", back.Design.ChargerPrice)
	}
	if _, err := Parse([]byte("charger_price = -1\n"), "c.toml", ""); err == nil {
		t.Error("a negative charger price parses")
	}
}

// A saved file writes quantities as an engineer types them (30uA, not
// 3e-05A) and reads them back exactly.
func TestSavedQuantitiesInEngineeringUnits(t *testing.T) {
	s := Demo()
	s.Design.Standby = 3e-5
	s.Design.Floor = 0.0018
	data := string(Format(Saved{Name: "x", Design: s.Design, ProtectSpec: "none"}))
	for _, want := range []string{`standby = "30uA"`, `floor = "1.8mV"`} {
		if !strings.Contains(data, want) {
			t.Errorf("saved file lacks %s:\n%s", want, data)
		}
	}
	back, err := Parse([]byte(data), "saved.toml", "")
	if err != nil {
		t.Fatal(err)
	}
	if back.Design.Standby != 3e-5 || back.Design.Floor != 0.0018 {
		t.Errorf("read back standby %v, floor %v", back.Design.Standby, back.Design.Floor)
	}
}

// A bad element spec in a file names the file, line and key once, and the
// error still unwraps to protect's *SpecError (no prefix cut off the text).
func TestProtectErrorKeepsItsType(t *testing.T) {
	for _, text := range []string{"protect = \"diode:is=0\"\n", "[options]\nprotect = [\"diode:zz=1\"]\n"} {
		_, err := Parse([]byte(text), "p.toml", "")
		var se *protect.SpecError
		if !errors.As(err, &se) || se.Kind != "diode" {
			t.Errorf("%q: %v, want a *protect.SpecError for diode", text, err)
			continue
		}
		if strings.Count(err.Error(), "protect:") != 1 {
			t.Errorf("%q: %q names protect more than once", text, err)
		}
	}
}

// A [[define_cell]] with thermal data is saved with it and read back the
// same (the cell's self-heating fields); a bad value names the key.
func TestDefineCellHeatRoundTrips(t *testing.T) {
	text := "cell = \"mine\"\n[[define_cell]]\nid = \"mine\"\ncurve = [[0, 4.1], [2000, 3.0]]\nheat_capacity = 44.5\nthermal_resistance = 21.25\n"
	s, err := Parse([]byte(text), "h.toml", "")
	if err != nil {
		t.Fatal(err)
	}
	back, err := Parse(Format(Saved{Name: "x", Design: s.Design, ProtectSpec: "none"}), "saved.toml", "")
	if err != nil {
		t.Fatal(err)
	}
	if c := back.Design.Cell; c.HeatCapacity != 44.5 || c.ThermalRes != 21.25 {
		t.Errorf("read back C %v J/K, θ %v K/W", c.HeatCapacity, c.ThermalRes)
	}
	_, err = Parse([]byte(strings.Replace(text, "21.25", "-2", 1)), "h.toml", "")
	if err == nil || !strings.Contains(err.Error(), "thermal_resistance") || !strings.Contains(err.Error(), "h.toml") {
		t.Errorf("a negative θ: %v", err)
	}
}
