// Package scenario reads and writes headroom's scenario files (TOML): one
// design, the options and sweeps a runtime table runs over, and the user's
// own cells. The command line and the interactive screen share it, so a
// flag and a screen field go through the same parse and validate functions.
package scenario

import (
	_ "embed"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/guard"
	"headroom/internal/limited"
	"headroom/internal/units"
	"headroom/protect"
	"headroom/tolerance"
)

//go:embed demo.toml
var demoTOML []byte

// DemoTOML is the built-in demo scenario's file text.
func DemoTOML() []byte { return append([]byte(nil), demoTOML...) }

// MaxFileSize is the largest scenario file read, in bytes.
const MaxFileSize = 1 << 20

// Scenario is one product and the choices to compare for it.
type Scenario struct {
	Name string
	Note string
	Path string // file it came from; "" for the demo

	// The design as chosen: the first option of every list.
	Design      discharge.Design
	CellRef     string // as written: library id or path
	ProtectSpec string
	LoadSpec    string // profile syntax of discharge.ParseProfile

	FileCells []*curves.Cell // cells defined in or referenced by the file

	// Options and sweeps; each has at least one entry.
	Cells        []*curves.Cell
	Series       []int
	Parallel     []int
	Protects     []protect.Element
	ProtectSpecs []string // protect.Short of each Protects entry, for labels
	Loads        [][]discharge.Phase
	LoadSpecs    []string
	Floors       []float64
	Temps        []float64
	LoadScales   []float64

	Budget float64 // dollars for cells + protection; 0 for none

	// Tolerances are the spreads of parts and conditions (the [tolerance]
	// table over tolerance.Defaults), with the spread's sample count and
	// seed.
	Tolerances []tolerance.Tol
	Samples    int
	Seed       uint64

	// OptionKeys are the keys written in the file's [options] table
	// ("cells", "protect", ...), so that a search can tell a list the
	// user narrowed from the design's own single value.
	OptionKeys []string
	// Pick holds the [pick] table's settings as written, in file order,
	// for the pick command to read with the same parsers as its flags.
	Pick []Setting

	dir string
}

// Setting is one key of a table read as text: its key, its value as
// written (numbers and booleans in Go's shortest form) and its line.
type Setting struct {
	Key, Value string
	Line       int
}

// DefaultSamples and DefaultSeed are the spread's sample count and seed
// when the [tolerance] table does not give them.
const (
	DefaultSamples = 2000
	DefaultSeed    = 1
)

type phaseDef struct {
	Name     string    `toml:"name"`
	Load     string    `toml:"load"`
	Duration units.Raw `toml:"duration"`
}

type optionsDef struct {
	Cells    []string `toml:"cells"`
	Series   []int    `toml:"series"`
	Parallel []int    `toml:"parallel"`
	Protect  []string `toml:"protect"`
	Loads    []string `toml:"loads"`
}

// pickDef is the [pick] table: the search's target and limits, checked
// by the pick command's parsers (the same as its flags).
type pickDef struct {
	Need          units.Raw `toml:"need"`
	At            string    `toml:"at"`
	Budget        units.Raw `toml:"budget"`
	MaxCells      int       `toml:"max_cells"`
	MaxParallel   int       `toml:"max_parallel"`
	MaxStranded   units.Raw `toml:"max_stranded"`
	MaxJunction   units.Raw `toml:"max_junction"`
	BlockReversed bool      `toml:"block_reversed"`
	MaxInput      units.Raw `toml:"max_input"`
	By            string    `toml:"by"`
	Top           int       `toml:"top"`
}

type sweepDef struct {
	Floor     sweepValues `toml:"floor"`
	Temp      sweepValues `toml:"temp"`
	LoadScale sweepValues `toml:"load_scale"`
}

