package main

import (
	"bytes"
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"

	"headroom/internal/goldentest"
)

// example is the commented example scenario, relative to this package.
const example = "../../testdata/scenarios/example.toml"

// runCLI runs the program in-process and returns its status and output.
func runCLI(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errb bytes.Buffer
	code = run(args, strings.NewReader(""), &out, &errb)
	return code, out.String(), errb.String()
}

// runJSON runs a command with --format json and decodes its object.
func runJSON(t *testing.T, args ...string) map[string]any {
	t.Helper()
	code, out, errs := runCLI(t, append(args, "--format", "json")...)
	if code != 0 {
		t.Fatalf("headroom %s: status %d, stderr %q", strings.Join(args, " "), code, errs)
	}
	var m map[string]any
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatalf("headroom %s: output is not one JSON object: %v\n%s", strings.Join(args, " "), err, out)
	}
	return m
}

func num(t *testing.T, m map[string]any, key string) float64 {
	t.Helper()
	v, ok := m[key].(float64)
	if !ok {
		t.Fatalf("key %q: %v (%T), want a number", key, m[key], m[key])
	}
	return v
}

// checkClean fails on output no user may see: NaN, Inf, a panic or a Go
// stack.
func checkClean(t *testing.T, what, s string) {
	t.Helper()
	for _, bad := range []string{"NaN", "Inf", "panic", "goroutine ", ".go:"} {
		if strings.Contains(s, bad) {
			t.Errorf("%s: output contains %q:\n%s", what, bad, s)
		}
	}
}

// golden compares got with testdata/<test>/<name>.golden, or rewrites it
// with -update (internal/goldentest).
func golden(t *testing.T, name, got string) {
	t.Helper()
	test := strings.Split(t.Name(), "/")[0]
	goldentest.Check(t, filepath.Join("testdata", test, name+".golden"), got)
}
