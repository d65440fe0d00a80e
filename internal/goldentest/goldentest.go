// Package goldentest compares output with golden files under testdata/ and
// rewrites them when the tests run with -update: the one mechanism for
// every package's golden files. Only _test.go files import it.
//
// The -update flag is the one the terminal-test library's golden package
// registers (the screen's tests link it anyway); importing it here makes
// sure the flag exists, once, in every test binary that uses this package.
package goldentest

import (
	"flag"
	"os"
	"path/filepath"
	"testing"

	_ "github.com/charmbracelet/x/exp/golden" // registers -update
)

// Updating reports whether the tests run with -update.
func Updating() bool {
	f := flag.Lookup("update")
	return f != nil && f.Value.String() == "true"
}

// Check compares got with the file at path (under testdata/), or writes
// got there with -update.
func Check(t testing.TB, path, got string) {
	t.Helper()
	if Updating() {
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run the test with -update to create it)", err)
	}
	if got != string(want) {
		t.Errorf("output differs from %s (rerun with -update if the change is meant):\n--- got\n%s\n--- want\n%s", path, got, want)
	}
}