type fileDef struct {
	Name        string           `toml:"name"`
	Note        string           `toml:"note"`
	Cell        string           `toml:"cell"`
	Series      int              `toml:"series"`
	Parallel    int              `toml:"parallel"`
	Protect     string           `toml:"protect"`
	Load        string           `toml:"load"`
	Phase       []phaseDef       `toml:"phase"`
	Floor       units.Raw        `toml:"floor"`
	Temp        units.Raw        `toml:"temp"`
	HoursPerDay units.Raw        `toml:"hours_per_day"`
	Standby     units.Raw        `toml:"standby"`
	Price       units.Raw        `toml:"price"`
	Electricity units.Raw        `toml:"electricity_price"`
	Charger     units.Raw        `toml:"charger_price"`
	Toy         bool             `toml:"toy"`
	MaxInput    units.Raw        `toml:"max_input"`
	LEDMin      units.Raw        `toml:"led_min_current"`
	LEDMax      units.Raw        `toml:"led_max_current"`
	Budget      units.Raw        `toml:"budget"`
	Options     optionsDef       `toml:"options"`
	Sweep       sweepDef         `toml:"sweep"`
	Pick        pickDef          `toml:"pick"`
	Cells       []curves.CellDef `toml:"define_cell"`
	Tolerance   map[string]any   `toml:"tolerance"`
}

// sweepValues is a list of values or a {from, to, step} range, decoded
// later with the kind its key needs.
type sweepValues struct {
	list          []units.Raw
	from, to, stp units.Raw
	isRange, set  bool
}

func (s *sweepValues) UnmarshalTOML(v any) error {
	s.set = true
	switch x := v.(type) {
	case []any:
		for _, e := range x {
			var r units.Raw
			if err := r.UnmarshalTOML(e); err != nil {
				return err
			}
			s.list = append(s.list, r)
		}
	case map[string]any:
		s.isRange = true
		for k, e := range x {
			var r units.Raw
			if err := r.UnmarshalTOML(e); err != nil {
				return fmt.Errorf("%s: %w", k, err)
			}
			switch k {
			case "from":
				s.from = r
			case "to":
				s.to = r
			case "step":
				s.stp = r
			default:
				return fmt.Errorf("unknown key %q in a range (keys from, to, step)", k)
			}
		}
		if !s.from.Set() || !s.to.Set() || !s.stp.Set() {
			return fmt.Errorf("a range needs from, to and step")
		}
	default:
		var r units.Raw
		if err := r.UnmarshalTOML(v); err != nil {
			return err
		}
		s.list = []units.Raw{r}
	}
	return nil
}

// values expands the sweep; at most 10000 values.
func (s sweepValues) values(kind units.Kind, bare bool) ([]float64, error) {
	if !s.isRange {
		out := make([]float64, 0, len(s.list))
		for _, r := range s.list {
			v, err := r.Get(kind, bare)
			if err != nil {
				return nil, err
			}
			out = append(out, v)
		}
		return out, nil
	}
	from, err := s.from.Get(kind, bare)
	if err != nil {
		return nil, fmt.Errorf("from: %w", err)
	}
	to, err := s.to.Get(kind, bare)
	if err != nil {
		return nil, fmt.Errorf("to: %w", err)
	}
	step, err := s.stp.Get(kind, bare)
	if err != nil {
		return nil, fmt.Errorf("step: %w", err)
	}
	if !(step > 0) {
		return nil, fmt.Errorf("step %v must be above 0", step)
	}
	if to < from {
		return nil, fmt.Errorf("to %v is below from %v", to, from)
	}
	n := int(math.Floor((to-from)/step+1e-9)) + 1
	if n > 10000 {
		return nil, fmt.Errorf("%d values: at most 10000", n)
	}
	out := make([]float64, n)
	for i := range out {
		// Round to 12 significant digits so 1.6 + 3·0.1 prints as 1.9.
		out[i] = units.RoundSig(from+float64(i)*step, 12)
	}
	return out, nil
}

// Demo returns the built-in demo scenario.
func Demo() *Scenario {
	s, err := Parse(demoTOML, "demo.toml", "")
	if err != nil {
		panic("scenario: built-in demo: " + err.Error())
	}
	s.Path = ""
	return s
}

// Load reads a scenario file.
func Load(path string) (*Scenario, error) {
	data, err := limited.ReadFile(path, MaxFileSize, "a scenario file (.toml)")
	if err != nil {
		return nil, err
	}
	s, err := Parse(data, path, filepath.Dir(path))
	if err != nil {
		return nil, err
	}
	s.Path = path
	return s, nil
}

// UnwrapPath returns the reason inside an *os.PathError (the path is
// named in the message already), or err itself: limited.UnwrapPath.
func UnwrapPath(err error) error { return limited.UnwrapPath(err) }

