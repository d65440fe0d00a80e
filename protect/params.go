package protect

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"headroom/internal/units"
)

// plain marks a field with no unit kind of its own (ideality, °C/W, A²s,
// eV): it is written and read as a bare number.
const plain units.Kind = -1

// field is one spec parameter of an element: its key, how its value is
// written, where it lives and the range it must lie in.
type field struct {
	key    string
	kind   units.Kind // or plain
	p      *float64
	lo, hi float64 // allowed range; hi may be +Inf
	loOpen bool    // the value must be above lo, not merely at least lo
	what   string  // what the value is, for error messages
	// least, when above 0, is the smallest value the models can work
	// with; a value in range but below it is refused too.
	least float64
}

// settable is an element whose parameters can be listed and set: a
// pointer to one of the package's element values.
type settable interface {
	Element
	fields() []field
	check() error   // cross-field rules beyond each field's range
	value() Element // the element value the pointer points at
}

// format writes a field's value so that parseValue reads it back exactly.
// Money is written without the "$" so that a spec can be pasted into a
// shell in double quotes.
func (f field) format() string {
	v := *f.p
	switch f.kind {
	case plain, units.Money:
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	return units.Format(v, f.kind)
}

func (f field) parseValue(s string) (float64, error) {
	if f.kind == plain {
		t := strings.TrimSpace(s)
		v, err := strconv.ParseFloat(t, 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, fmt.Errorf("%q is not a number: expected %s", s, f.what)
		}
		return v, nil
	}
	return units.Parse(s, f.kind, true)
}

// inRange reports whether v lies in the field's range.
func (f field) inRange(v float64) bool {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return false
	}
	if f.loOpen && v <= f.lo || !f.loOpen && v < f.lo {
		return false
	}
	return v <= f.hi
}

// rangeText says the allowed range in words: "above 0", "from 0.5 to 4".
func (f field) rangeText() string {
	show := func(v float64) string {
		switch f.kind {
		case plain, units.Money:
			return strconv.FormatFloat(v, 'g', -1, 64)
		case units.Fraction:
			return strconv.FormatFloat(v*100, 'g', -1, 64) + " %"
		}
		sym := [...]string{"V", "A", "W", "Ω", "s", "%", "°C", "Ah", "$"}[f.kind]
		return strconv.FormatFloat(v, 'g', -1, 64) + " " + sym
	}
	switch {
	case f.loOpen && math.IsInf(f.hi, 1):
		return "above " + show(f.lo)
	case math.IsInf(f.hi, 1):
		return "at least " + show(f.lo)
	case f.loOpen:
		return "above " + show(f.lo) + " and at most " + show(f.hi)
	}
	return "from " + show(f.lo) + " to " + show(f.hi)
}

func (f field) validate(kind string) error {
	if !f.inRange(*f.p) {
		return specErrorf(kind, f.key, "%s is out of range: expected %s %s",
			f.human(*f.p), f.what, f.rangeText())
	}
	if f.least > 0 && *f.p < f.least {
		return specErrorf(kind, f.key, "%s is too small: expected %s of at least %s",
			f.human(*f.p), f.what, f.bound(f.least))
	}
	return nil
}

// bound writes a limit of the field: as human does, or for a limit far
// below the smallest prefix, in plain scientific notation.
func (f field) bound(v float64) string {
	if s := f.human(v); !strings.HasPrefix(s, "a value under") {
		return s
	}
	return strconv.FormatFloat(v, 'g', -1, 64) + " " + strings.TrimPrefix(units.Eng(1, f.kind, 1), "1 ")
}

// human writes a value of the field for people (the one formatter,
// internal/units).
func (f field) human(v float64) string {
	if f.kind == plain {
		return units.Num(v, 4)
	}
	s := units.Eng(v, f.kind, 4)
	if v != 0 && strings.HasPrefix(s, "0 ") { // too small to write: say so
		return "a value under " + units.Eng(math.Copysign(1e-15, 1), f.kind, 1)
	}
	return s
}

// specOf writes kind:key=value,... with every field, in the field order.
func specOf(kind string, fs []field) string {
	var b strings.Builder
	b.WriteString(kind)
	for i, f := range fs {
		if i == 0 {
			b.WriteByte(':')
		} else {
			b.WriteByte(',')
		}
		b.WriteString(f.key)
		b.WriteByte('=')
		b.WriteString(f.format())
	}
	return b.String()
}

