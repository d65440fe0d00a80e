// Package spicetest holds what tests that run ngspice share. Only _test.go
// files import it (TestOnlyTestsImport checks), so the testing package
// never reaches a program's build.
package spicetest

import (
	"os"
	"testing"

	"headroom/internal/spice"
)

// Require skips the test when ngspice is missing, with a message saying
// how to install it; when the environment variable CI is "true" a missing
// ngspice fails the test instead, so a check cannot silently vanish there.
func Require(t testing.TB) {
	t.Helper()
	if spice.Available() {
		return
	}
	if os.Getenv("CI") == "true" {
		t.Fatal("spice: ngspice not found on PATH in CI; " + spice.InstallHint)
	}
	t.Skip("spice: ngspice not found; " + spice.InstallHint)
}
