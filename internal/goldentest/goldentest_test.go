package goldentest

import (
	"os"
	"path/filepath"
	"testing"
)

// failRecorder notes a failure instead of failing the real test.
type failRecorder struct {
	testing.TB
	failed bool
}

func (f *failRecorder) Helper()               {}
func (f *failRecorder) Errorf(string, ...any) { f.failed = true }
func (f *failRecorder) Fatalf(string, ...any) { f.failed = true }

// Check passes on equal text and fails on different or missing files.
func TestCheck(t *testing.T) {
	if Updating() {
		t.Skip("-update rewrites files; nothing to compare")
	}
	path := filepath.Join(t.TempDir(), "x.golden")
	if err := os.WriteFile(path, []byte("same\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		path, got string
		fail      bool
	}{
		{path, "same\n", false},
		{path, "other\n", true},
		{path + ".missing", "same\n", true},
	} {
		r := &failRecorder{TB: t}
		Check(r, c.path, c.got)
		if r.failed != c.fail {
			t.Errorf("Check(%s, %q): failed %v, want %v", filepath.Base(c.path), c.got, r.failed, c.fail)
		}
	}
}
