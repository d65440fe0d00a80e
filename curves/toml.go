package curves

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"

	"headroom/internal/guard"
	"headroom/internal/limited"
	"headroom/internal/rc"
	"headroom/internal/units"
)

// CellDef is a cell as written in a TOML file. Quantities may be plain
// numbers in the unit the key names (volts, mAh, amperes, ohms, a fraction,
// dollars) or quoted with units ("1.0V", "2.4Ah", "25%"). Only curve (or
// curve_csv) is required; see Cell for the defaults.
type CellDef struct {
	ID          string `toml:"id"`          // default: the file's base name
	Name        string `toml:"name"`        // default: the id
	Chemistry   string `toml:"chemistry"`   // default "custom"
	Designation string `toml:"designation"` // IEC designation, optional

	Nominal      units.Raw `toml:"nominal"`       // V; default: the curve at half its charge
	EndPoint     units.Raw `toml:"end_point"`     // V; default: the last curve voltage
	RatedMAh     units.Raw `toml:"rated_mAh"`     // mAh; default: where the curve crosses end_point
	RatedCurrent units.Raw `toml:"rated_current"` // A; default: ref_current
	RefCurrent   units.Raw `toml:"ref_current"`   // A at which the curve was taken; 0 = rest voltage; default 0

	Peukert       *float64  `toml:"peukert"`        // rate exponent 1–2; default 1
	SelfDischarge units.Raw `toml:"self_discharge"` // fraction per month, or "25%"; default 0

	Rechargeable     bool      `toml:"rechargeable"`
	CycleLife        int       `toml:"cycle_life"`        // rechargeables only
	ChargeEfficiency units.Raw `toml:"charge_efficiency"` // 0–1 or "75%", rechargeables only

	Price  units.Raw `toml:"price"` // dollars per cell; default 0
	Source string    `toml:"source"`

	Curve       [][]float64 `toml:"curve"`       // [[mAh, V], ...]
	CurveCSV    string      `toml:"curve_csv"`   // or a CSV file of points, relative to BaseDir
	Resistance  [][]float64 `toml:"resistance"`  // [[depth 0–1, ohm], ...]
	Temperature [][]float64 `toml:"temperature"` // [[°C, capacity factor, resistance factor], ...]
	RC          [][]float64 `toml:"rc"`          // polarisation branches [[ohm, tau seconds], ...], at most 3

	CutoffV     units.Raw `toml:"cutoff_v"`     // V per cell, the pack protection's under-voltage cut-off; default none
	CutoffDelay units.Raw `toml:"cutoff_delay"` // s (or "50ms") a dip must last to trip it

	HeatCapacity      units.Raw `toml:"heat_capacity"`      // J/K (23 or "23 J/K"), the cell's lumped heat capacity; default 0
	ThermalResistance units.Raw `toml:"thermal_resistance"` // K/W (38 or "38 K/W") to the ambient; default 0: the cell stays at the ambient

	// BaseDir is the directory curve_csv is relative to; the readers set
	// it to the TOML file's directory.
	BaseDir string `toml:"-"`
}

// FieldError is a problem with one key of a cell definition. Point is the
// 1-based entry of an array key (curve, resistance, temperature), 0 for the
// whole key.
type FieldError struct {
	Key   string
	Point int
	Err   error
}

func (e *FieldError) Error() string {
	if e.Point > 0 {
		return fmt.Sprintf("%s point %d: %v", e.Key, e.Point, e.Err)
	}
	return fmt.Sprintf("%s: %v", e.Key, e.Err)
}

func (e *FieldError) Unwrap() error { return e.Err }

// Cell builds and validates the cell. where names the definition in
// messages ("cells.toml" or "scenario.toml [[cell]] 2"); errors read
// "where: key: problem" and wrap a *FieldError.
//
// The id is required here (ReadCellTOML fills it from the file name).
// Defaults: name = id, chemistry "custom", ref_current 0, rated_current = ref_current, peukert 1,
// end_point = the last curve voltage, rated_mAh = the charge where the
// curve crosses end_point, nominal = the curve at half its charge.
func (d *CellDef) Cell(where string) (*Cell, error) {
	c, err := d.build()
	if err != nil {
		return nil, fmt.Errorf("%s: %w", where, err)
	}
	return c, nil
}

