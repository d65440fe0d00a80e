package protect

import (
	"math"

	"headroom/internal/units"
)

// The SI defining constants (SI Brochure, 9th edition, 2019), exact.
const (
	Boltzmann        = 1.380649e-23    // k, J/K
	ElementaryCharge = 1.602176634e-19 // q, C
	ZeroCelsius      = 273.15          // 0 °C in kelvin
	// NominalK is the temperature at which junction parameters are given:
	// 27 °C, as in SPICE, so that a Shockley junction here and a diode
	// model in ngspice agree exactly at their nominal temperature.
	NominalK = 300.15
)

// ThermalVoltage returns Vt = k·T/q in volts at kelvin T.
func ThermalVoltage(kelvin float64) float64 { return Boltzmann * kelvin / ElementaryCharge }

// Shockley is a junction obeying the Shockley diode law with ideality and
// series resistance (Shockley, 1949):
//
//	I = Is(T)·(exp((V − I·Rs)/(n·Vt)) − 1), so V = n·Vt·ln(1 + I/Is(T)) + I·Rs
//
// with the saturation current's temperature dependence in the standard
// SPICE form
//
//	Is(T) = Is·(T/Tnom)^(XTI/n)·exp(Eg/(n·Vt(T))·(T/Tnom − 1)), Tnom = 300.15 K.
type Shockley struct {
	// Is is the saturation current at 27 °C in amperes. Must be above 0
	// and at most 1.
	Is float64
	// N is the ideality (emission) factor, from 0.5 to 4; near 1 for
	// Schottky junctions, 1.5–2 for rectifiers.
	N float64
	// Rs is the series (bulk and lead) resistance in ohms, at least 0.
	Rs float64
	// Eg is the activation energy in eV, 0.1 to 3: 1.11 for silicon PN,
	// about 0.69 for Schottky barriers.
	Eg float64
	// XTI is the saturation-current temperature exponent, 0 to 10: 3 for
	// PN junctions, 2 for Schottky barriers.
	XTI float64

	// at holds Is(T) and n·Vt(T) worked out once for one temperature by
	// At; Drop uses them when called at that temperature. It is not a
	// parameter: specs and comparisons of parameters ignore it.
	at *junctionAt
}

// junctionAt is a Shockley junction's temperature terms at one temperature.
type junctionAt struct {
	tempC, is, nvt float64
}

// At returns s with its temperature terms worked out for tempC, so that
// Drop at that temperature costs one Log1p instead of a Log, an Exp and a
// Log1p. The result is a new value; s is unchanged.
func (s Shockley) At(tempC float64) Shockley {
	a := s.termsAt(tempC)
	s.at = &a
	return s
}

// termsAt is s's temperature terms at tempC, as At keeps them.
func (s Shockley) termsAt(tempC float64) junctionAt {
	t := tempC + ZeroCelsius
	return junctionAt{tempC: tempC, is: s.Saturation(tempC), nvt: s.N * ThermalVoltage(t)}
}

// Saturation returns Is at tempC (°C), in amperes. Its reverse current: an
// ideal junction reverse-biased by more than a few Vt passes −Is(T).
func (s Shockley) Saturation(tempC float64) float64 {
	t := tempC + ZeroCelsius
	r := t / NominalK
	return s.Is * math.Exp(s.XTI/s.N*math.Log(r)+s.Eg/(s.N*ThermalVoltage(t))*(r-1))
}

// Forward is a junction's forward law at one temperature, its terms
// worked out once (Shockley.ForwardAt): Drop at any current then costs
// one Log1p, and Slope a division. A value: making one allocates
// nothing, unlike At.
type Forward struct {
	nvt, is, rs float64
}

// ForwardAt returns s's forward law at tempC: Drop(i) is s.Drop(i,
// tempC) to the bit (the same terms by the same arithmetic, whether s has
// them worked out there or not).
func (s Shockley) ForwardAt(tempC float64) Forward {
	if a := s.at; a != nil && a.tempC == tempC {
		return Forward{nvt: a.nvt, is: a.is, rs: s.Rs}
	}
	t := tempC + ZeroCelsius
	r := t / NominalK
	nvt := s.N * ThermalVoltage(t)
	return Forward{nvt: nvt, is: s.Is * math.Exp(s.XTI/s.N*math.Log(r)+s.Eg/nvt*(r-1)), rs: s.Rs}
}

// Drop is the forward voltage at current i (A), 0 for i ≤ 0.
func (f Forward) Drop(i float64) float64 {
	if !(i > 0) {
		return 0
	}
	return f.nvt*math.Log1p(i/f.is) + i*f.rs
}

