// Package spice runs the ngspice circuit simulator in batch mode so tests
// and cmd/spicebench can compare headroom's closed forms with an
// independent simulation, and reads the numbers back from its output.
// Tests skip or fail on a missing ngspice through internal/spicetest.
//
// Netlists that print values should use a .control block ending in
// "quit 0"; ngspice -b exits with status 1 when a batch run has no .print
// line, and quit 0 makes a clean run exit with 0.
package spice

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"time"
)

// Timeout bounds one ngspice run. The longest check (a current limiter
// under a pulsed profile, the cells' RC branches resolved after every
// pulse edge) takes about 12 s of processor time; the bound leaves room
// for a machine shared with other work.
const Timeout = 120 * time.Second

// InstallHint is what to do when ngspice is missing.
const InstallHint = "install ngspice: apt-get install -y ngspice"

// Available reports whether an ngspice executable is on the PATH.
func Available() bool {
	_, err := exec.LookPath("ngspice")
	return err == nil
}

// Run writes netlist to a temporary file, runs "ngspice -b" on it and
// returns its standard output. A non-zero exit, a timeout or an "Error"
// line in the output is an error carrying the output's tail.
func Run(netlist string) (string, error) {
	dir, err := os.MkdirTemp("", "headroom-spice-")
	if err != nil {
		return "", fmt.Errorf("spice: %w", err)
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "circuit.cir")
	if err := os.WriteFile(path, []byte(netlist), 0o600); err != nil {
		return "", fmt.Errorf("spice: %w", err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), Timeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, "ngspice", "-b", path)
	cmd.Dir = dir
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	err = cmd.Run()
	out := stdout.String()
	if ctx.Err() != nil {
		return out, fmt.Errorf("spice: ngspice timed out after %v", Timeout)
	}
	if err != nil {
		return out, fmt.Errorf("spice: ngspice: %w: %s", err, tail(stderr.String()+out))
	}
	for _, line := range strings.Split(stderr.String()+out, "\n") {
		if strings.HasPrefix(strings.TrimSpace(line), "Error") {
			return out, fmt.Errorf("spice: ngspice reported %q", strings.TrimSpace(line))
		}
	}
	return out, nil
}

func tail(s string) string {
	s = strings.TrimSpace(s)
	if len(s) > 600 {
		s = "…" + s[len(s)-600:]
	}
	return s
}

// ErrMissing is returned by Value when the output holds no such name.
var ErrMissing = errors.New("not in the ngspice output")

// Values reads every "name = number" line of ngspice output, as written by
// .meas results and by print of single values in a .control block
// ("v(1) = 7.584077871211e-01", "vd = 7.5e-01 at= 1.0e-03"). Names are
// lower-cased; when a name repeats (several analyses) the last one wins.
// Lines whose value is not a number are ignored.
func Values(out string) map[string]float64 {
	vals := make(map[string]float64)
	for _, line := range strings.Split(out, "\n") {
		name, rest, ok := strings.Cut(line, "=")
		if !ok {
			continue
		}
		name = strings.ToLower(strings.TrimSpace(name))
		if name == "" || strings.ContainsAny(name, " \t") {
			continue
		}
		fields := strings.Fields(rest)
		if len(fields) == 0 {
			continue
		}
		v, err := strconv.ParseFloat(fields[0], 64)
		if err != nil {
			continue
		}
		vals[name] = v
	}
	return vals
}

// Value returns the named value from ngspice output (see Values).
func Value(out, name string) (float64, error) {
	v, ok := Values(out)[strings.ToLower(name)]
	if !ok {
		return 0, fmt.Errorf("spice: %q: %w", name, ErrMissing)
	}
	return v, nil
}
