// Package tolerance spreads a design's parts and conditions over their
// tolerances: the worst and best corners, a seeded Latin-hypercube spread
// of runtime and delivered charge, each tolerance's sensitivity, and
// warnings where a tolerance crosses a cliff (a current limit under a load
// pulse, a MOSFET left on its body diode).
//
// It sits between internal/scenario and discharge: it builds perturbed
// copies of a discharge.Design and evaluates them; the element's
// parameters are moved through their spec keys (protect.WithParam), never
// through the element's fields.
package tolerance

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/units"
	"headroom/protect"
)

// Dist is how a tolerance is spread between its limits.
type Dist int

const (
	// Normal is a normal distribution centred between the limits with the
	// limits at ±3σ, cut off there (a part screened to its data-sheet
	// limits).
	Normal Dist = iota
	// Uniform is every value between the limits equally likely.
	Uniform
)

func (d Dist) String() string {
	if d == Uniform {
		return "uniform"
	}
	return "normal"
}

// Form is how a tolerance's limits are written.
type Form int

const (
	// Percent: ±Pct of the nominal value (Pct 0.05 is ±5 %).
	Percent Form = iota
	// Offset: ±Delta in the parameter's unit around the nominal value
	// (shelf time: 0 to Delta).
	Offset
	// Range: the parameter lies between Min and Max (for the percentage
	// parameters, fractions of nominal: Min −0.1 and Max 0.05 are −10 %
	// and +5 %).
	Range
)

// Tol is one tolerance: which parameter, its limits and its distribution.
type Tol struct {
	Name     string
	Form     Form
	Pct      float64 // Percent: the half-width as a fraction, at least 0, below 1
	Delta    float64 // Offset: the half-width in the parameter's unit, at least 0
	Min, Max float64 // Range: the limits (see Range)
	Dist     Dist
}

// String writes the tolerance as a scenario file writes it.
func (t Tol) String() string {
	p, _ := lookup(t.Name)
	var s string
	switch t.Form {
	case Percent:
		s = "±" + trimNum(t.Pct*100) + " %"
	case Offset:
		if p.oneSided {
			s = "0 to " + p.format(t.Delta)
		} else {
			s = "±" + p.format(t.Delta)
		}
	case Range:
		if p.ratio {
			s = signedPct(t.Min) + " to " + signedPct(t.Max)
		} else {
			s = p.format(t.Min) + " to " + p.format(t.Max)
		}
	}
	return s + ", " + t.Dist.String()
}

func signedPct(f float64) string {
	s := trimNum(f*100) + " %"
	if f > 0 {
		s = "+" + s
	}
	return s
}

// param is one parameter a tolerance can move.
type param struct {
	name string
	what string
	// kind is the unit of offsets and limits; ratio parameters are
	// factors of nominal and take percentages only.
	kind     units.Kind
	ratio    bool
	oneSided bool // shelf: the nominal is the lower limit (fresh)
	noPct    bool // a percentage of the nominal is meaningless (°C, months)
	// pack: a cell-to-cell spread; the pack takes the mean of its
	// Series·Parallel cells (see Spread).
	pack bool
	// key is the element spec key moved; "" for design-level parameters.
	key   string
	kinds []string // element kinds it applies to; nil: every design
	def   Tol      // the typical tolerance (from memory; see defaults)
	// lo, hi: the range a value must stay in to make sense.
	lo, hi float64
}

func (p param) format(v float64) string {
	if p.name == "shelf" {
		return trimNum(v) + " months"
	}
	return trimZeros(units.Human(v, p.kind, 3))
}

// trimZeros drops the trailing zeros of the number s starts with:
// "10.0 °C" → "10 °C", "1.50 V" → "1.5 V".
func trimZeros(s string) string {
	num, rest, _ := strings.Cut(s, " ")
	if strings.Contains(num, ".") {
		num = strings.TrimRight(strings.TrimRight(num, "0"), ".")
	}
	if rest == "" {
		return num
	}
	return num + " " + rest
}

