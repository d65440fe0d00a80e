package scenario

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/units"
	"headroom/protect"
	"headroom/tolerance"
)

// Saved is what a saved scenario holds: one design and its labels.
type Saved struct {
	Name        string
	Note        string
	Design      discharge.Design
	ProtectSpec string
	Budget      float64
	// Tolerances, Samples and Seed are the spread's; those that differ
	// from tolerance.Defaults, DefaultSamples and DefaultSeed are written
	// in a [tolerance] table (nil and 0: none).
	Tolerances []tolerance.Tol
	Samples    int
	Seed       uint64
}

func g(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// Format writes a design as scenario TOML that Parse reads back to the same
// design. A cell that is not in the library is written out in full as a
// [[define_cell]] table.
func Format(s Saved) []byte {
	var b bytes.Buffer
	d := s.Design
	fmt.Fprintf(&b, "# headroom scenario, saved from the interactive screen.\n")
	fmt.Fprintf(&b, "name = %s\n", tomlString(s.Name))
	if s.Note != "" {
		fmt.Fprintf(&b, "note = %s\n", tomlString(s.Note))
	}
	fmt.Fprintf(&b, "cell = %s\n", tomlString(d.Cell.ID))
	fmt.Fprintf(&b, "series = %d\nparallel = %d\n", d.Series, d.Parallel)
	spec := s.ProtectSpec
	if d.Protect != nil {
		spec = protect.Short(d.Protect) // only what differs from the kind's defaults
	}
	if spec == "" {
		spec = "none"
	}
	fmt.Fprintf(&b, "protect = %s\n", tomlString(spec))
	fmt.Fprintf(&b, "floor = %s\n", tomlString(units.Format(d.Floor, units.Voltage)))
	fmt.Fprintf(&b, "temp = \"%sC\"\n", g(d.TempC))
	if d.HoursPerDay > 0 {
		fmt.Fprintf(&b, "hours_per_day = %s\n", g(d.HoursPerDay))
	}
	fmt.Fprintf(&b, "standby = %s\n", tomlString(units.Format(d.Standby, units.Current)))
	if d.PackPrice > 0 || d.PriceGiven {
		fmt.Fprintf(&b, "price = %s\n", g(d.PackPrice))
	}
	if d.ElectricityPrice > 0 {
		fmt.Fprintf(&b, "electricity_price = %s\n", g(d.ElectricityPrice))
	}
	if d.Toy {
		fmt.Fprintf(&b, "toy = true\n")
	}
	if d.MaxInputV > 0 {
		fmt.Fprintf(&b, "max_input = %s\n", tomlString(units.Format(d.MaxInputV, units.Voltage)))
	}
	if d.MinLEDAmps > 0 {
		fmt.Fprintf(&b, "led_min_current = %s\n", tomlString(units.Format(d.MinLEDAmps, units.Current)))
	}
	if d.MaxLEDAmps > 0 {
		fmt.Fprintf(&b, "led_max_current = %s\n", tomlString(units.Format(d.MaxLEDAmps, units.Current)))
	}
	if d.ChargerPrice > 0 {
		fmt.Fprintf(&b, "charger_price = %s\n", g(d.ChargerPrice))
	}
	if s.Budget > 0 {
		fmt.Fprintf(&b, "budget = %s\n", g(s.Budget))
	}
	for _, p := range d.Profile {
		fmt.Fprintf(&b, "\n[[phase]]\n")
		if p.Name != "" {
			fmt.Fprintf(&b, "name = %s\n", tomlString(p.Name))
		}
		fmt.Fprintf(&b, "load = %s\nduration = \"%ss\"\n", tomlString(p.Load.String()), g(p.Seconds))
	}
	writeTolerances(&b, s)
	if lib, ok := curves.Lookup(d.Cell.ID); !ok || lib != d.Cell {
		writeCell(&b, d.Cell)
	}
	return b.Bytes()
}

func writeCell(b *bytes.Buffer, c *curves.Cell) {
	b.WriteString("\n[[define_cell]]\n")
	if err := curves.WriteCellKeys(b, c); err != nil {
		panic("scenario: writing a cell to memory: " + err.Error()) // a bytes.Buffer does not fail
	}
}

// ErrExists is returned by WriteFile when the file exists and overwrite
// was not allowed.
var ErrExists = errors.New("file exists")

// WriteFile writes data to path atomically: a temporary file in the same
// folder, synced, then renamed over path. An existing file is replaced
// only when overwrite is true, and keeps its permissions; if anything fails
// the old file is left as it was.
func WriteFile(path string, data []byte, overwrite bool) error {
	return writeAtomic(path, data, overwrite, func(f *os.File, p []byte) (int, error) { return f.Write(p) })
}

// writeAtomic is WriteFile with the write step injectable for tests.
func writeAtomic(path string, data []byte, overwrite bool, write func(*os.File, []byte) (int, error)) error {
	mode := fs.FileMode(0o644)
	if st, err := os.Stat(path); err == nil {
		if st.IsDir() {
			return fmt.Errorf("%s: is a directory", path)
		}
		if !overwrite {
			return fmt.Errorf("%s: %w", path, ErrExists)
		}
		mode = st.Mode().Perm()
	} else if !errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("%s: %w", path, UnwrapPath(err))
	}
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return fmt.Errorf("%s: cannot create a temporary file beside it: %w", path, UnwrapPath(err))
	}
	name := tmp.Name()
	fail := func(err error) error {
		tmp.Close()
		os.Remove(name)
		return fmt.Errorf("%s: %w", path, err)
	}
	if _, err := write(tmp, data); err != nil {
		return fail(err)
	}
	if err := tmp.Chmod(mode); err != nil {
		return fail(err)
	}
	if err := tmp.Sync(); err != nil {
		return fail(err)
	}
	if err := tmp.Close(); err != nil {
		os.Remove(name)
		return fmt.Errorf("%s: %w", path, err)
	}
	if !overwrite {
		// Link fails if path appeared meanwhile: never replace a file the
		// user did not agree to replace.
		if err := os.Link(name, path); err != nil {
			os.Remove(name)
			if errors.Is(err, fs.ErrExist) {
				return fmt.Errorf("%s: %w", path, ErrExists)
			}
			return fmt.Errorf("%s: %w", path, UnwrapPath(err))
		}
		os.Remove(name)
		return nil
	}
	if err := os.Rename(name, path); err != nil {
		os.Remove(name)
		return fmt.Errorf("%s: %w", path, UnwrapPath(err))
	}
	return nil
}

// writeTolerances writes the [tolerance] table: the tolerances that differ
// from the defaults, and the sample count and seed when not the default.
func writeTolerances(b *bytes.Buffer, s Saved) {
	var lines []string
	for _, t := range s.Tolerances {
		if def, ok := tolerance.Default(t.Name); ok && def != t {
			lines = append(lines, t.Name+" = "+t.TOML())
		}
	}
	if s.Samples > 0 && s.Samples != DefaultSamples {
		lines = append(lines, fmt.Sprintf("samples = %d", s.Samples))
	}
	if s.Samples > 0 && s.Seed != DefaultSeed {
		lines = append(lines, fmt.Sprintf("seed = %d", s.Seed))
	}
	if len(lines) == 0 {
		return
	}
	b.WriteString("\n[tolerance]\n" + strings.Join(lines, "\n") + "\n")
}