// Parse reads a scenario from data; name is used in messages and dir is
// the folder relative cell paths start from.
func Parse(data []byte, name, dir string) (*Scenario, error) {
	if len(data) > MaxFileSize {
		return nil, fmt.Errorf("%s: larger than the %d-byte limit for a scenario file (.toml)", name, MaxFileSize)
	}
	if i := strings.IndexByte(string(data), 0); i >= 0 {
		return nil, fmt.Errorf("%s: binary data (a NUL byte at offset %d), expected a TOML text file", name, i)
	}
	var se *guard.ShapeError
	if err := guard.CheckTOML(data); errors.As(err, &se) {
		return nil, fmt.Errorf("%s:%d: %s", name, se.Line, se.Reason)
	}
	var f fileDef
	md, err := toml.Decode(string(data), &f)
	if err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			return nil, fmt.Errorf("%s:%d: %s", name, pe.Position.Line, oneLine(pe.Message))
		}
		// Type mismatches come as "toml: line N (last key "k"): ...".
		if m := tomlLineErr.FindStringSubmatch(oneLine(err.Error())); m != nil {
			return nil, fmt.Errorf("%s:%s: %s: %s", name, m[1], m[2], m[3])
		}
		return nil, fmt.Errorf("%s: %s", name, oneLine(err.Error()))
	}
	if len(md.Keys()) == 0 {
		return nil, fmt.Errorf("%s: no settings in the file: expected keys such as cell, load and floor", name)
	}
	var und []toml.Key
	for _, k := range md.Undecoded() {
		// Inline tables inside [tolerance] are decoded into map[string]any
		// and read by readTolerances, which names its own unknown keys.
		if len(k) > 2 && k[0] == "tolerance" {
			continue
		}
		und = append(und, k)
	}
	if len(und) > 0 {
		k := und[0].String()
		return nil, fmt.Errorf("%s:%d: unknown key %q", name, lineOf(data, und[0][len(und[0])-1]), k)
	}
	at := func(key string, err error) error {
		return fmt.Errorf("%s:%d: %s: %w", name, lineOf(data, key), key, err)
	}
	s := &Scenario{Name: guard.Clean(f.Name), Note: guard.CleanLines(f.Note), dir: dir}
	for _, k := range []string{"cells", "series", "parallel", "protect", "loads"} {
		if md.IsDefined("options", k) {
			s.OptionKeys = append(s.OptionKeys, k)
		}
	}
	s.Pick = pickSettings(f.Pick, md, data)

	if n := len(f.Cells); n > MaxCells {
		return nil, fmt.Errorf("%s: %d [[define_cell]] tables, at most %d", name, n, MaxCells)
	}
	if n := len(f.Options.Cells); n > MaxCells {
		return nil, fmt.Errorf("%s:%d: options.cells: %d cells, at most %d", name, lineOf(data, "cells"), n, MaxCells)
	}
	for _, o := range []struct {
		key string
		n   int
	}{{"series", len(f.Options.Series)}, {"parallel", len(f.Options.Parallel)}, {"protect", len(f.Options.Protect)}, {"loads", len(f.Options.Loads)}} {
		if o.n > MaxOptions {
			return nil, fmt.Errorf("%s:%d: options.%s: %d entries, at most %d", name, lineOf(data, o.key), o.key, o.n, MaxOptions)
		}
	}
	// Cells defined in the file come first, so a design can name them.
	for i := range f.Cells {
		f.Cells[i].BaseDir = dir
		c, err := f.Cells[i].Cell(fmt.Sprintf("%s [[define_cell]] %d", name, i+1))
		if err != nil {
			return nil, err
		}
		s.FileCells = append(s.FileCells, c)
	}

	d := &s.Design
	s.CellRef = orDefault(f.Cell, "lr6")
	cellRefs := f.Options.Cells
	if len(cellRefs) == 0 {
		cellRefs = []string{s.CellRef}
	} else if f.Cell == "" {
		s.CellRef = cellRefs[0]
	}
	for _, ref := range cellRefs {
		c, err := s.ResolveCell(ref)
		if err != nil {
			return nil, at("cell", err)
		}
		s.Cells = append(s.Cells, c)
	}
	if d.Cell, err = s.ResolveCell(s.CellRef); err != nil {
		return nil, at("cell", err)
	}
	if n := len(s.FileCells); n > MaxCells {
		return nil, at("cell", fmt.Errorf("%d cells of your own (defined and from files), at most %d", n, MaxCells))
	}

	d.Series, d.Parallel = f.Series, f.Parallel
	// A missing key means 1; a written 0 is an error CheckSeries reports.
	if d.Series == 0 && !md.IsDefined("series") {
		d.Series = 1
	}
	if d.Parallel == 0 && !md.IsDefined("parallel") {
		d.Parallel = 1
	}
	if err := CheckSeries(d.Series); err != nil {
		return nil, at("series", err)
	}
	if err := CheckParallel(d.Parallel); err != nil {
		return nil, at("parallel", err)
	}
	s.Series = orInts(f.Options.Series, d.Series)
	s.Parallel = orInts(f.Options.Parallel, d.Parallel)
	for _, n := range s.Series {
		if err := CheckSeries(n); err != nil {
			return nil, at("series", err)
		}
	}
	for _, n := range s.Parallel {
		if err := CheckParallel(n); err != nil {
			return nil, at("parallel", err)
		}
	}

	s.ProtectSpec = orDefault(f.Protect, "none")
	specs := f.Options.Protect
	if len(specs) == 0 {
		specs = []string{s.ProtectSpec}
	} else if f.Protect == "" {
		s.ProtectSpec = specs[0]
	}
	for _, spec := range specs {
		el, err := protect.Parse(spec)
		if err != nil {
			return nil, at("protect", protect.Unprefixed(err))
		}
		s.Protects = append(s.Protects, el)
		s.ProtectSpecs = append(s.ProtectSpecs, protect.Short(el))
	}
	if d.Protect, err = protect.Parse(s.ProtectSpec); err != nil {
		return nil, at("protect", protect.Unprefixed(err))
	}

	switch {
	case f.Load != "" && len(f.Phase) > 0:
		return nil, at("load", fmt.Errorf("give either load = \"...\" or [[phase]] tables, not both"))
	case len(f.Phase) > 0:
		if err := CheckPhases(len(f.Phase)); err != nil {
			return nil, fmt.Errorf("%s:%d: [[phase]]: %w", name, lineOf(data, "load"), err)
		}
		for i, p := range f.Phase {
			l, err := discharge.ParseLoad(p.Load)
			if err == nil {
				err = discharge.CheckDemand(l)
			}
			if err != nil {
				return nil, fmt.Errorf("%s: [[phase]] %d: %w", name, i+1, err)
			}
			sec, err := p.Duration.Get(units.Time, false)
			if !p.Duration.Set() {
				err = fmt.Errorf("duration missing, e.g. duration = \"3s\"")
			}
			if err == nil && !(sec > 0) {
				err = fmt.Errorf("duration %s must be above 0 s", p.Duration)
			}
			if err != nil {
				return nil, fmt.Errorf("%s: [[phase]] %d: duration: %w", name, i+1, err)
			}
			d.Profile = append(d.Profile, discharge.Phase{Name: guard.Clean(p.Name), Load: l, Seconds: sec})
		}
		s.LoadSpec = discharge.FormatProfile(d.Profile)
	default:
		s.LoadSpec = orDefault(f.Load, "100mA")
		if d.Profile, err = ParseProfile(s.LoadSpec); err != nil {
			return nil, at("load", err)
		}
	}
	s.Loads = [][]discharge.Phase{d.Profile}
	s.LoadSpecs = []string{s.LoadSpec}
	for i, spec := range f.Options.Loads {
		ph, err := ParseProfile(spec)
		if err != nil {
			return nil, fmt.Errorf("%s:%d: options.loads entry %d: %w", name, lineOf(data, "loads"), i+1, err)
		}
		if i == 0 {
			s.Loads, s.LoadSpecs = nil, nil
		}
		s.Loads = append(s.Loads, ph)
		s.LoadSpecs = append(s.LoadSpecs, guard.Clean(spec))
	}

	type field struct {
		key  string
		raw  units.Raw
		kind units.Kind
		bare bool
		dst  *float64
		def  float64
		chk  func(float64) error
	}
	fields := []field{
		{"floor", f.Floor, units.Voltage, true, &d.Floor, 0, CheckFloor},
		{"temp", f.Temp, units.Temperature, true, &d.TempC, 20, CheckTemp},
		{"hours_per_day", f.HoursPerDay, units.Time, false, &d.HoursPerDay, 0, nil},
		{"standby", f.Standby, units.Current, true, &d.Standby, 0, CheckStandby},
		{"price", f.Price, units.Money, true, &d.PackPrice, 0, CheckPrice},
		{"electricity_price", f.Electricity, units.Money, true, &d.ElectricityPrice, 0, CheckPrice},
		{"charger_price", f.Charger, units.Money, true, &d.ChargerPrice, 0, CheckPrice},
		{"max_input", f.MaxInput, units.Voltage, true, &d.MaxInputV, 0, CheckMaxInput},
		{"led_min_current", f.LEDMin, units.Current, false, &d.MinLEDAmps, 0, CheckLEDCurrent},
		{"led_max_current", f.LEDMax, units.Current, false, &d.MaxLEDAmps, 0, CheckLEDCurrent},
		{"budget", f.Budget, units.Money, true, &s.Budget, 0, CheckPrice},
	}
	for _, fl := range fields {
		*fl.dst = fl.def
		if !fl.raw.Set() {
			continue
		}
		if fl.key == "hours_per_day" {
			v, err := ParseHoursPerDay(fl.raw.String())
			if err != nil {
				return nil, at(fl.key, err)
			}
			*fl.dst = v
			continue
		}
		v, err := fl.raw.Get(fl.kind, fl.bare)
		if err == nil && fl.chk != nil {
			err = fl.chk(v)
		}
		if err != nil {
			return nil, at(fl.key, err)
		}
		*fl.dst = v
	}

	d.PriceGiven = f.Price.Set()
	d.Toy = f.Toy

	sweep := func(key string, sv sweepValues, kind units.Kind, def float64, chk func(float64) error) ([]float64, error) {
		if !sv.set {
			return []float64{def}, nil
		}
		vs, err := sv.values(kind, true)
		if err == nil && len(vs) == 0 {
			err = fmt.Errorf("empty list")
		}
		for _, v := range vs {
			if err == nil && chk != nil {
				err = chk(v)
			}
		}
		if err != nil {
			return nil, fmt.Errorf("%s:%d: sweep %s: %w", name, lineOf(data, key), key, err)
		}
		return vs, nil
	}
	if s.Floors, err = sweep("floor", f.Sweep.Floor, units.Voltage, d.Floor, CheckFloor); err != nil {
		return nil, err
	}
	if s.Temps, err = sweep("temp", f.Sweep.Temp, units.Temperature, d.TempC, CheckTemp); err != nil {
		return nil, err
	}
	if s.LoadScales, err = sweep("load_scale", f.Sweep.LoadScale, units.Fraction, 1, CheckScale); err != nil {
		return nil, err
	}
	// A scale can push a load out of its range (2 A × 1000): say so now,
	// not row by row in a table. Every load's range is an upper bound on
	// its demand, so the largest scale is the one to check (checking all
	// 10,000 scales of every load took seconds).
	top := slices.Max(s.LoadScales)
	for i, p := range s.Loads {
		for j, ph := range ScaleProfile(p, top) {
			if err := ph.Load.Validate(); err != nil {
				return nil, fmt.Errorf("%s:%d: sweep load_scale %v of load %q phase %d: %w",
					name, lineOf(data, "load_scale"), top, s.LoadSpecs[i], j+1, err)
			}
		}
	}
	if err := d.Validate(); err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	if err := s.readTolerances(f.Tolerance, func(key string, err error) error {
		return fmt.Errorf("%s:%d: [tolerance] %w", name, lineInTable(data, "tolerance", key), err)
	}); err != nil {
		return nil, err
	}
	return s, nil
}

