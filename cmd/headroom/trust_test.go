package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// --price 0 is a free pack, not "the default price".
func TestPriceZeroIsFree(t *testing.T) {
	m := runJSON(t, "run", "--price", "0")
	if p := num(t, m, "pack_price"); p != 0 {
		t.Errorf("--price 0: pack price %v, want 0", p)
	}
	if c := num(t, m, "cost_per_hour"); c != 0 {
		t.Errorf("--price 0: cost per hour %v, want 0 for a free primary pack", c)
	}
}

// A unit typed apart from its value is named as such, not taken for a file.
func TestUnitApartFromValue(t *testing.T) {
	for _, args := range [][]string{{"run", "--load", "2", "A"}, {"run", "--floor", "1.8", "V"}, {"table", "--standby", "30", "uA"}} {
		code, _, errs := runCLI(t, args...)
		if code != 2 || !strings.Contains(errs, "go together") || strings.Contains(errs, "no such file") {
			t.Errorf("headroom %s: status %d, %q: want the value-and-unit message", strings.Join(args, " "), code, errs)
		}
	}
}

func TestVersionFlag(t *testing.T) {
	code, out, errs := runCLI(t, "--version")
	if code != 0 || !strings.HasPrefix(out, "headroom ") || errs != "" {
		t.Errorf("--version: status %d, %q, %q", code, out, errs)
	}
}

// table, compare and plot take run's design flags without a file.
func TestDesignFlagsOnEveryCommand(t *testing.T) {
	code, out, errs := runCLI(t, "table", "--cell", "hr6", "--protect", "schottky", "--format", "json")
	if code != 0 {
		t.Fatalf("table with design flags: status %d, %s", code, errs)
	}
	var rows []map[string]any
	if err := json.Unmarshal([]byte(out), &rows); err != nil {
		t.Fatal(err)
	}
	if len(rows) == 0 {
		t.Fatal("no rows")
	}
	for _, r := range rows {
		if r["cell"] != "hr6" || r["protect"] != "schottky" {
			t.Fatalf("row %v: want every row on hr6 behind a schottky", r)
		}
	}
	if code, _, errs := runCLI(t, "compare", "--load", "200mA", "--floor", "2.0"); code != 0 {
		t.Errorf("compare with design flags: status %d, %s", code, errs)
	}
	out2 := filepath.Join(t.TempDir(), "c.svg")
	if code, _, errs := runCLI(t, "plot", "--load", "200mA", "-o", out2); code != 0 {
		t.Errorf("plot with design flags: status %d, %s", code, errs)
	}
}

// A design from flags is the user's: its title says so, and the toy-safety
// caution comes only for a toy.
func TestDesignFromFlagsIsNotTheDemoToy(t *testing.T) {
	_, out, _ := runCLI(t, "run", "--cell", "cr2032", "--series", "1", "--load", "15mA/0.05s,2uA/9.95s", "--floor", "2.0")
	if strings.Contains(out, "Tumble Pup") || !strings.HasPrefix(out, "Design from the command line") {
		t.Errorf("title: %q", strings.SplitN(out, "\n", 2)[0])
	}
	if strings.Contains(out, "toy-safety standards (IEC 62115") {
		t.Error("a design from flags gets the toy caution without --toy yes")
	}
	_, out, _ = runCLI(t, "run", "--load", "100mA", "--toy", "yes")
	if !strings.Contains(out, "IEC 62115") {
		t.Error("--toy yes: no toy caution")
	}
	_, out, _ = runCLI(t, "run") // the demo itself is a toy
	if !strings.Contains(out, "IEC 62115") || !strings.HasPrefix(out, "Tumble Pup") {
		t.Error("the demo lost its title or its toy caution")
	}
}

// LED limits and the product's maximum input voltage.
func TestLEDAndInputLimits(t *testing.T) {
	base := runJSON(t, "run", "--cell", "lr03", "--series", "3", "--protect", "none", "--load", "led:vf=3.0,r=100", "--floor", "0")
	lit := runJSON(t, "run", "--cell", "lr03", "--series", "3", "--protect", "none", "--load", "led:vf=3.0,r=100", "--floor", "0", "--led-min", "2mA")
	if lit["cutoff_cause"] != "LED too dim" || num(t, lit, "runtime_h") >= num(t, base, "runtime_h") {
		t.Errorf("--led-min 2mA: cause %v, runtime %v h (without %v h): want a shorter run ended by the dim LED",
			lit["cutoff_cause"], lit["runtime_h"], base["runtime_h"])
	}
	hot := runJSON(t, "run", "--cell", "lr03", "--series", "3", "--protect", "none", "--load", "led:vf=3.0,r=10", "--led-max", "20mA")
	if !strings.Contains(strings.Join(strs(hot["warnings"]), " "), "maximum current") {
		t.Errorf("--led-max: warnings %v, want the LED over its maximum", hot["warnings"])
	}
	big := runJSON(t, "run", "--series", "48", "--max-input", "1.8V", "--load", "10mA")
	if !strings.Contains(strings.Join(strs(big["warnings"]), " "), "maximum input voltage") {
		t.Errorf("48×AA into a 1.8 V product: warnings %v", big["warnings"])
	}
}

func strs(v any) []string {
	var out []string
	if xs, ok := v.([]any); ok {
		for _, x := range xs {
			out = append(out, x.(string))
		}
	}
	return out
}

// Numbers for people: no exponent, no run of zeros, no bare "-0", and a
// long runtime in days, months or years rather than tens of thousands of
// hours (a coin-cell remote: radio bursts, a microamp asleep).
func TestNumbersAsAnEngineerWrites(t *testing.T) {
	_, out, _ := runCLI(t, "run", "--cell", "cr2032", "--series", "1", "--protect", "none",
		"--load", "15mA/0.05s,2uA/299.95s", "--floor", "2.0", "--standby", "0", "--hours-per-day", "24")
	for _, bad := range []*regexp.Regexp{regexp.MustCompile(`\de[+-]\d`), regexp.MustCompile(`0\.0000000`), regexp.MustCompile(`-0\b`), regexp.MustCompile(`\d{5,} h`)} {
		if bad.MatchString(out) {
			t.Errorf("run text matches %v:\n%s", bad, out)
		}
	}
	if !regexp.MustCompile(`runtime\s+\S+ (months|years) of continuous use`).MatchString(out) {
		t.Errorf("runtime line: want months or years:\n%s", out)
	}
}

// A never-started design shows "—" and why, not "0.0 %".
func TestNeverStartedShowsDash(t *testing.T) {
	_, out, _ := runCLI(t, "run", "--floor", "3.5")
	if !strings.Contains(out, "stranded   — (the product never starts") || strings.Contains(out, "0.0 % of the reference") {
		t.Errorf("never-started stranded line:\n%s", out)
	}
	m := runJSON(t, "run", "--floor", "3.5")
	if m["stranded_pct"] != nil {
		t.Errorf("stranded_pct %v, want null", m["stranded_pct"])
	}
}

// A saved standby current is written as an engineer types it.
func TestSavedStandbyInEngineeringUnits(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "x.toml")
	if err := os.WriteFile(p, []byte("cell = \"lr6\"\nstandby = 3e-05\nload = \"10mA\"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCLI(t, "run", p)
	if code != 0 || !strings.Contains(out, "standby 30 µA") {
		t.Errorf("standby 3e-05 A reads as %q (status %d, %s)", out, code, errs)
	}
}