func (d *CellDef) build() (*Cell, error) {
	fe := func(key string, point int, format string, a ...any) error {
		return &FieldError{Key: key, Point: point, Err: fmt.Errorf(format, a...)}
	}
	get := func(key string, r units.Raw, kind units.Kind, def float64) (float64, error) {
		if !r.Set() {
			return def, nil
		}
		// A quoted number without a unit is taken in the key's unit,
		// except for percentages, where "25" could mean 25 % or 25.
		v, err := r.Get(kind, kind != units.Fraction)
		if err != nil {
			return 0, &FieldError{Key: key, Err: err}
		}
		return v, nil
	}
	id := strings.TrimSpace(d.ID)
	if id == "" {
		return nil, fe("id", 0, "missing")
	}
	// Every text a file gives reaches a terminal: no control characters.
	c := &Cell{
		ID: guard.Clean(id), Name: guard.Clean(d.Name), Chemistry: guard.Clean(d.Chemistry),
		Designation: guard.Clean(d.Designation), Rechargeable: d.Rechargeable, CycleLife: d.CycleLife,
		Source: guard.Clean(d.Source),
	}
	if c.Name == "" {
		c.Name = id
	}
	if c.Chemistry == "" {
		c.Chemistry = "custom"
	}
	if c.Source == "" {
		c.Source = "user definition"
	}

	// The curve, inline or from a CSV file.
	var csvRes []ResistancePoint
	switch {
	case len(d.Curve) > 0 && d.CurveCSV != "":
		return nil, fe("curve_csv", 0, "give either curve or curve_csv, not both")
	case len(d.Curve) > 0:
		q := make([]float64, len(d.Curve))
		v := make([]float64, len(d.Curve))
		for i, p := range d.Curve {
			if len(p) != 2 {
				return nil, fe("curve", i+1, "want [mAh, V], got %d numbers", len(p))
			}
			q[i], v[i] = p[0], p[1]
		}
		curve, err := NewCurve(q, v)
		if err != nil {
			var ce *CurveError
			if errors.As(err, &ce) && len(q) >= 2 {
				return nil, &FieldError{Key: "curve", Point: ce.Index + 1, Err: err}
			}
			return nil, &FieldError{Key: "curve", Err: err}
		}
		c.Curve = curve
	case d.CurveCSV != "":
		path := d.CurveCSV
		if !filepath.IsAbs(path) {
			path = filepath.Join(d.BaseDir, path)
		}
		pc, err := loadFile(path, ReadCSV)
		if err != nil {
			return nil, &FieldError{Key: "curve_csv", Err: err}
		}
		c.Curve, csvRes = pc.Curve, pc.Resistance
	default:
		return nil, fe("curve", 0, "missing: give curve = [[mAh, V], ...] or curve_csv = \"file.csv\"")
	}

	var err error
	if c.RefCurrent, err = get("ref_current", d.RefCurrent, units.Current, 0); err != nil {
		return nil, err
	}
	if c.RatedCurrent, err = get("rated_current", d.RatedCurrent, units.Current, c.RefCurrent); err != nil {
		return nil, err
	}
	_, lastV := c.Curve.Point(c.Curve.Len() - 1)
	if c.EndPoint, err = get("end_point", d.EndPoint, units.Voltage, lastV); err != nil {
		return nil, err
	}
	if _, firstV := c.Curve.Point(0); c.EndPoint >= firstV {
		return nil, fe("end_point", 0, "%g V is not below the curve's first voltage %g V", c.EndPoint, firstV)
	}
	crossing, _ := c.Curve.ChargeAt(c.EndPoint)
	c.RatedMAh = crossing
	if d.RatedMAh.Set() {
		// A plain number is in mAh, as the key says; with a unit,
		// units.Parse returns Ah.
		if x, perr := strconv.ParseFloat(strings.TrimSpace(d.RatedMAh.String()), 64); perr == nil {
			c.RatedMAh = x
		} else if c.RatedMAh, err = get("rated_mAh", d.RatedMAh, units.Charge, 0); err != nil {
			return nil, err
		} else {
			c.RatedMAh *= 1000
		}
	}
	if c.NominalV, err = get("nominal", d.Nominal, units.Voltage, c.Curve.At(c.Curve.End()/2)); err != nil {
		return nil, err
	}
	c.Peukert = 1
	if d.Peukert != nil {
		c.Peukert = *d.Peukert
	}
	if c.SelfDischarge, err = get("self_discharge", d.SelfDischarge, units.Fraction, 0); err != nil {
		return nil, err
	}
	if c.ChargeEfficiency, err = get("charge_efficiency", d.ChargeEfficiency, units.Fraction, 0); err != nil {
		return nil, err
	}
	if c.Price, err = get("price", d.Price, units.Money, 0); err != nil {
		return nil, err
	}

	switch {
	case len(d.Resistance) > 0 && len(csvRes) > 0:
		return nil, fe("resistance", 0, "curve_csv already has an ohm column; give one or the other")
	case len(csvRes) > 0:
		if c.RefCurrent != 0 {
			return nil, fe("ref_current", 0, "must be 0 (or left out): curve_csv has an ohm column, so its voltages are rest voltages")
		}
		c.Resistance = csvRes
	}
	for i, p := range d.Resistance {
		if len(p) != 2 {
			return nil, fe("resistance", i+1, "want [depth, ohm], got %d numbers", len(p))
		}
		c.Resistance = append(c.Resistance, ResistancePoint{Depth: p[0], Ohm: p[1]})
	}
	for i, p := range d.Temperature {
		if len(p) != 3 {
			return nil, fe("temperature", i+1, "want [°C, capacity factor, resistance factor], got %d numbers", len(p))
		}
		c.Temperature = append(c.Temperature, TempPoint{Celsius: p[0], Capacity: p[1], Resistance: p[2]})
	}
	for i, p := range d.RC {
		if len(p) != 2 {
			return nil, fe("rc", i+1, "want [ohm, tau seconds], got %d numbers", len(p))
		}
		c.RC = append(c.RC, rc.Stage{R: p[0], Tau: p[1]})
	}
	if c.CutoffV, err = get("cutoff_v", d.CutoffV, units.Voltage, 0); err != nil {
		return nil, err
	}
	if c.CutoffDelay, err = get("cutoff_delay", d.CutoffDelay, units.Time, 0); err != nil {
		return nil, err
	}
	// The thermal keys come as a pair: one alone would leave the cell at
	// the ambient without a word, or read an unwritten heat capacity as 0.
	switch {
	case d.HeatCapacity.Set() && !d.ThermalResistance.Set():
		return nil, fe("heat_capacity", 0, "given without thermal_resistance (K/W to the ambient): give both, or neither for a cell at the ambient")
	case d.ThermalResistance.Set() && !d.HeatCapacity.Set():
		return nil, fe("thermal_resistance", 0, "given without heat_capacity (J/K): give both, or neither for a cell at the ambient")
	}
	if c.HeatCapacity, err = thermalGet("heat_capacity", d.HeatCapacity, "J/K"); err != nil {
		return nil, err
	}
	if c.ThermalRes, err = thermalGet("thermal_resistance", d.ThermalResistance, "K/W"); err != nil {
		return nil, err
	}
	if err := c.Validate(); err != nil {
		return nil, validateFieldError(err)
	}
	thinCell(c, false)
	return c, nil
}