// Slope is dDrop/di at current i ≥ 0, ohms: n·Vt/(Is + i) + Rs.
func (f Forward) Slope(i float64) float64 {
	return f.nvt/(f.is+math.Max(i, 0)) + f.rs
}

// Drop returns the forward voltage at current i (A) and tempC (°C); 0 for
// i ≤ 0. Closed form, no allocation.
func (s Shockley) Drop(i, tempC float64) float64 {
	if !(i > 0) {
		return 0
	}
	if a := s.at; a != nil && a.tempC == tempC {
		return a.nvt*math.Log1p(i/a.is) + i*s.Rs
	}
	t := tempC + ZeroCelsius
	r := t / NominalK
	nvt := s.N * ThermalVoltage(t)
	// Is(T) as in Saturation, sharing nvt: one Log, one Exp, one Log1p.
	is := s.Is * math.Exp(s.XTI/s.N*math.Log(r)+s.Eg/nvt*(r-1))
	return nvt*math.Log1p(i/is) + i*s.Rs
}

// dropFloor is a lower bound on Drop(i, tempC) as Drop computes it,
// rounding included, for a junction with its terms worked out at tempC
// (At); 0 otherwise. It takes ln(1 + x) > ln x ≥ (e − 1)·ln 2 for x =
// m·2^e, m in [½, 1) (math.Frexp): no logarithm. Drop's few roundings
// (log1p within an ulp, a product and a sum) lower its value by well
// under 1e-15 relative, the bound is taken 1e-12 lower.
func (s Shockley) dropFloor(i, tempC float64) float64 {
	a := s.at
	if !(i > 0) || a == nil || a.tempC != tempC {
		return 0
	}
	_, e := math.Frexp(i / a.is)
	l := 0.0
	if e > 1 {
		l = float64(e-1) * math.Ln2
	}
	return (a.nvt*l + i*s.Rs) * (1 - 1e-12)
}

// Diode is a series PN diode in the supply rail: it blocks reversed cells
// and costs a drop that falls about 2 mV/°C.
//
// A forward-biased series diode passes all its current on to the load, so
// it draws no standby current of its own: Quiescent is 0. Its reverse
// leakage, Is(T), is what flows when the cells are reversed.
type Diode struct {
	Junction Shockley
	// Price is the unit cost in dollars, at least 0.
	Price float64
	// Heat is the thermal network from junction to ambient.
	Heat Thermal
}

// DefaultDiode is a generic 1 A silicon rectifier (typical, from memory):
// about 0.75 V at 100 mA and 0.93 V at 1 A at 25 °C, in a leaded or
// SMA-size package on a small board.
func DefaultDiode() Diode {
	return Diode{
		Junction: Shockley{Is: 10e-9, N: 1.8, Rs: 0.08, Eg: 1.11, XTI: 3},
		Price:    0.03, Heat: sma,
	}
}

func (d Diode) Kind() string                         { return "diode" }
func (d Diode) Spec() string                         { return specOf(d.Kind(), d.fields()) }
func (d Diode) Drop(i, vin, tempC float64) float64   { return d.Junction.Drop(i, tempC) }
func (d Diode) ForwardAt(tempC float64) Forward      { return d.Junction.ForwardAt(tempC) }
func (d Diode) Quiescent(vin, tempC float64) float64 { return 0 }
func (d Diode) Limit(tempC float64) Limit            { return NoLimit() }
func (d Diode) Cost() float64                        { return d.Price }
func (d Diode) Thermal() Thermal                     { return d.Heat }
func (d Diode) Warnings(op Operating) []string       { return appendHeat(nil, d.Thermal(), op) }
func (d Diode) Reverse(p Pack) Reversal {
	return blockedReverse(d, p, d.Junction.Saturation(p.TempC), "the diode is reverse-biased")
}
func (d *Diode) fields() []field { return diodeFields(d) }
func (d *Diode) check() error    { return d.Heat.check(d.Kind()) }
func (d *Diode) heat() *Thermal  { return &d.Heat }
func (d *Diode) value() Element  { return *d }

func diodeFields(d *Diode) []field {
	fs := shockleyFields("", &d.Junction)
	fs = append(fs, costField(&d.Price))
	return append(fs, thermalFields(&d.Heat)...)
}

// Schottky is a series Schottky-barrier diode: the same law as Diode with
// a much larger Is and n near 1, so about half the drop, but a reverse
// leakage of microamperes at 25 °C that grows roughly a hundredfold by
// 85 °C. Like Diode it draws no standby current when forward-biased;
// its leakage shows in Reverse.
type Schottky struct {
	Diode
}

// DefaultSchottky is a generic 1 A Schottky rectifier (typical, from
// memory): about 0.3 V at 100 mA and 0.47 V at 1 A at 25 °C.
func DefaultSchottky() Schottky {
	return Schottky{Diode{
		Junction: Shockley{Is: 1e-6, N: 1, Rs: 0.12, Eg: 0.69, XTI: 2},
		Price:    0.05, Heat: smaSchottky,
	}}
}