// validate checks every field's range, then the element's own rules.
func validate(s settable) error {
	for _, f := range s.fields() {
		if err := f.validate(s.Kind()); err != nil {
			return err
		}
	}
	return s.check()
}

// kindInfo describes one element kind.
type kindInfo struct {
	name     string
	describe string
	def      func() settable
	// derive fills parameters that follow from others when they were not
	// given (a fuse's resistance from its rating). given reports whether a
	// key was written in the spec. May be nil.
	derive func(s settable, given func(key string) bool)
	// main knob: key and slider range; key "" for none.
	main   string
	lo, hi float64
	log    bool
}

var kinds = []kindInfo{
	{name: "none", describe: "nothing in the path: no drop and no cost, but reversed cells reach the load",
		def: func() settable { return &None{} }},
	{name: "diode", describe: "series PN diode: blocks reversed cells at the cost of 0.6–0.9 V of drop",
		def: func() settable { d := DefaultDiode(); return &d }, main: "is", lo: 1e-12, hi: 1e-6, log: true},
	{name: "schottky", describe: "series Schottky diode: blocks reversed cells with about half a PN diode's drop, but leaks when hot",
		def: func() settable { d := DefaultSchottky(); return &d }, main: "is", lo: 1e-9, hi: 1e-4, log: true},
	{name: "pmos", describe: "P-channel MOSFET in the rail: blocks reversed cells with a drop of milliohms while the gate drive lasts",
		def: func() settable { d := DefaultPMOS(); return &d }, main: "vth", lo: 0.3, hi: 3},
	{name: "pmos-clamp", describe: "P-channel MOSFET with a Zener gate clamp: reverse blocking for packs above the gate-source limit, with a standing drain",
		def: func() settable { d := DefaultPMOSClamp(); return &d }, main: "vz", lo: 2.4, hi: 18},
	{name: "limiter", describe: "reverse-blocking P-MOSFET, then a shunt and PNP current limiter on a second, pass P-MOSFET: blocks reversed cells and limits a short's current",
		def: func() settable { d := DefaultLimiter(); return &d }, main: "rsh", lo: 0.1, hi: 100, log: true},
	{name: "pptc", describe: "polyfuse: opens on over-current and resets when cool; does not block reversed cells",
		def: func() settable { d := DefaultPPTC(); return &d }, derive: derivePPTC, main: "hold", lo: 0.05, hi: 3, log: true},
	{name: "crowbar", describe: "diode across the input behind a fuse: reversed cells blow the fuse; no drop but the fuse's",
		def: func() settable { d := DefaultCrowbar(); return &d }, derive: deriveCrowbar, main: "fuse", lo: 0.05, hi: 5, log: true},
	{name: "ic", describe: "integrated protector: reverse blocking, current limit and over-voltage cut-off in one dearer part",
		def: func() settable { d := DefaultIC(); return &d }, main: "ilim", lo: 0.05, hi: 3, log: true},
}

func lookup(kind string) (kindInfo, bool) {
	for _, k := range kinds {
		if k.name == kind {
			return k, true
		}
	}
	return kindInfo{}, false
}

// Kinds lists the element kind names in a stable order, simplest first.
func Kinds() []string {
	out := make([]string, len(kinds))
	for i, k := range kinds {
		out[i] = k.name
	}
	return out
}

// Default returns the element of the given kind with its typical
// parameters (from memory; see each type), or nil for an unknown kind.
func Default(kind string) Element {
	k, ok := lookup(kind)
	if !ok {
		return nil
	}
	return k.def().value()
}

// Describe says in one line what the kind protects against and what it
// costs; "" for an unknown kind.
func Describe(kind string) string {
	k, _ := lookup(kind)
	return k.describe
}

// Parse reads an element spec: a kind name, optionally followed by ':' and
// comma-separated key=value pairs, as in "diode:is=10n,n=1.8,rs=0.08" or
// "pmos-clamp:vz=5.1,rg=100k". Values take SI prefixes and, optionally,
// their unit ("rs=80m", "rs=80mohm"). Keys not given keep the kind's
// defaults. Unknown kinds, unknown or repeated keys, values that do not
// parse and values out of range are errors naming the key.
func Parse(spec string) (Element, error) {
	s, err := parse(spec)
	if err != nil {
		return nil, err
	}
	return s.value(), nil
}