func trimNum(v float64) string { return strconv.FormatFloat(units.RoundSig(v, 3), 'f', -1, 64) }

var elementKinds = struct{ diodes, fets, ron []string }{
	diodes: []string{"diode", "schottky"},
	fets:   []string{"pmos", "pmos-clamp", "limiter"},
	ron:    []string{"pmos", "pmos-clamp", "limiter", "ic"},
}

// params is the list of tolerances in their order of listing. Every
// default is typical, from memory, for small consumer products: check
// your parts' data sheets and your cell maker's figures.
var params = []param{
	{name: "capacity", what: "cell capacity, cell to cell", kind: units.Fraction, ratio: true, pack: true,
		// Cells of one lot: a few per cent (typical, from memory).
		def: Tol{Form: Percent, Pct: 0.03, Dist: Normal}, lo: 0, hi: math.Inf(1)},
	{name: "lot_capacity", what: "cell capacity, lot to lot (date code, maker)", kind: units.Fraction, ratio: true,
		// Lot to lot and shop to shop: about ±5 % (typical, from memory).
		def: Tol{Form: Percent, Pct: 0.05, Dist: Uniform}, lo: 0, hi: math.Inf(1)},
	{name: "resistance", what: "cell internal resistance, cell to cell", kind: units.Fraction, ratio: true, pack: true,
		// ±10 % within a lot (typical, from memory).
		def: Tol{Form: Percent, Pct: 0.10, Dist: Normal}, lo: 0, hi: math.Inf(1)},
	{name: "lot_resistance", what: "cell internal resistance, lot to lot", kind: units.Fraction, ratio: true,
		// ±20 % across lots and makers (typical, from memory).
		def: Tol{Form: Percent, Pct: 0.20, Dist: Uniform}, lo: 0, hi: math.Inf(1)},
	{name: "shelf", what: "months on the shelf before first use (self-discharge)", kind: units.Time, oneSided: true, noPct: true,
		// Up to a year between the factory and the first use
		// (typical, from memory).
		def: Tol{Form: Offset, Delta: 12, Dist: Uniform}, lo: 0, hi: 120},
	{name: "ambient", what: "ambient temperature", kind: units.Temperature, noPct: true,
		// A toy played with indoors and out: ±10 °C (typical, from memory).
		def: Tol{Form: Offset, Delta: 10, Dist: Uniform}, lo: -40, hi: 85},
	{name: "load", what: "load current or power, product to product", kind: units.Fraction, ratio: true,
		// Motors, speakers and regulators: ±10 % (typical, from memory).
		def: Tol{Form: Percent, Pct: 0.10, Dist: Normal}, lo: 0, hi: math.Inf(1)},
	{name: "floor", what: "brown-out threshold (the floor)", kind: units.Voltage,
		// A supervisor or brown-out detector: ±3 % (typical, from memory).
		def: Tol{Form: Percent, Pct: 0.03, Dist: Normal}, lo: 0, hi: 1000},
	{name: "vf", what: "diode forward voltage at the heaviest phase", kind: units.Voltage, kinds: elementKinds.diodes,
		// ±40 mV part to part (typical, from memory).
		def: Tol{Form: Offset, Delta: 0.04, Dist: Normal}, lo: 0, hi: 10},
	{name: "vth", what: "MOSFET gate threshold", kind: units.Voltage, key: "vth", kinds: elementKinds.fets,
		// A data sheet's min–max about ±0.3 V around typical (typical,
		// from memory: 0.5 to 1.1 V for a 0.8 V part).
		def: Tol{Form: Offset, Delta: 0.3, Dist: Uniform}, lo: 0.01, hi: 20},
	{name: "ron", what: "MOSFET or protector on-resistance", kind: units.Fraction, ratio: true, key: "ron", kinds: elementKinds.ron,
		// ±20 % (typical, from memory).
		def: Tol{Form: Percent, Pct: 0.20, Dist: Normal}, lo: 0, hi: math.Inf(1)},
	{name: "vbe", what: "limiter transistor's Vbe", kind: units.Voltage, key: "vbe", kinds: []string{"limiter"},
		// ±50 mV (typical, from memory).
		def: Tol{Form: Offset, Delta: 0.05, Dist: Normal}, lo: 0.3, hi: 1},
	{name: "rsh", what: "limiter sense resistor", kind: units.Fraction, ratio: true, key: "rsh", kinds: []string{"limiter"},
		// A 5 % thick-film resistor (common practice).
		def: Tol{Form: Percent, Pct: 0.05, Dist: Normal}, lo: 0, hi: math.Inf(1)},
	{name: "polyfuse_r", what: "polyfuse resistance", kind: units.Fraction, ratio: true, key: "r", kinds: []string{"pptc"},
		// Data sheets give Rmin to R1max of about 1:2 (typical, from
		// memory): ±35 %.
		def: Tol{Form: Percent, Pct: 0.35, Dist: Uniform}, lo: 0, hi: math.Inf(1)},
	{name: "ilim", what: "protector current limit", kind: units.Current, key: "ilim", kinds: []string{"ic"},
		// Integrated protectors: ±25 % (typical, from memory).
		def: Tol{Form: Percent, Pct: 0.25, Dist: Normal}, lo: 0, hi: 100},
}