func (s Schottky) Kind() string     { return "schottky" }
func (s Schottky) Spec() string     { return specOf(s.Kind(), s.fields()) }
func (s *Schottky) fields() []field { return diodeFields(&s.Diode) }
func (s *Schottky) value() Element  { return *s }
func (s *Schottky) check() error    { return s.Heat.check(s.Kind()) }

// Reverse: the reversed pack leaks through the Schottky diode, and the
// leakage heats it: the junction settles where V·Is(Tj) through the
// thermal network gives back Tj (Heating.Settle). A leakage that grows
// with heat faster than the package sheds it runs away — Schottky
// barriers are known for it — and the note says so.
func (s Schottky) Reverse(p Pack) Reversal {
	v := packVolts(p)
	tj := []float64{p.TempC}
	h := NewHeating(s.Heat, []float64{1})
	st := h.Settle(p.TempC, func(_ int, t float64) float64 { return v * s.Junction.Saturation(t) }, tj)
	why := "the Schottky diode is reverse-biased (its leakage grows about a hundredfold from 25 to 85 °C)"
	r := blockedReverse(s, p, s.Junction.Saturation(tj[0]), why)
	r.WholePack.JunctionC = tj[0]
	if !st.OK {
		r.WholePack.JunctionC = s.Heat.TjMax
		r.WholePack.Current = s.Junction.Saturation(s.Heat.TjMax)
		r.WholePack.Note = "the Schottky diode is reverse-biased, but its leakage heats it faster than its package sheds the heat: it runs away past " +
			units.Human(s.Heat.TjMax, units.Temperature, 3) + " (" + units.Human(r.WholePack.Current, units.Current, 2) + " there and rising) and may fail"
	}
	return r
}

// AtTemp is an element whose temperature terms can be worked out once for
// a fixed ambient; the engine calls it once per evaluation.
type AtTemp interface {
	AtTemp(tempC float64) Element
}

// Fixed returns e with its temperature terms worked out for tempC when it
// supports that (AtTemp), else e itself. Results are identical; only the
// cost of Drop changes.
func Fixed(e Element, tempC float64) Element {
	if a, ok := e.(AtTemp); ok {
		return a.AtTemp(tempC)
	}
	return e
}

func (d Diode) AtTemp(tempC float64) Element {
	d.Junction = d.Junction.At(tempC)
	return d
}

func (s Schottky) AtTemp(tempC float64) Element {
	s.Junction = s.Junction.At(tempC)
	return s
}

func (m PMOS) AtTemp(tempC float64) Element {
	m.FET, _ = m.FET.atTemp(tempC)
	return m
}

func (m PMOSClamp) AtTemp(tempC float64) Element {
	m.FET, _ = m.FET.atTemp(tempC)
	return m
}

// fetTerms is a FET element's temperature terms at one temperature, in
// one allocation: its body diode's, its channel's and (a limiter) its
// sense transistor's.
type fetTerms struct {
	body, pnp junctionAt
	fet       fetAtTemp
	// pnpIs is the limiter's PNP's saturation current at 27 °C
	// (Limiter.PNP), which depends on its Vbe alone: kept so that fixing
	// the limiter again at another temperature does not work it out again.
	// vbe is the Vbe it was worked out from.
	pnpIs, vbe float64
}

// atTemp is f with its body diode's and its channel's terms worked out
// at tempC (the same arithmetic At and Shockley.Drop do at each call),
// and the terms' allocation, with room for a limiter's PNP.
func (f FET) atTemp(tempC float64) (FET, *fetTerms) {
	w := new(fetTerms)
	f.at = nil
	w.body = f.Body.termsAt(tempC)
	f.Body.at = &w.body
	w.fet = fetAtTemp{tempC: tempC, v: f.At(tempC)}
	f.at = &w.fet
	return f, w
}

func (l Limiter) AtTemp(tempC float64) Element {
	var w *fetTerms
	var q Shockley
	if l.terms != nil && l.terms.vbe == l.Vbe {
		q = Shockley{Is: l.terms.pnpIs, N: 1, Eg: pnpEg, XTI: pnpXTI} // l.PNP(), kept
	} else {
		q = l.PNP()
	}
	l.FET, w = l.FET.atTemp(tempC)
	w.pnpIs, w.vbe = q.Is, l.Vbe
	w.pnp = junctionAt{tempC: tempC, is: q.Saturation(tempC), nvt: ThermalVoltage(tempC + ZeroCelsius)}
	l.pnp, l.terms = &w.pnp, w
	return l
}