// thermalGet reads a thermal key: a plain number in unit (J/K or K/W, which
// internal/units does not know), or the same quoted with that unit ("23
// J/K"). Range checks are Cell.Validate's. 0 when the key is not given.
func thermalGet(key string, r units.Raw, unit string) (float64, error) {
	if !r.Set() {
		return 0, nil
	}
	t := strings.TrimSpace(r.String())
	t = strings.TrimSpace(strings.TrimSuffix(t, unit))
	v, err := strconv.ParseFloat(t, 64)
	if err != nil {
		return 0, &FieldError{Key: key, Err: fmt.Errorf("%q is not a number of %s (write 23 or \"23 %s\")", r.String(), unit, unit)}
	}
	return v, nil
}

// validateFieldError turns a Validate message "key: problem" or "key: point
// N: problem" into a FieldError so readers can find the key's line.
var validateMsg = regexp.MustCompile(`^([a-z_A-Z]+): (?:point (\d+): )?(.*)$`)

func validateFieldError(err error) error {
	m := validateMsg.FindStringSubmatch(err.Error())
	if m == nil {
		return err
	}
	p := 0
	fmt.Sscan(m[2], &p)
	return &FieldError{Key: m[1], Point: p, Err: errors.New(m[3])}
}

// ReadCellTOML reads one cell definition from TOML (top-level keys, see
// CellDef). name is the file's path: it gives the default id, the
// directory curve_csv is relative to, and the place in every message
// ("cell.toml line 4: end_point: ..."). Unknown keys are an error.
func ReadCellTOML(r io.Reader, name string) (*Cell, error) {
	data, err := limited.ReadAll(r, name, MaxFileSize, "a cell file")
	if err != nil {
		return nil, err
	}
	if bytes.IndexByte(data, 0) >= 0 {
		return nil, fmt.Errorf("%s: not a text file (binary data)", name)
	}
	if err := guard.CheckTOML(data); err != nil {
		return nil, fmt.Errorf("%s %w", name, err)
	}
	var d CellDef
	md, err := toml.Decode(string(data), &d)
	if err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			// The message can quote the input, newlines and all.
			msg := oneLine(pe.Message)
			if pe.LastKey != "" {
				return nil, fmt.Errorf("%s line %d: %s: %s", name, pe.Position.Line, pe.LastKey, msg)
			}
			return nil, fmt.Errorf("%s line %d: %s", name, pe.Position.Line, msg)
		}
		// Type mismatches come as plain errors: "toml: line N (last key
		// "k"): incompatible types: ...".
		if m := decodeMsg.FindStringSubmatch(err.Error()); m != nil {
			return nil, fmt.Errorf("%s line %s: %s: %s", name, m[1], m[2], oneLine(m[3]))
		}
		return nil, fmt.Errorf("%s: %s", name, oneLine(err.Error()))
	}
	lines := keyLines(data)
	if und := md.Undecoded(); len(und) > 0 {
		k := und[0].String()
		top := und[0][0]
		if n := lines[top]; n > 0 {
			return nil, fmt.Errorf("%s line %d: unknown key %q", name, n, k)
		}
		return nil, fmt.Errorf("%s: unknown key %q", name, k)
	}
	if d.ID == "" {
		d.ID = cellName(name)
	}
	d.BaseDir = filepath.Dir(name)
	c, err := d.build()
	if err != nil {
		var fe *FieldError
		if errors.As(err, &fe) && lines[fe.Key] > 0 {
			n := lines[fe.Key]
			if fe.Point > 0 {
				n = entryLine(data, n, fe.Point)
			}
			return nil, fmt.Errorf("%s line %d: %w", name, n, err)
		}
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	return c, nil
}

