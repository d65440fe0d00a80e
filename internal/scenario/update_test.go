package scenario

import (
	"math"
	"os"
	"strings"
	"testing"

	"headroom/internal/guard"
	"headroom/protect"
)

// Saving over the file a design came from changes the design's values and
// keeps the rest: comments, [options], [sweep], the note.
func TestUpdateKeepsTheRest(t *testing.T) {
	const path = "../../testdata/scenarios/example.toml"
	orig, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	s, err := Parse(orig, "example.toml", "../../testdata/scenarios")
	if err != nil {
		t.Fatal(err)
	}
	d := s.Design
	d.Series, d.Floor, d.Standby = 4, 3.3, 2e-5
	d.Protect, _ = protect.Parse("schottky")
	out := Update(orig, &s.Design, Saved{Name: s.Name, Note: s.Note, Design: d, ProtectSpec: "schottky"})
	back, err := Parse(out, "saved.toml", "../../testdata/scenarios")
	if err != nil {
		t.Fatalf("updated file does not parse: %v\n%s", err, out)
	}
	if back.Design.Series != 4 || back.Design.Floor != 3.3 || back.Design.Standby != 2e-5 || back.Design.Protect.Kind() != "schottky" {
		t.Errorf("read back %d series, floor %v, standby %v, %s", back.Design.Series, back.Design.Floor, back.Design.Standby, back.Design.Protect.Spec())
	}
	if back.Note != s.Note || back.Name != s.Name {
		t.Errorf("name %q note %q, want %q %q", back.Name, back.Note, s.Name, s.Note)
	}
	if back.Count() != s.Count() || len(back.Floors) != len(s.Floors) || len(back.Cells) != len(s.Cells) {
		t.Errorf("options or sweeps lost: %d combinations (was %d)", back.Count(), s.Count())
	}
	for _, l := range strings.Split(string(orig), "\n") {
		if c := strings.TrimSpace(l); strings.HasPrefix(c, "#") && !strings.Contains(string(out), c) {
			t.Errorf("comment lost: %q", c)
		}
	}
	if len(back.Design.Profile) != len(s.Design.Profile) {
		t.Errorf("profile %d phases, was %d", len(back.Design.Profile), len(s.Design.Profile))
	}
	// An edited note is written; the rest still stays.
	out = Update(orig, &s.Design, Saved{Name: s.Name, Note: "a new note", Design: d, ProtectSpec: "schottky"})
	if back, err = Parse(out, "saved.toml", "../../testdata/scenarios"); err != nil || back.Note != "a new note" || back.Count() != s.Count() {
		t.Errorf("edited note: %v, note %q, %d combinations", err, back.Note, back.Count())
	}
}

// What headroom writes, headroom reads back: any name and note (control
// characters, quotes, backslashes, non-ASCII) and the design's numbers.
func FuzzSaveRoundTrip(f *testing.F) {
	f.Add("Tumble Pup", "a note", 1.8, 30e-6, 20.0)
	f.Add("bell\a and tab\t", "quote \" back\\slash", 0.0, 0.0, -10.0)
	f.Add("\x00\x1f\x7f", "line\nbreak\r", 2.5, 1e-3, 85.0)
	f.Fuzz(func(t *testing.T, name, note string, floor, standby, temp float64) {
		if !(floor >= 0 && floor <= 1000) || !(standby >= 0 && standby <= 10) || !(temp >= -40 && temp <= 85) {
			return
		}
		s := Demo()
		d := s.Design
		d.Floor, d.Standby, d.TempC = floor, standby, temp
		data := Format(Saved{Name: name, Note: note, Design: d, ProtectSpec: s.ProtectSpec})
		back, err := Parse(data, "fuzz.toml", "")
		if err != nil {
			if name == "" && note == "" {
				return
			}
			t.Fatalf("saved file does not read back: %v\n%s", err, data)
		}
		// The reader drops control characters (guard.Clean, CleanLines):
		// what comes back is what the reader makes of the text written.
		valid := func(x string) string { return strings.ToValidUTF8(x, "\uFFFD") }
		if back.Name != guard.Clean(valid(name)) || back.Note != guard.CleanLines(valid(note)) {
			t.Errorf("name %q note %q read back as %q %q", name, note, back.Name, back.Note)
		}
		if back.Design.Floor != floor || back.Design.Standby != standby || math.Abs(back.Design.TempC-temp) > 0 {
			t.Errorf("floor %v standby %v temp %v read back as %v %v %v", floor, standby, temp, back.Design.Floor, back.Design.Standby, back.Design.TempC)
		}
	})
}