// pickSettings lists the [pick] keys the file sets, in the order of
// pickDef, with their values as text and their lines.
func pickSettings(p pickDef, md toml.MetaData, data []byte) []Setting {
	vals := []struct {
		key string
		val string
	}{
		{"need", p.Need.String()}, {"at", p.At}, {"budget", p.Budget.String()},
		{"max_cells", strconv.Itoa(p.MaxCells)}, {"max_parallel", strconv.Itoa(p.MaxParallel)},
		{"max_stranded", p.MaxStranded.String()}, {"max_junction", p.MaxJunction.String()},
		{"block_reversed", strconv.FormatBool(p.BlockReversed)}, {"max_input", p.MaxInput.String()},
		{"by", p.By}, {"top", strconv.Itoa(p.Top)},
	}
	var out []Setting
	for _, v := range vals {
		if md.IsDefined("pick", v.key) {
			out = append(out, Setting{Key: v.key, Value: v.val, Line: lineInTable(data, "pick", v.key)})
		}
	}
	return out
}

// readTolerances sets s.Tolerances, Samples and Seed from the [tolerance]
// table (nil: the defaults). at names the key and its line.
func (s *Scenario) readTolerances(tab map[string]any, at func(key string, err error) error) error {
	s.Tolerances, s.Samples, s.Seed = tolerance.Defaults(), DefaultSamples, DefaultSeed
	keys := make([]string, 0, len(tab))
	for k := range tab {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		v := tab[k]
		switch k {
		case "samples":
			n, ok := v.(int64)
			if !ok || n < 1 || n > tolerance.MaxSamples {
				return at(k, fmt.Errorf("samples: %v must be a whole number from 1 to %d", v, tolerance.MaxSamples))
			}
			s.Samples = int(n)
		case "seed":
			n, ok := v.(int64)
			if !ok || n < 0 {
				return at(k, fmt.Errorf("seed: %v must be a whole number, 0 or more", v))
			}
			s.Seed = uint64(n)
		default:
			if _, ok := tolerance.Default(k); !ok {
				return at(k, fmt.Errorf("unknown key %q: expected samples, seed or a tolerance (%s)", k, strings.Join(tolerance.Names(), ", ")))
			}
			t, err := tolerance.Parse(k, v)
			if err != nil {
				return at(k, err)
			}
			s.Tolerances = tolerance.With(s.Tolerances, t)
		}
	}
	return nil
}