var decodeMsg = regexp.MustCompile(`^toml: line (\d+) \(last key "([^"]+)"\): (.*)$`)

// keyLine matches "key =" at the start of a line, the key bare or quoted,
// and header matches a [table] or [[array]] header line.
var (
	keyLine = regexp.MustCompile(`^\s*(?:"([^"]+)"|'([^']+)'|([A-Za-z0-9_-]+))\s*=`)
	header  = regexp.MustCompile(`^\s*\[\[?\s*([A-Za-z0-9_.-]+)\s*\]\]?\s*(?:#.*)?$`)
)

// keyLines maps each top-level key, and each table name, to the line it
// first appears on. The TOML library keeps key positions to itself, so
// this scans the text; top-level keys all come before the first table.
func keyLines(data []byte) map[string]int {
	out := map[string]int{}
	inTable := false
	for i, ln := range strings.Split(string(data), "\n") {
		var k string
		if m := header.FindStringSubmatch(ln); m != nil {
			inTable, k = true, strings.SplitN(m[1], ".", 2)[0]
		} else if m := keyLine.FindStringSubmatch(ln); m != nil && !inTable {
			k = m[1] + m[2] + m[3]
		}
		if _, seen := out[k]; k != "" && !seen {
			out[k] = i + 1
		}
	}
	return out
}

// entryLine finds the line of the point-th inner array of the array of
// arrays whose key is on line keyLine (1-based), as in
// curve = [[0, 1.5], [100, 1.4]]. It returns keyLine when it cannot tell.
func entryLine(data []byte, keyLine, point int) int {
	lines := strings.Split(string(data), "\n")
	depth, count := 0, 0
	started := false
	for n := keyLine; n <= len(lines); n++ {
		text := lines[n-1]
		if n == keyLine {
			eq := strings.IndexByte(text, '=')
			if eq < 0 {
				return keyLine
			}
			text = text[eq+1:]
		}
		for _, r := range text {
			switch r {
			case '#':
				goto nextLine
			case '"', '\'':
				return keyLine // strings inside: not a plain number array
			case '[':
				depth++
				started = true
				if depth == 2 {
					count++
					if count == point {
						return n
					}
				}
			case ']':
				depth--
				if started && depth == 0 {
					return keyLine
				}
			}
		}
	nextLine:
	}
	return keyLine
}

// Load reads a cell file, choosing the format by extension: ".csv" for
// ReadCSV points, ".toml" for ReadCellTOML. Files over MaxFileSize,
// directories and unknown extensions are errors naming the path.
func Load(path string) (*Cell, error) {
	var read func(io.Reader, string) (*Cell, error)
	switch strings.ToLower(filepath.Ext(path)) {
	case ".csv":
		read = ReadCSV
	case ".toml":
		read = ReadCellTOML
	}
	return loadFile(path, read)
}

// loadFile reads path within MaxFileSize, then with read (nil: an unknown
// type, named after the read so that a folder or a FIFO is named as such
// whatever its extension).
func loadFile(path string, read func(io.Reader, string) (*Cell, error)) (*Cell, error) {
	data, err := limited.ReadFile(path, MaxFileSize, "a cell file (.csv or .toml)")
	if err != nil {
		return nil, err
	}
	if read == nil {
		return nil, fmt.Errorf("%s: unknown cell file type %q: want .csv or .toml", path, filepath.Ext(path))
	}
	return read(bytes.NewReader(data), path)
}