func parse(spec string) (settable, error) {
	head, rest, hasParams := strings.Cut(strings.TrimSpace(spec), ":")
	kind := strings.ToLower(strings.TrimSpace(head))
	if kind == "" {
		return nil, specErrorf("", "", "empty element spec: expected one of %s", strings.Join(Kinds(), ", "))
	}
	info, ok := lookup(kind)
	if !ok {
		return nil, specErrorf("", "", "unknown element %q: expected one of %s", kind, strings.Join(Kinds(), ", "))
	}
	s := info.def()
	fs := s.fields()
	given := map[string]bool{}
	if hasParams && strings.TrimSpace(rest) != "" {
		for _, pair := range strings.Split(rest, ",") {
			key, val, ok := strings.Cut(pair, "=")
			key = strings.ToLower(strings.TrimSpace(key))
			if !ok || key == "" {
				return nil, specErrorf(kind, "", "%q is not key=value", strings.TrimSpace(pair))
			}
			f, found := findField(fs, key)
			if !found {
				if len(fs) == 0 {
					return nil, specErrorf(kind, "", "unknown key %q: %s takes no parameters", key, kind)
				}
				return nil, specErrorf(kind, "", "unknown key %q: expected one of %s", key, keyList(fs))
			}
			if given[key] {
				return nil, specErrorf(kind, "", "key %q given twice", key)
			}
			given[key] = true
			v, err := f.parseValue(val)
			if err != nil {
				return nil, &SpecError{Kind: kind, Key: key, Err: err}
			}
			*f.p = v
		}
	}
	if info.derive != nil {
		info.derive(s, func(k string) bool { return given[k] })
	}
	deriveHeat(s, func(k string) bool { return given[k] })
	if err := validate(s); err != nil {
		return nil, err
	}
	return s, nil
}

func findField(fs []field, key string) (field, bool) {
	for _, f := range fs {
		if f.key == key {
			return f, true
		}
	}
	return field{}, false
}

func keyList(fs []field) string {
	keys := make([]string, len(fs))
	for i, f := range fs {
		keys[i] = f.key
	}
	return strings.Join(keys, ", ")
}

// settableOf returns a pointer to a copy of e when e is one of the
// package's element values.
func settableOf(e Element) (settable, bool) {
	switch v := e.(type) {
	case None:
		return &v, true
	case Diode:
		return &v, true
	case Schottky:
		return &v, true
	case PMOS:
		return &v, true
	case PMOSClamp:
		return &v, true
	case Limiter:
		return &v, true
	case PPTC:
		return &v, true
	case Crowbar:
		return &v, true
	case IC:
		return &v, true
	}
	return nil, false
}

// Validate checks an element built in code rather than parsed: every
// parameter in its range and the element's own rules (a MOSFET's Vref
// above its Vth, a polyfuse's trip above its hold). Elements of other
// packages are taken as valid.
func Validate(e Element) error {
	s, ok := settableOf(e)
	if !ok {
		return nil
	}
	return validate(s)
}

// Primary is an element's primary parameter: the one value that sets how
// the part behaves (a diode's saturation current, a limiter's sense
// resistor), which a caller may step through its range.
type Primary struct {
	Key    string     // the spec key, e.g. "rsh"
	Value  float64    // current value in the base unit of Kind
	Kind   units.Kind // what the value is, for parsing and display
	Min    float64    // slider range, base units
	Max    float64
	Log    bool // the slider should move in ratios (decades), not steps
	Detail string
}

// Main returns e's main knob: Is for diodes, Vth for pmos, Vz for
// pmos-clamp, Rsh for limiter, the hold current for pptc, the fuse rating
// for crowbar and the current limit for ic. ok is false when e has none
// (none, or an element of another package).
func PrimaryOf(e Element) (k Primary, ok bool) {
	s, isOurs := settableOf(e)
	if !isOurs {
		return Primary{}, false
	}
	info, _ := lookup(s.Kind())
	if info.main == "" {
		return Primary{}, false
	}
	f, _ := findField(s.fields(), info.main)
	return Primary{Key: f.key, Value: *f.p, Kind: f.kind, Min: info.lo, Max: info.hi, Log: info.log, Detail: f.what}, true
}

// PrimaryRange gives the slider range of a kind's main knob in base units,
// and whether it moves in ratios; ok is false for a kind without a knob or
// an unknown kind. Values outside the range may still be valid in a spec.
func PrimaryRange(kind string) (lo, hi float64, log, ok bool) {
	info, found := lookup(kind)
	if !found || info.main == "" {
		return 0, 0, false, false
	}
	return info.lo, info.hi, info.log, true
}

