package main

import (
	"bytes"
	"encoding/json"
	"flag"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden files under testdata/")

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
// with -update.
func golden(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join("testdata", t.Name(), name+".golden")
	if strings.Contains(t.Name(), "/") {
		path = filepath.Join("testdata", strings.Split(t.Name(), "/")[0], name+".golden")
	}
	if *update {
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
		t.Fatalf("%v (run go test -update to create it)", err)
	}
	if got != string(want) {
		t.Errorf("output differs from %s (go test -update rewrites it after a deliberate change)\n--- got:\n%s\n--- want:\n%s", path, got, want)
	}
}