// FindCell resolves a library id, or a .csv or .toml cell file path
// relative to the working folder: ResolveCell with no scenario around it.
func FindCell(ref string) (*curves.Cell, error) { return (&Scenario{}).ResolveCell(ref) }

// ResolveCell finds a cell by library id, by the id of a cell defined in
// the file, or as a path to a .csv or .toml cell file (relative to the
// scenario's folder).
func (s *Scenario) ResolveCell(ref string) (*curves.Cell, error) {
	ref = strings.TrimSpace(ref)
	for _, c := range s.FileCells {
		if c.ID == ref {
			return c, nil
		}
	}
	if c, ok := curves.Lookup(ref); ok {
		return c, nil
	}
	ext := strings.ToLower(filepath.Ext(ref))
	if ext != ".csv" && ext != ".toml" {
		return nil, fmt.Errorf("unknown cell %q: not a library id (%s) nor a .csv or .toml file", ref, strings.Join(curves.IDs(), ", "))
	}
	p := ref
	if !filepath.IsAbs(p) && s.dir != "" {
		p = filepath.Join(s.dir, p)
	}
	c, err := curves.Load(p)
	if err != nil {
		return nil, err
	}
	for _, fc := range s.FileCells {
		if fc == c || fc.ID == c.ID {
			return fc, nil
		}
	}
	s.FileCells = append(s.FileCells, c)
	return c, nil
}

