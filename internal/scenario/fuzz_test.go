package scenario

import (
	"math"
	"strings"
	"testing"

	"headroom/discharge"
)

// FuzzParse checks the scenario loader: a file either fails with one line
// naming the file, or gives a scenario with at least one combination whose
// design is valid and evaluates without an error to finite, non-negative
// runtime and charges; the first and the last combination of the options
// and sweeps evaluate too.
func FuzzParse(f *testing.F) {
	f.Add(DemoTOML())
	for _, s := range []string{
		"",
		"cell = \"lr6\"\nseries = 2\nload = \"120mA\"\nfloor = 1.8\n",
		"load = \"450mA/3s,15mA/27s\"\nprotect = \"schottky\"\ntemp = \"-10C\"\n",
		"series = 4\ncell = \"hr6-lsd\"\nload = \"0.8W@85%\"\nfloor = \"3.6V\"\n[sweep]\nfloor = {from = 3.0, to = 4.0, step = 0.1}\n",
		"[[phase]]\nload = \"1A\"\nduration = \"1s\"\n[[phase]]\nname = \"idle\"\nload = \"2mA\"\nduration = 60\n",
		"load = \"33ohm\"\n[options]\ncells = [\"lr6\", \"fr6\"]\nprotect = [\"pmos\", \"pptc:hold=0.1\"]\nloads = [\"10mA\", \"led:vf=2,r=47\"]\n",
		"load = \"1A\"\n[sweep]\nload_scale = [\"10%\", \"1000%\"]\ntemp = [-40, 85]\n",
		"load = \"2A\"\n[sweep]\nload_scale = [\"100%\", \"100000%\"]\n",
		"hours_per_day = \"90min\"\nstandby = \"30uA\"\nprice = \"$1.10\"\nbudget = 0.6\n",
		"cell = \"mine\"\n[[define_cell]]\nid = \"mine\"\ncurve = [[0, 1.5], [1000, 1.2], [2000, 0.9]]\n",
		// nasty
		"series = 0\n", "series = -2\n", "parallel = 99\n", "floor = \"3mA\"\n", "floor = nan\n", "floor = inf\n",
		"load = \"1A/0s,1mA/1s\"\n", "load = \"0.8W@120%\"\n", "protect = \"diode:bogus=1\"\n", "cell = \"nope\"\n",
		"cell = \"/dev/null.csv\"\n", "load = \"1A\"\n[[phase]]\nload = \"1A\"\nduration = \"1s\"\n",
		"[sweep]\nfloor = {from = 1, to = 0, step = 0.1}\n", "[sweep]\nfloor = {from = 0, to = 1e9, step = 1e-9}\n",
		"[sweep]\nfloor = []\n", "x = 1\n", "name = \"\x00\"\n", "[[phase]]\nload = \"1A\"\n", "= =\n",
		"temp = \"-41C\"\n", "hours_per_day = 25\n", "standby = -1\n",
		"[[define_cell]]\nid = \"x\"\ncurve = [[0, 1.5], [0, 1.4]]\n",
		// hostile shapes: nesting at and past the limit, long dotted keys
		"x = " + strings.Repeat("{a=", 16) + "1" + strings.Repeat("}", 16) + "\n",
		"x = " + strings.Repeat("[", 17) + strings.Repeat("]", 17) + "\n",
		"[" + strings.Repeat("a.", 8) + "b]\nc = 1\n", strings.Repeat("a.", 7) + "b = 1\n",
		"x = '''" + strings.Repeat("[", 40) + "'''\ny = \"{{{{{{{{{{{{{{{{{{{{\"\n",
	} {
		f.Add([]byte(s))
	}
	dir := f.TempDir()
	f.Fuzz(func(t *testing.T, data []byte) {
		// Whatever follows a line that opens 17 arrays, or a key of 9
		// parts, the file is refused on its shape, before parsing.
		for _, head := range []string{"x = " + strings.Repeat("[", 17), "[" + strings.Repeat("a.", 8) + "b]"} {
			hostile := append([]byte(head+"\n"), data...)
			if _, err := Parse(hostile, "fuzz.toml", dir); err == nil || !(strings.HasPrefix(err.Error(), "fuzz.toml:1: ") &&
				strings.Contains(err.Error(), "refuses the file before reading it") || prechecked(err)) {
				t.Fatalf("%q + data: %v, want the shape refusal on line 1 (or a binary or size refusal)", head, err)
			}
		}
		s, err := Parse(data, "fuzz.toml", dir)
		if err != nil {
			if s != nil {
				t.Fatalf("Parse returned a scenario with error %v", err)
			}
			if msg := err.Error(); !strings.HasPrefix(msg, "fuzz.toml") || strings.Contains(msg, "\n") {
				t.Fatalf("error %q: want one line naming fuzz.toml", msg)
			}
			return
		}
		n := s.Count()
		if n < 1 {
			t.Fatalf("scenario parses with %d combinations", n)
		}
		if err := s.Design.Validate(); err != nil {
			t.Fatalf("scenario parses with an invalid design: %v", err)
		}
		check := func(what string, d *discharge.Design) {
			r, err := discharge.Evaluate(d)
			if err != nil {
				t.Fatalf("%s: a scenario that parses does not evaluate: %v", what, err)
			}
			for name, v := range map[string]float64{"runtime": r.RuntimeH, "delivered": r.DeliveredMAh,
				"reference": r.ReferenceMAh, "cost per hour": r.CostPerHour} {
				if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
					t.Fatalf("%s: %s = %v", what, name, v)
				}
			}
			// Stranded may be negative: an element can let a resistive
			// load run past the reference (discharge/stranded.go).
			if math.IsNaN(r.StrandedMAh) || math.IsInf(r.StrandedMAh, 0) {
				t.Fatalf("%s: stranded = %v", what, r.StrandedMAh)
			}
		}
		check("design", &s.Design)
		first := s.Combo(0)
		check("combination 1", &first.Design)
		if n > 1 {
			last := s.Combo(n - 1)
			check("last combination", &last.Design)
		}
	})
}

// prechecked reports the refusals that come before the shape check: binary
// data and size.
func prechecked(err error) bool {
	return strings.Contains(err.Error(), "binary data") || strings.Contains(err.Error(), "larger than")
}