// WithPrimary returns a copy of e with its main knob set to v, checked as
// Parse would check it. Parameters that follow the main one move with it:
// a polyfuse keeps its trip/hold ratio; a crowbar fuse's resistance scales
// as 1/rating and its I²t as rating² (a bigger fuse has a thicker wire).
// It is an error when e has no knob.
func WithPrimary(e Element, v float64) (Element, error) {
	s, ok := settableOf(e)
	if !ok {
		return nil, specErrorf(e.Kind(), "", "no main parameter to set")
	}
	info, _ := lookup(s.Kind())
	if info.main == "" {
		return nil, specErrorf(s.Kind(), "", "no main parameter to set")
	}
	f, _ := findField(s.fields(), info.main)
	old := *f.p
	*f.p = v
	if !f.inRange(v) {
		return nil, f.validate(s.Kind())
	}
	switch t := s.(type) {
	case *PPTC:
		t.Trip *= v / old
		t.R *= math.Pow(old/v, 1.2) // the scaling of pptcOhms
	case *Crowbar:
		t.RFuse *= old / v
		t.I2t *= (v / old) * (v / old)
	}
	if err := validate(s); err != nil {
		return nil, err
	}
	return s.value(), nil
}

// Shared field builders, so that every element writes cost, θja and Tj max
// the same way.
func costField(p *float64) field {
	return field{key: "cost", kind: units.Money, p: p, lo: 0, hi: 1000, what: "the unit cost in dollars"}
}

// shockleyFields lists a junction's parameters under keys with the given
// prefix ("" for a diode, "b" for a MOSFET's body diode).
func shockleyFields(prefix string, s *Shockley) []field {
	return []field{
		// Below 1e-30 A, i/Is(T) overflows and the drop is infinite.
		{key: prefix + "is", kind: units.Current, p: &s.Is, lo: 0, hi: 1, loOpen: true, what: "the saturation current", least: 1e-30},
		{key: prefix + "n", kind: plain, p: &s.N, lo: 0.5, hi: 4, what: "the ideality factor"},
		{key: prefix + "rs", kind: units.Resistance, p: &s.Rs, lo: 0, hi: 1000, what: "the series resistance"},
		{key: prefix + "eg", kind: plain, p: &s.Eg, lo: 0.1, hi: 3, what: "the activation energy in eV"},
		{key: prefix + "xti", kind: plain, p: &s.XTI, lo: 0, hi: 10, what: "the saturation-current temperature exponent"},
	}
}

func (*None) fields() []field  { return nil }
func (*None) check() error     { return nil }
func (n *None) value() Element { return *n }

// Short writes e's spec with only the keys that differ from its kind's
// defaults: "diode", "pmos:vth=1.2V". Parse(Short(e)) gives e back, like
// Spec, but Short is what people read in tables and on screen.
func Short(e Element) string {
	s, ok := settableOf(e)
	if !ok {
		return e.Spec()
	}
	k, ok := lookup(e.Kind())
	if !ok {
		return e.Spec()
	}
	fs := s.fields()
	keep := make([]bool, len(fs))
	df := k.def().fields()
	for i, f := range fs {
		keep[i] = i >= len(df) || *df[i].p != *f.p
	}
	// A key left out is derived from the others when it is parsed (a
	// polyfuse's trip from its hold), so a default value may not come
	// back: write every key whose parsed-back value differs too. Keys
	// written are not derived, so one pass settles it.
	short := func() string {
		var diff []field
		for i, f := range fs {
			if keep[i] {
				diff = append(diff, f)
			}
		}
		if len(diff) == 0 {
			return e.Kind()
		}
		return specOf(e.Kind(), diff)
	}
	back, err := parse(short())
	if err != nil {
		return e.Spec() // a derived value would be out of range
	}
	for i, f := range back.fields() {
		if *f.p != *fs[i].p {
			keep[i] = true
		}
	}
	// A key that the others derive exactly is left out too
	// ("pptc:hold=1.1A", not "pptc:r=105.15847704228555mohm,hold=1.1A,...").
	same := func() bool {
		b, err := parse(short())
		if err != nil {
			return false
		}
		for i, f := range b.fields() {
			if *f.p != *fs[i].p {
				return false
			}
		}
		return true
	}
	for i := range keep {
		if keep[i] {
			keep[i] = false
			if !same() {
				keep[i] = true
			}
		}
	}
	return short()
}