// Field checks shared by flags, files and screen fields. The ranges live
// in discharge (ranges.go); these name them for the readers here.

func CheckSeries(n int) error      { return discharge.CheckSeries(n) }
func CheckParallel(n int) error    { return discharge.CheckParallel(n) }
func CheckFloor(v float64) error   { return discharge.CheckFloor(v) }
func CheckTemp(v float64) error    { return discharge.CheckTemp(v) }
func CheckStandby(v float64) error { return discharge.CheckStandby(v) }
func CheckPrice(v float64) error   { return discharge.CheckPrice(v) }

// CheckScale checks a load scale (a sweep's factor on every phase).
func CheckScale(v float64) error {
	if !(v > 0) || v > 1000 {
		return fmt.Errorf("load scale %v: must be above 0 and at most 1000 (×)", v)
	}
	return nil
}

// MaxCells is the most cells a scenario may define ([[define_cell]]), list
// in its options, or bring in from files, together: the screen's line-up
// evaluates each whenever it is shown after a change.
const MaxCells = 16

// MaxOptions is the most entries any other [options] list may have.
const MaxOptions = 1000

// CheckPhases checks the number of phases in a load profile.
func CheckPhases(n int) error {
	if n > discharge.MaxPhases {
		return fmt.Errorf("%d phases: a load profile has at most %d", n, discharge.MaxPhases)
	}
	return nil
}

