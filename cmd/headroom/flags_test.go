package main

import (
	"errors"
	"strings"
	"testing"

	"headroom/internal/scenario"
	"headroom/protect"
)

// --protect with a bad spec says the flag once and keeps protect's typed
// error in the chain.
func TestProtectFlagErrorKeepsItsType(t *testing.T) {
	fs := newFlags("run")
	addDesignFlags(fs)
	if _, err := parseArgs(fs, []string{"--protect", "pmos:vref=1,vth=2"}); err != nil {
		t.Fatal(err)
	}
	err := applyDesignFlags(fs, scenario.Demo())
	var se *protect.SpecError
	if !errors.As(err, &se) || se.Key != "vref" {
		t.Fatalf("--protect: %v, want a *protect.SpecError about vref", err)
	}
	if !strings.HasPrefix(err.Error(), "--protect: pmos: key \"vref\"") {
		t.Errorf("message %q, want it to start with the flag, then the kind", err)
	}
}