func init() {
	for i := range params {
		params[i].def.Name = params[i].name
	}
}

func lookup(name string) (param, bool) {
	for _, p := range params {
		if p.name == name {
			return p, true
		}
	}
	return param{}, false
}

// Names lists the tolerance names in their order of listing.
func Names() []string {
	out := make([]string, len(params))
	for i, p := range params {
		out[i] = p.name
	}
	return out
}

// Describe says in a few words what a tolerance moves; "" for an unknown name.
func Describe(name string) string {
	p, _ := lookup(name)
	return p.what
}

// Defaults returns the typical tolerances (from memory), one per name, in
// the order of Names.
func Defaults() []Tol {
	out := make([]Tol, len(params))
	for i, p := range params {
		out[i] = p.def
	}
	return out
}

// Default returns one name's typical tolerance; ok is false for an
// unknown name.
func Default(name string) (Tol, bool) {
	p, ok := lookup(name)
	return p.def, ok
}

// With returns tols with t in place of the tolerance of the same name (or
// appended when there is none).
func With(tols []Tol, t Tol) []Tol {
	out := append([]Tol(nil), tols...)
	for i := range out {
		if out[i].Name == t.Name {
			out[i] = t
			return out
		}
	}
	return append(out, t)
}

// Check says what is wrong with one tolerance, on its own: an unknown
// name (with the names there are), a negative spread, a percentage of
// 100 % or more, a percentage where it means nothing, min above max.
func (t Tol) Check() error {
	p, ok := lookup(t.Name)
	if !ok {
		return fmt.Errorf("unknown tolerance %q: expected one of %s", t.Name, strings.Join(Names(), ", "))
	}
	fin := func(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
	switch t.Form {
	case Percent:
		switch {
		case p.noPct:
			return fmt.Errorf("%s: a percentage means nothing for %s: give an amount (%s) or min and max", t.Name, p.what, p.example())
		case !fin(t.Pct) || t.Pct < 0:
			return fmt.Errorf("%s: spread %s is negative: expected 0 %% or more", t.Name, units.Format(t.Pct, units.Fraction))
		case t.Pct >= 1:
			return fmt.Errorf("%s: spread %s would take %s to zero or below: expected under 100 %%", t.Name, units.Format(t.Pct, units.Fraction), p.what)
		}
	case Offset:
		if !fin(t.Delta) || t.Delta < 0 {
			return fmt.Errorf("%s: spread %v is negative: expected 0 or more", t.Name, t.Delta)
		}
		if p.ratio {
			return fmt.Errorf("%s: give a percentage for %s", t.Name, p.what)
		}
		if p.oneSided && t.Delta > p.hi {
			return fmt.Errorf("%s: %s is more than %s", t.Name, p.format(t.Delta), p.format(p.hi))
		}
	case Range:
		if !fin(t.Min) || !fin(t.Max) {
			return fmt.Errorf("%s: min and max must be numbers", t.Name)
		}
		if t.Min > t.Max {
			return fmt.Errorf("%s: min %s is above max %s", t.Name, p.show(t.Min), p.show(t.Max))
		}
		if p.ratio && (t.Min <= -1) {
			return fmt.Errorf("%s: min %s would take %s to zero or below: expected above -100 %%", t.Name, signedPct(t.Min), p.what)
		}
		if !p.ratio && (t.Min < p.lo || t.Max > p.hi) {
			return fmt.Errorf("%s: %s to %s is outside %s to %s", t.Name, p.show(t.Min), p.show(t.Max), p.show(p.lo), p.show(p.hi))
		}
	default:
		return fmt.Errorf("%s: unknown form", t.Name)
	}
	if t.Dist != Normal && t.Dist != Uniform {
		return fmt.Errorf("%s: unknown distribution: expected normal or uniform", t.Name)
	}
	return nil
}

func (p param) show(v float64) string {
	if p.ratio {
		return signedPct(v)
	}
	return p.format(v)
}

func (p param) example() string {
	switch p.name {
	case "shelf":
		return `"12" months`
	case "ambient":
		return `"10C"`
	}
	return `"50mV"`
}

// Check checks every tolerance, and that no name is given twice.
func Check(tols []Tol) error {
	seen := map[string]bool{}
	for _, t := range tols {
		if err := t.Check(); err != nil {
			return err
		}
		if seen[t.Name] {
			return fmt.Errorf("tolerance %q given twice", t.Name)
		}
		seen[t.Name] = true
	}
	return nil
}

// active is one tolerance that applies to the design, with its limits in
// the parameter's own terms (factors for ratio parameters, values
// otherwise) and its nominal.
type active struct {
	p            param
	t            Tol
	nom, lo, hi  float64
	n            int // cells averaged (pack tolerances), else 1
	elementValue float64
}

// model holds a design and the tolerances that apply to it.
type model struct {
	d   *discharge.Design
	act []active
	vf  struct{ is, n, vt float64 } // diode junction, for vf
}

func applies(p param, d *discharge.Design) bool {
	if p.kinds == nil {
		return true
	}
	if d.Protect == nil {
		return false
	}
	k := d.Protect.Kind()
	for _, want := range p.kinds {
		if want == k {
			return true
		}
	}
	return false
}

// newModel checks the tolerances against the design and works out each
// one's limits. Tolerances that do not apply (a MOSFET threshold on a
// diode design) are left out.
func newModel(d *discharge.Design, tols []Tol) (*model, error) {
	if err := d.Validate(); err != nil {
		return nil, err
	}
	if err := Check(tols); err != nil {
		return nil, err
	}
	m := &model{d: d}
	for _, t := range tols {
		p, _ := lookup(t.Name)
		if !applies(p, d) {
			continue
		}
		a := active{p: p, t: t, n: 1}
		if p.pack {
			a.n = d.Series * d.Parallel
		}
		switch {
		case p.ratio:
			a.nom = 1
		case p.name == "shelf":
			a.nom = 0
		case p.name == "ambient":
			a.nom = d.TempC
		case p.name == "floor":
			a.nom = d.Floor
		case p.name == "vf":
			v, err := m.vfNominal()
			if err != nil {
				return nil, err
			}
			a.nom = v
		default:
			v, ok := protect.Param(d.Protect, p.key)
			if !ok {
				continue
			}
			a.nom = v
		}
		switch t.Form {
		case Percent:
			if p.ratio {
				a.lo, a.hi = 1-t.Pct, 1+t.Pct
			} else {
				a.lo, a.hi = a.nom*(1-t.Pct), a.nom*(1+t.Pct)
			}
		case Offset:
			if p.oneSided {
				a.lo, a.hi = a.nom, a.nom+t.Delta
			} else {
				a.lo, a.hi = a.nom-t.Delta, a.nom+t.Delta
			}
		case Range:
			if p.ratio {
				a.lo, a.hi = 1+t.Min, 1+t.Max
			} else {
				a.lo, a.hi = t.Min, t.Max
			}
		}
		if !p.ratio && t == p.def {
			// A default that would leave the parameter's range (±10 °C
			// around −35 °C) is cut at the range; a spread the user
			// gave is refused below instead.
			a.lo, a.hi = math.Max(a.lo, p.lo), math.Min(a.hi, p.hi)
		}
		if !p.ratio && (a.lo < p.lo || a.hi > p.hi) {
			return nil, fmt.Errorf("%s: %s to %s around %s reaches outside %s to %s",
				t.Name, p.format(a.lo), p.format(a.hi), p.format(a.nom), p.format(p.lo), p.format(p.hi))
		}
		m.act = append(m.act, a)
	}
	return m, nil
}

// peakCurrent estimates the heaviest phase's current with a fresh pack,
// for the forward voltage a vf tolerance names.
func peakCurrent(d *discharge.Design) float64 {
	v := d.Cell.NominalV * float64(d.Series)
	if !(v > 0) {
		v = d.Cell.Curve.At(0) * float64(d.Series)
	}
	peak := 1e-3
	for _, ph := range d.Profile {
		l := ph.Load
		var i float64
		switch l.Kind {
		case discharge.ConstantCurrent:
			i = l.Amps
		case discharge.ConstantPower:
			i = l.InputPower() / v
		case discharge.ConstantResistance:
			i = v / l.Ohms
		case discharge.LED:
			i = math.Max(0, v-l.Vf) / l.Ohms
		}
		peak = math.Max(peak, i)
	}
	return peak
}

// thermalVoltage is kT/q in volts at tempC.
func thermalVoltage(tempC float64) float64 {
	const kOverQ = 8.617333262e-5 // Boltzmann constant over the electron charge, V/K (CODATA 2018)
	return kOverQ * (tempC + 273.15)
}

// vfNominal is the element's forward drop at the heaviest phase's current
// at the ambient, and notes the junction's Is and n for moving it.
func (m *model) vfNominal() (float64, error) {
	e := m.d.Protect
	is, ok1 := protect.Param(e, "is")
	n, ok2 := protect.Param(e, "n")
	if !ok1 || !ok2 {
		return 0, fmt.Errorf("vf: the %s element has no junction keys", e.Kind())
	}
	m.vf.is, m.vf.n, m.vf.vt = is, n, thermalVoltage(m.d.TempC)
	i := peakCurrent(m.d)
	return e.Drop(i, m.d.Cell.Curve.At(0)*float64(m.d.Series), m.d.TempC), nil
}

// design builds the design with the active tolerances at vals (one per
// active tolerance, in order; factors for ratio parameters).
func (m *model) design(vals []float64) (*discharge.Design, error) {
	d := *m.d
	d.TracePoints = 0
	capF, resF, shelf := 1.0, 1.0, 0.0
	loadF := 1.0
	el := d.Protect
	var err error
	for i, a := range m.act {
		v := vals[i]
		if v == a.nom {
			continue
		}
		switch a.p.name {
		case "capacity", "lot_capacity":
			capF *= v
		case "resistance", "lot_resistance":
			resF *= v
		case "shelf":
			shelf = v
		case "ambient":
			d.TempC = v
		case "load":
			loadF *= v
		case "floor":
			d.Floor = v
		case "vf":
			// Shockley: at a fixed current the drop moves by −n·Vt·ln k
			// when Is is multiplied by k.
			is := m.vf.is * math.Exp(-(v-a.nom)/(m.vf.n*m.vf.vt))
			el, err = protect.WithParam(el, "is", is)
		default:
			x := v
			if a.p.ratio {
				x, _ = protect.Param(m.d.Protect, a.p.key)
				x *= v
			}
			el, err = protect.WithParam(el, a.p.key, x)
		}
		if err != nil {
			return nil, fmt.Errorf("%s at %s: %w", a.p.name, a.p.show(showValue(a, v)), err)
		}
	}
	d.Protect = el
	if capF != 1 || resF != 1 || shelf > 0 {
		d.Cell = cellWith(d.Cell, capF, resF, shelf)
	}
	if loadF != 1 {
		ph := make([]discharge.Phase, len(d.Profile))
		for i, p := range d.Profile {
			p.Load = p.Load.Scale(loadF)
			ph[i] = p
		}
		d.Profile = ph
	}
	return &d, nil
}

// showValue turns a ratio parameter's factor into its signed fraction for
// messages.
func showValue(a active, v float64) float64 {
	if a.p.ratio {
		return units.RoundSig(v-1, 12)
	}
	return v
}

// cellWith returns a copy of c with its capacity times capF, its internal
// resistance (R0 and the polarisation branches) times resF, and the charge
// that self-discharge takes in shelf months removed from the top of its
// curve (the fresh part), at the cell's monthly rate at RefTempC.
func cellWith(c *curves.Cell, capF, resF, shelf float64) *curves.Cell {
	n := *c
	if capF != 1 {
		n.Curve = n.Curve.Scale(capF, 1)
		n.RatedMAh *= capF
	}
	if resF != 1 {
		n.Resistance = make([]curves.ResistancePoint, len(c.Resistance))
		for i, r := range c.Resistance {
			r.Ohm *= resF
			n.Resistance[i] = r
		}
		n.RC = append(n.RC[:0:0], c.RC...)
		for i := range n.RC {
			n.RC[i].R *= resF
		}
	}
	if lost := math.Min(c.SelfDischarge*shelf, 0.9); lost > 0 {
		n.Curve, n.Resistance = cutTop(n.Curve, n.Resistance, lost*n.Curve.End())
	}
	return &n
}

// cutTop removes the first q0 mAh of a curve: the cell starts part-way
// down it. Resistance depths (fractions of the curve's end charge) are
// mapped onto the shorter curve.
func cutTop(cv *curves.Curve, res []curves.ResistancePoint, q0 float64) (*curves.Curve, []curves.ResistancePoint) {
	end := cv.End()
	qs, vs := []float64{0}, []float64{cv.At(q0)}
	for i := 0; i < cv.Len(); i++ {
		q, v := cv.Point(i)
		if q > q0+1e-9*end {
			qs = append(qs, q-q0)
			vs = append(vs, v)
		}
	}
	nc, err := curves.NewCurve(qs, vs)
	if err != nil {
		return cv, res // keep the fresh cell rather than fail a sample
	}
	if len(res) == 0 {
		return nc, res
	}
	d0 := q0 / end
	at := func(d float64) float64 { // linear in depth, held at the ends
		if d <= res[0].Depth {
			return res[0].Ohm
		}
		for i := 1; i < len(res); i++ {
			if d <= res[i].Depth {
				f := (d - res[i-1].Depth) / (res[i].Depth - res[i-1].Depth)
				return res[i-1].Ohm + f*(res[i].Ohm-res[i-1].Ohm)
			}
		}
		return res[len(res)-1].Ohm
	}
	nr := []curves.ResistancePoint{{Depth: 0, Ohm: at(d0)}}
	for _, r := range res {
		if r.Depth > d0 {
			nr = append(nr, curves.ResistancePoint{Depth: (r.Depth - d0) / (1 - d0), Ohm: r.Ohm})
		}
	}
	sort.Slice(nr, func(i, j int) bool { return nr[i].Depth < nr[j].Depth })
	return nc, nr
}