// ParseProfile reads a load or a profile (discharge.ParseProfile) of at
// most discharge.MaxPhases phases.
func ParseProfile(s string) ([]discharge.Phase, error) {
	if n := strings.Count(s, "/"); n > discharge.MaxPhases {
		return nil, CheckPhases(n) // refused before parsing a huge string
	}
	p, err := discharge.ParseProfile(s)
	if err != nil {
		return nil, err
	}
	for _, ph := range p {
		if err := discharge.CheckDemand(ph.Load); err != nil {
			return nil, err
		}
	}
	return p, CheckPhases(len(p))
}

// ParseFloor reads a floor voltage ("1.8V" or "1.8").
func ParseFloor(s string) (float64, error) { return parseChecked(s, units.Voltage, CheckFloor) }

// ParseTemp reads an ambient temperature ("20C", "-10°C" or "20").
func ParseTemp(s string) (float64, error) { return parseChecked(s, units.Temperature, CheckTemp) }

func CheckMaxInput(v float64) error   { return discharge.CheckMaxInput(v) }
func CheckLEDCurrent(v float64) error { return discharge.CheckLEDCurrent(v) }

// ParseStandby reads a standby current ("30uA"; a bare number is amperes).
func ParseStandby(s string) (float64, error) { return parseChecked(s, units.Current, CheckStandby) }

// ParsePrice reads dollars ("1.10" or "$1.10").
func ParsePrice(s string) (float64, error) { return parseChecked(s, units.Money, CheckPrice) }

// ParseHoursPerDay reads hours of use a day: a bare number of hours, or a
// time such as "90min" or "1.5h"; above 0 and at most 24.
func ParseHoursPerDay(s string) (float64, error) {
	v, err := units.Parse(s, units.Time, true)
	if err != nil {
		return 0, err
	}
	t := strings.TrimSpace(s)
	if last := t[len(t)-1]; last >= '0' && last <= '9' || last == '.' {
		v *= 3600 // a bare number means hours here
	}
	h := v / 3600
	if discharge.CheckHoursPerDay(h) != nil {
		return 0, fmt.Errorf("%s hours a day: must be above 0 and at most %g (at least 1 s)", s, discharge.MaxHoursPerDay)
	}
	return h, nil
}

// ParseCount reads a cell count for series or parallel.
func ParseCount(s string, check func(int) error) (int, error) {
	var n int
	if _, err := fmt.Sscanf(strings.TrimSpace(s), "%d", &n); err != nil || fmt.Sprint(n) != strings.TrimSpace(s) {
		return 0, fmt.Errorf("%q is not a whole number", s)
	}
	return n, check(n)
}

func parseChecked(s string, k units.Kind, chk func(float64) error) (float64, error) {
	v, err := units.Parse(s, k, true)
	if err != nil {
		return 0, err
	}
	return v, chk(v)
}

func orDefault(s, def string) string {
	if strings.TrimSpace(s) == "" {
		return def
	}
	return s
}

func orInts(xs []int, def int) []int {
	if len(xs) == 0 {
		return []int{def}
	}
	return append([]int(nil), xs...)
}

func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }

var tomlLineErr = regexp.MustCompile(`^toml: line (\d+) \(last key "([^"]*)"\): (.*)$`)

// lineOf finds the first line that sets key, for messages; 1 if none.
func lineOf(data []byte, key string) int {
	re := regexp.MustCompile(`(?m)^[ \t]*"?` + regexp.QuoteMeta(key) + `"?[ \t]*=`)
	loc := re.FindIndex(data)
	if loc == nil {
		return 1
	}
	return 1 + strings.Count(string(data[:loc[0]]), "\n")
}

// lineInTable finds the first line that sets key after the [table]
// header, for messages; the header's line if none, 1 if no header.
func lineInTable(data []byte, table, key string) int {
	re := regexp.MustCompile(`(?m)^[ \t]*\[[ \t]*` + regexp.QuoteMeta(table) + `[ \t]*\][ \t]*(#.*)?$`)
	loc := re.FindIndex(data)
	if loc == nil {
		return 1
	}
	head := 1 + strings.Count(string(data[:loc[0]]), "\n")
	return head - 1 + lineOf(data[loc[0]:], key)
}
