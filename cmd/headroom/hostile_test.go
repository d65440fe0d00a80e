package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"unicode"
	"unicode/utf8"
)

// tomlString writes s as a TOML basic string, every rune that is not
// printable ASCII as a \U escape, so any name reaches the reader intact.
func tomlString(s string) string {
	var b strings.Builder
	b.WriteByte('"')
	for _, r := range s {
		switch {
		case r == '"' || r == '\\':
			b.WriteByte('\\')
			b.WriteRune(r)
		case r >= 0x20 && r < 0x7f:
			b.WriteRune(r)
		case r >= 0xd800 && r <= 0xdfff:
			// not a Unicode scalar: TOML cannot hold it
		default:
			fmt.Fprintf(&b, "\\U%08X", r)
		}
	}
	b.WriteByte('"')
	return b.String()
}

// fileSafe makes s usable as one file name (no separator, no NUL).
func fileSafe(s string) string {
	s = strings.Map(func(r rune) rune {
		if r == '/' || r == 0 {
			return -1
		}
		return r
	}, s)
	if !utf8.ValidString(s) || len(s) > 100 {
		s = strings.ToValidUTF8(s, "?")
		if len(s) > 100 {
			s = s[:100]
		}
	}
	if s == "" || s == "." || s == ".." {
		s = "x"
	}
	return s
}

// noControl fails when out holds a control character other than a line
// break: an escape sequence from a name would drive the terminal.
func noControl(t *testing.T, what, out string) {
	t.Helper()
	for i, r := range out {
		if r != '\n' && (unicode.IsControl(r) || r == 0x202e) {
			lo := max(0, i-30)
			t.Fatalf("%s: control character %U at byte %d: %q", what, r, i, out[lo:min(len(out), i+30)])
		}
	}
}

// hostileOutputs writes a scenario whose name, note, phase name and own
// cell (id, name, chemistry, source) are name, in a file named after it
// with a cell file named after it, and runs every headless command and
// format on it; every output and every error must be free of control
// characters.
func hostileOutputs(t *testing.T, name string) {
	dir := t.TempDir()
	base := fileSafe(name)
	q := tomlString(name)
	cellPath := filepath.Join(dir, base+".csv")
	if err := os.WriteFile(cellPath, []byte("mAh,V\n0,1.5\n1000,1.2\n2000,0.9\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	text := fmt.Sprintf(`name = %[1]s
note = %[1]s
cell = "own"
[options]
cells = ["own", "lr6", %[2]s]
protect = ["none", "diode"]
[[phase]]
name = %[1]s
load = "100mA"
duration = "2s"
[[phase]]
load = "10mA"
duration = "8s"
[[define_cell]]
id = "own"
name = %[1]s
chemistry = %[1]s
designation = %[1]s
source = %[1]s
curve = [[0, 1.5], [1500, 1.1], [2500, 0.9]]
`, q, tomlString(base+".csv"))
	path := filepath.Join(dir, base+".toml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	var runs [][]string
	for _, f := range []string{"text", "json", "csv", "md"} {
		runs = append(runs,
			[]string{"run", path, "--format", f},
			[]string{"table", path, "--format", f},
			[]string{"compare", path, "--format", f},
			[]string{"cells", "show", cellPath, "--format", f},
		)
	}
	runs = append(runs,
		[]string{"cells", "check", cellPath},
		[]string{"run", "--cell", cellPath},
		[]string{"plot", path, "-o", filepath.Join(dir, "chart.svg"), "--force"},
		[]string{"run", path, "--floor", name},
		[]string{"run", filepath.Join(dir, base+"-missing.toml")},
		[]string{"cells", "check", filepath.Join(dir, base+"-missing.csv")},
	)
	for _, args := range runs {
		code, out, errs := runCLI(t, args...)
		if code != 0 && code != 2 {
			t.Fatalf("%q: status %d", args, code)
		}
		if args[0] != "plot" && len(args) > 2 && args[2] == "--format" && code != 0 {
			t.Fatalf("%q: status %d: %s", args, code, errs)
		}
		noControl(t, strings.Join(args, " ")+" (stdout)", out)
		noControl(t, strings.Join(args, " ")+" (stderr)", errs)
	}
	if b, err := os.ReadFile(filepath.Join(dir, "chart.svg")); err == nil {
		noControl(t, "plot svg", strings.ReplaceAll(string(b), "\t", ""))
	}
}

// A scenario named to set the terminal's title (and cells and files
// named likewise) reach no output with their escape sequences.
func TestNamesReachNoTerminalRaw(t *testing.T) {
	for _, name := range []string{"X\x1b]2;pwned\a", "red\x1b[31mtext\x1b[0m\r\x1b[2K", "c1\u009b2J bidi\u202eexe", "bell\a\x7f\x08"} {
		hostileOutputs(t, name)
	}
}

// FuzzTextOutputsClean: any name, in any of the places a user can give
// one, leaves every text output free of control characters.
func FuzzTextOutputsClean(f *testing.F) {
	f.Add("X\x1b]2;pwned\a")
	f.Add("plain")
	f.Add("\u009b31m\r\n\t")
	f.Fuzz(func(t *testing.T, name string) {
		if len(name) > 200 {
			return
		}
		hostileOutputs(t, name)
	})
}
