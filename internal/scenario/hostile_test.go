package scenario

import (
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"time"
)

// refusedCheaply runs f, which must fail with headroom's shape refusal,
// and checks it neither took long nor allocated much. Before the guard,
// the 10,000-level file took the TOML library 20 s and 4 GB. The bounds
// are far above what a refusal of the raw text needs (about a
// millisecond and the 40 kB copy of the text) and far below the parse:
// the test fails when the parser is reached, not when the machine is busy.
func refusedCheaply(t *testing.T, what string, f func() error) {
	t.Helper()
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	start := time.Now()
	err := f()
	took := time.Since(start)
	runtime.ReadMemStats(&after)
	if err == nil || !strings.Contains(err.Error(), "refuses the file before reading it") {
		t.Fatalf("%s: got %v, want the shape refusal", what, err)
	}
	if alloc := after.TotalAlloc - before.TotalAlloc; alloc > 8<<20 {
		t.Errorf("%s: the refusal allocated %d bytes, want under 8 MB (the parse took 4 GB)", what, alloc)
	}
	if took > 100*time.Millisecond {
		t.Errorf("%s: the refusal took %v, want under 100 ms (the parse took 20 s)", what, took)
	}
}

// Deep nesting and long dotted keys are refused on the raw text, in every
// way a scenario or a cell file reaches the TOML library.
func TestHostileTOMLRefusedBeforeParsing(t *testing.T) {
	deep := "name = \"x\"\nx = " + strings.Repeat("{a=", 10000) + "1" + strings.Repeat("}", 10000) + "\n"
	dotted := "name = \"x\"\n[" + strings.Repeat("a.", 30000) + "a]\n"
	dir := t.TempDir()
	for _, c := range []struct{ name, text, line string }{{"deep", deep, ":2:"}, {"dotted", dotted, ":2:"}} {
		refusedCheaply(t, c.name+" scenario", func() error {
			_, err := Parse([]byte(c.text), "s.toml", "")
			if err != nil && !strings.Contains(err.Error(), "s.toml"+c.line) {
				t.Errorf("%s: %v does not name the line", c.name, err)
			}
			return err
		})
		cellFile := filepath.Join(dir, c.name+".toml")
		if err := os.WriteFile(cellFile, []byte(c.text), 0o644); err != nil {
			t.Fatal(err)
		}
		// A cell file through a scenario's cell key (as --cell and the
		// screen's cell field resolve it).
		refusedCheaply(t, c.name+" cell file", func() error {
			s := &Scenario{dir: dir}
			_, err := s.ResolveCell(c.name + ".toml")
			return err
		})
		// A [[define_cell]] inside a scenario goes through the same parse.
		refusedCheaply(t, c.name+" in define_cell", func() error {
			_, err := Parse([]byte("[[define_cell]]\nid = \"a\"\n"+c.text[len("name = \"x\"\n"):]), "s.toml", "")
			return err
		})
	}
}
