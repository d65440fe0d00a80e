// Package spicenet turns a headroom design into an ngspice transient
// netlist, so that a general-purpose circuit simulator can compute the same
// runtime independently of the engine's charge-domain quadrature. The
// discharge cross-check test and the speed comparison (cmd/spicebench)
// share it.
//
// The circuit (docs/references.md, "ngspice"):
//
//   - a charge counter: a current-controlled current source copies the
//     pack current (and the cells' self-discharge) into a capacitor, so
//     that the capacitor's voltage is the charge drawn;
//   - the pack: a behavioural voltage source E(q) − I·Rp(q) with E and Rp
//     as pwl() tables of that charge, straight from the cell's curve and
//     resistance table (docs/cells.md: V = Vcurve − (I − Iref)·R per cell, S in
//     series, P in parallel, pack resistance S·R/P);
//   - the protection element as ngspice's own devices: a diode model with
//     the element's IS, N, RS, EG, XTI; a level-1 PMOS with KP·W/L matching
//     the rated on-resistance plus a separate body diode; the current
//     limiter as its discrete circuit (a reverse-blocking PMOS, then the
//     sense resistor, PNP, pass PMOS turned the other way, gate divider);
//   - the load as a behavioural current source following its law, switched
//     between the phases of a pulsed profile by periodic PWL selectors.
//
// Time is scaled so that one simulated second is one hour: the counter's
// capacitance is 1 mF·P·F instead of 3600 F·P·F, so its voltage is the
// charge in mAh along one cell's curve (P strings share the pack current
// and F is the capacity factor from rate and temperature). Because every
// element is memoryless, only the counter holds state, and dividing its
// capacitance by 3.6e6 while multiplying every duration by 1/3600 leaves
// the waveform, and so the cut-off, the same point for point; the
// simulator's tolerances then see numbers near 1 instead of 1e5.
package spicenet

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/spice"
	"headroom/protect"
)

// Guard voltages keep the behavioural loads solvable once the load voltage
// has collapsed (a current limiter clamping a pulse, a pack driven flat):
// a constant-current load fades out below about CCGuard, and a
// constant-power load turns into a resistor below CPGuard. Both sit far
// below any floor the designs use, so they change nothing before cut-off.
const (
	CCGuard = 0.01 // volts
	CPGuard = 0.1  // volts
)

// Options shape one simulation.
type Options struct {
	// CapacityFactor is Ceff/Cref, the fraction of the curve's charge the
	// cells deliver at this load and temperature: the engine's
	// Result.CapacityFactor (Peukert and temperature; headroom's own model,
	// which a circuit simulator has no notion of). Above 0.
	CapacityFactor float64
	// StopHours is the longest span to simulate, hours. Above 0.
	StopHours float64
	// Steps bounds the largest time step at StopHours/Steps; 0 means 4000.
	Steps int
	// NoStop simulates the whole span instead of halting at the cut-off
	// (to see what happens after it, e.g. a limiter clamping a pulse).
	NoStop bool
}

// Build writes the ngspice netlist for design d. Daily patterns
// (HoursPerDay other than 0 or 24) and standby currents are not modelled:
// the circuit runs continuously. Elements other than none, diode,
// schottky, pmos and limiter are errors.
func Build(d *discharge.Design, o Options) (string, error) {
	if err := d.Validate(); err != nil {
		return "", fmt.Errorf("spicenet: %w", err)
	}
	if d.HoursPerDay != 0 && d.HoursPerDay != 24 || d.Standby != 0 {
		return "", fmt.Errorf("spicenet: only continuous use is modelled: set hours per day to 0 and standby to 0")
	}
	if !(o.CapacityFactor > 0) || !(o.StopHours > 0) {
		return "", fmt.Errorf("spicenet: capacity factor %v and stop time %v h must be above 0", o.CapacityFactor, o.StopHours)
	}
	steps := o.Steps
	if steps == 0 {
		steps = 4000
	}
	c := d.Cell
	S, P := float64(d.Series), float64(d.Parallel)
	T := d.TempC
	end := c.Curve.End()
	var b strings.Builder
	fmt.Fprintf(&b, "headroom design: %d x %s, %s, %s, floor %s V, %s C\n",
		d.Series, c.ID, spec(d.Protect), discharge.FormatProfile(d.Profile), g(d.Floor), g(T))

	// Charge counter: Fq copies the pack current (through Vsense) into Cq;
	// Iself adds the self-discharge the engine counts, a steady drain of
	// the cell's fraction per month of rated capacity, doubling every 10 °C
	// above the reference (discharge.selfDischarge). v(qs) is mAh along one
	// cell's curve.
	selfA := c.SelfDischarge * c.RatedMAh * P / 730.5 * math.Pow(2, (T-curves.RefTempC)/10) / 1000
	fmt.Fprintf(&b, "Fq 0 qs Vsense 1\nCq qs 0 %s\nIself 0 qs DC %s\n.ic v(qs)=0\n", g(1e-3*P*o.CapacityFactor), g(selfA))

	// The pack: E = S·(Vcurve + Iref·(R0 + ΣRᵢ)) with the resistances at
	// the reference temperature (curves.Cell.OpenCircuit), R0 at the
	// ambient in series, R0p = S·R0/P, both pwl() of v(qs). ngspice
	// extends pwl() linearly beyond its end points, so each table gets
	// flat extensions to hold its end values, as the cell does.
	vq, vv := curveTable(c)
	rq, rv := resistanceTable(c, T)
	r20q, r20v := resistanceTable(c, curves.RefTempC)
	if _, fr := c.TempFactors(curves.RefTempC); fr != 1 {
		for i := range r20v { // the table's own ohms, not scaled by a factor at 20 °C
			r20v[i] /= fr
		}
	}
	vpwl := pwl("v(qs)", vq, vv, end)
	rpwl := pwl("v(qs)", rq, rv, end)
	r20pwl := pwl("v(qs)", r20q, r20v, end)
	// The polarisation branches, each its own state: a current-controlled
	// source copies the pack current into 1 kΩ ∥ τᵢ/(3600·1 kΩ), so the
	// node's voltage is 1000 × the pack current filtered by the branch
	// (time scaled as above), and the pack subtracts S·Rᵢ/P (ohms at the
	// ambient) times that current. Kept apart from the pack's current
	// loop because farad-sized capacitors there leave ngspice's absolute
	// current tolerance out of reach. They start discharged (the load
	// ramps up from zero).
	_, fr := c.TempFactors(T)
	// Self-heating (curves.Cell.ThermalStage): node tc holds one cell's
	// rise above the ambient, K — a current source of the cell's
	// dissipation (W) into θ ∥ C/3600 (time in hours), starting at the
	// ambient. gT is the resistance factor at the cell's temperature
	// relative to the ambient's, fr(Ta + v(tc))/fr(Ta), a pwl() of v(tc)
	// on the temperature table's points (held at its ends); every
	// resistance of the pack is multiplied by it. "1" without thermal data.
	gT := "1"
	if c.SelfHeats() && len(c.Temperature) > 0 {
		us, gs := make([]float64, len(c.Temperature)), make([]float64, len(c.Temperature))
		for i, tp := range c.Temperature {
			us[i], gs[i] = tp.Celsius-T, tp.Resistance/fr
		}
		gT = pwl("v(tc)", us, gs, 1000)
	}
	var pol, polW strings.Builder
	for i, st := range c.RC {
		rb := S * st.R * fr / P
		fmt.Fprintf(&b, "Frc%d 0 x%d Vsense 1\nRrc%d x%d 0 1000\nCrc%d x%d 0 %s\n", i+1, i+1, i+1, i+1, i+1, i+1, g(st.Tau/3600/1000))
		fmt.Fprintf(&pol, " - v(x%d)*%s*%s", i+1, g(rb/1000), gT)
		// One cell's branch voltage: its R at the cell's temperature
		// times the filtered per-cell current.
		fmt.Fprintf(&polW, " + v(x%d)*%s*%s", i+1, g(st.R*fr/P/1000), gT)
	}
	fmt.Fprintf(&b, "Bpack pk 0 V = %s*(%s + %s*(%s + %s)) - i(Vsense)*%s*%s*%s%s\n", g(S), vpwl, g(c.RefCurrent), r20pwl, g(c.PolarisationOhms()), g(S/P), rpwl, gT, pol.String())
	if c.SelfHeats() {
		// The cell's heat: its current i/P times (R0·i/P + Σ branch volts),
		// R0 = rpwl, one cell's.
		fmt.Fprintf(&b, "Bheat 0 tc I = (i(Vsense)/%s)*((i(Vsense)/%s)*%s*%s + 0%s)\n", g(P), g(P), rpwl, gT, polW.String())
		fmt.Fprintf(&b, "Rth tc 0 %s\nCth tc 0 %s\n.ic v(tc)=0\n", g(c.ThermalRes), g(c.HeatCapacity/3600))
	}
	b.WriteString("Vsense pk a DC 0\n")

	// The protection element from a (pack terminal) to ld (load).
	if err := element(&b, d.Protect, T); err != nil {
		return "", err
	}
	// Load current meter and the load law.
	b.WriteString("Vil ld lx DC 0\n")
	// The load switches on over the first millionth of the span: the
	// operating point at t = 0 is then the unloaded pack, and the
	// simulation follows the load's stable operating point from there (a
	// constant-power load has two, docs/loads.md, and a solver started cold
	// can land on the low, unstable one). The ramp misses half its width
	// of load charge: 5e-7 of the span.
	fmt.Fprintf(&b, "Vstart st 0 PWL(0 0 %s 1)\n", g(1e-6*o.StopHours))
	fmt.Fprintf(&b, "Bload lx 0 I = v(st)*(%s)\n", loadExpr(&b, d.Profile))

	fmt.Fprintf(&b, ".temp %s\n", g(T))
	// Tolerances: reltol 1e-6 keeps the Newton error on the pack current,
	// and so on the charge it integrates, at parts per million.
	b.WriteString(".options reltol=1e-6 abstol=1e-12 vntol=1e-9 method=gear\n")
	b.WriteString(".control\n")
	if !o.NoStop {
		fmt.Fprintf(&b, "stop when v(ld) < %s\nstop when v(a) < %s\nstop when v(qs) > %s\n",
			g(d.Floor), g(S*c.EndPoint), g(end))
	}
	tmax := o.StopHours / float64(steps)
	fmt.Fprintf(&b, "tran %s %s 0 %s\n", g(tmax), g(o.StopHours), g(tmax))
	// A crossing that never happens makes "meas ... when" print an error,
	// so a stopped run prints its last two time points instead and Parse
	// interpolates the crossing between them; the run stops at the first
	// point past any of the three conditions.
	if o.NoStop {
		fmt.Fprintf(&b, "meas tran tfloor when v(ld)=%s fall=1\n", g(d.Floor))
	} else {
		b.WriteString("let n = length(time)\n")
		for _, x := range []struct{ name, vec string }{{"t", "time"}, {"ld", "v(ld)"}, {"a", "v(a)"}, {"q", "v(qs)"}} {
			fmt.Fprintf(&b, "let %s_1 = %s[n-2]\nlet %s_2 = %s[n-1]\nprint %s_1 %s_2\n", x.name, x.vec, x.name, x.vec, x.name, x.name)
		}
	}
	b.WriteString("meas tran vmin min v(ld)\nmeas tran ipeak max i(vil)\n")
	fmt.Fprintf(&b, "echo floor = %s\necho endv = %s\necho qend = %s\n", g(d.Floor), g(S*c.EndPoint), g(end))
	b.WriteString("quit 0\n.endc\n.end\n")
	return b.String(), nil
}

// curveTable returns the cell's curve points (mAh along the curve, volts).
func curveTable(c *curves.Cell) (q, v []float64) {
	n := c.Curve.Len()
	q, v = make([]float64, n), make([]float64, n)
	for i := range q {
		q[i], v[i] = c.Curve.Point(i)
	}
	return q, v
}

// resistanceTable returns the cell's resistance against charge along the
// curve at tempC. The table is piecewise linear in depth with corners at
// its points, so sampling the cell's own ResistanceAt there and joining
// the samples with straight lines reproduces it exactly.
func resistanceTable(c *curves.Cell, tempC float64) (q, r []float64) {
	end := c.Curve.End()
	if len(c.Resistance) == 0 {
		return []float64{0, end}, []float64{0, 0}
	}
	for _, p := range c.Resistance {
		x := p.Depth * end
		q = append(q, x)
		r = append(r, c.ResistanceAt(x, tempC))
	}
	if len(q) == 1 {
		q, r = append(q, q[0]+end), append(r, r[0])
	}
	return q, r
}

// pwl writes ngspice's pwl(x, x0, y0, …) with flat extensions one curve
// length beyond both ends.
func pwl(x string, xs, ys []float64, span float64) string {
	var b strings.Builder
	fmt.Fprintf(&b, "pwl(%s, %s, %s", x, g(xs[0]-span), g(ys[0]))
	for i := range xs {
		fmt.Fprintf(&b, ", %s, %s", g(xs[i]), g(ys[i]))
	}
	fmt.Fprintf(&b, ", %s, %s)", g(xs[len(xs)-1]+span), g(ys[len(ys)-1]))
	return b.String()
}

// element writes the protection element between nodes a and ld.
func element(b *strings.Builder, e protect.Element, tempC float64) error {
	switch el := e.(type) {
	case nil, protect.None:
		b.WriteString("Vnone a ld DC 0\n")
	case protect.Diode:
		b.WriteString("Dser a ld dser\n")
		b.WriteString(diodeModel("dser", el.Junction))
	case protect.Schottky:
		b.WriteString("Dser a ld dser\n")
		b.WriteString(diodeModel("dser", el.Junction))
	case protect.PMOS:
		// Gate to ground; the channel's pack-side terminal is its drain
		// (ngspice's level-1 model is symmetric and takes the higher
		// terminal as the source, as the engine does); bulk tied to the
		// load side so that the body diode points from pack to load.
		// The fixed part of the on-resistance sits on the channel's load
		// side (protect.FET), with the body diode across the channel.
		b.WriteString("Mser a 0 lc lc pser W=1u L=1u\n")
		fmt.Fprintf(b, "Rfix lc ld %s\n", g(el.At(tempC).Rfix))
		b.WriteString(fetModel("pser", el.FET, tempC))
		b.WriteString("Dbody a lc dbody\n")
		b.WriteString(diodeModel("dbody", el.Body))
	case protect.Limiter:
		writeLimiter(b, el, tempC)
	default:
		return fmt.Errorf("spicenet: element %q has no circuit here (none, diode, schottky, pmos, limiter)", e.Kind())
	}
	return nil
}

// fetModel is a level-1 PMOS with W = L, so that KP is K = KP·W/L, the
// Shichman–Hodges (1968) factor that makes the linear-region channel
// resistance 1/(K·(|Vgs| − Vth)) equal the channel part of Ron at |Vgs| =
// Vref. The model's own drain and source junctions are made negligible
// (IS 1e-30 A): the body diode is a separate diode with the element's
// parameters. K and Vth are the element's at tempC (protect.FET.At, its
// own temperature law), and the model's TNOM is tempC, so that ngspice,
// running at .temp tempC, scales nothing.
func fetModel(name string, f protect.FET, tempC float64) string {
	a := f.At(tempC)
	return fmt.Sprintf(".model %s PMOS(LEVEL=1 VTO=%s KP=%s IS=1e-30 TNOM=%s)\n", name, g(-a.Vth), g(a.K()), g(tempC))
}

// diodeModel is ngspice's junction diode with the element's Shockley
// parameters; ngspice's nominal temperature is 27 °C, as protect's.
func diodeModel(name string, s protect.Shockley) string {
	return fmt.Sprintf(".model %s D(IS=%s N=%s RS=%s EG=%s XTI=%s)\n", name, g(s.Is), g(s.N), g(s.Rs), g(s.Eg), g(s.XTI))
}

// writeLimiter writes the discrete current limiter as two P-channel
// MOSFETs in the rail (protect.Limiter):
//
//   - the blocking FET, as PMOS: drain at the pack (a), gate to ground,
//     source and bulk at n, body diode from a to n (pack to load);
//   - each FET's fixed resistance Rfix on its load side;
//   - Rsh from n to m, and a PNP with its emitter at n (pack side of Rsh),
//     its base at m and its collector on the pass FET's gate gt: ngspice's
//     own Gummel–Poon model with the element's saturation current
//     (protect.Limiter.PNP) and its own temperature law at .temp;
//   - the pass FET turned the other way: source and bulk at m (pack side),
//     drain at the load ld, body diode from ld to m (load to pack), so
//     that with its channel off no forward current passes;
//   - the divider R1 (m to gt) and R2 (gt to ground);
//   - 100 MΩ from the load node to ground. Once the pass FET saturates
//     at the clamp, the load node hangs between two near-ideal current
//     sinks (the saturated channel and the constant-current load well
//     above its guard) and ngspice's Newton iteration stalls at the
//     pulse edge ("timestep too small", measured with ngspice 39); the
//     resistor gives the node a path to ground and draws 30 nA from 3 V,
//     1e-7 of a 300 mA load.
//
// The engine's limiter is this circuit's law (protect.Limiter: the PNP
// by Ebers–Moll, the FETs by Shichman–Hodges) less the PNP's base current
// and the divider's current through Rsh.
func writeLimiter(b *strings.Builder, l protect.Limiter, tempC float64) {
	rf := g(l.At(tempC).Rfix)
	b.WriteString("Mblk a 0 nb nb pser W=1u L=1u\n")
	b.WriteString("Dblk a nb dbody\n")
	fmt.Fprintf(b, "Rfixb nb n %s\n", rf)
	fmt.Fprintf(b, "Rsh n m %s\n", g(l.Rsh))
	b.WriteString("Qlim gt m n qlim\n")
	fmt.Fprintf(b, ".model qlim PNP(IS=%s BF=100)\n", g(l.PNP().Is))
	b.WriteString("Mpass lp gt m m pser W=1u L=1u\n")
	b.WriteString("Dpass lp m dbody\n")
	fmt.Fprintf(b, "Rfixp lp ld %s\n", rf)
	b.WriteString(fetModel("pser", l.FET, tempC))
	b.WriteString(diodeModel("dbody", l.Body))
	fmt.Fprintf(b, "R1 m gt %s\nR2 gt 0 %s\n", g(l.R1), g(l.R2))
	b.WriteString("Rld ld 0 100e6\n")
}

// loadExpr returns the load current's expression in v(ld) (through the
// meter, v(lx) = v(ld)); a profile of several phases adds one periodic
// selector source per phase to b.
func loadExpr(b *strings.Builder, phases []discharge.Phase) string {
	if len(phases) == 1 {
		return law(phases[0].Load)
	}
	// Selectors: phase k's PULSE source is 1 during the phase and 0
	// otherwise, rising over eps at the phase's start and falling over eps
	// at its end, where the next phase's rises, so their sum is 1 (but for
	// the first eps of the run) and every phase keeps its exact duration.
	// PULSE rather than a repeating PWL because ngspice-39 places its time
	// steps on the corners of every period of a PULSE, and misses those of
	// a repeated PWL (a charge error of tens of percent, measured).
	period := 0.0
	minDur := math.Inf(1)
	for _, p := range phases {
		period += p.Seconds / 3600
		minDur = math.Min(minDur, p.Seconds/3600)
	}
	eps := 1e-3 * minDur
	var terms []string
	start := 0.0
	for k, p := range phases {
		dur := p.Seconds / 3600
		fmt.Fprintf(b, "Vsel%d s%d 0 PULSE(0 1 %s %s %s %s %s)\n", k, k, g(start), g(eps), g(eps), g(dur-eps), g(period))
		terms = append(terms, fmt.Sprintf("v(s%d)*(%s)", k, law(p.Load)))
		start += dur
	}
	return strings.Join(terms, " + ")
}

// law is one load law's current in terms of v(lx).
func law(l discharge.Load) string {
	switch l.Kind {
	case discharge.ConstantCurrent:
		return fmt.Sprintf("%s*(1 - exp(-max(v(lx), 0)/%s))", g(l.Amps), g(CCGuard))
	case discharge.ConstantPower:
		return fmt.Sprintf("%s*v(lx)/max(v(lx)*v(lx), %s)", g(l.InputPower()), g(CPGuard*CPGuard))
	case discharge.ConstantResistance:
		return fmt.Sprintf("v(lx)/%s", g(l.Ohms))
	case discharge.LED:
		return fmt.Sprintf("max(v(lx) - %s, 0)/%s", g(l.Vf), g(l.Ohms))
	}
	panic("spicenet: unknown load kind")
}

func spec(e protect.Element) string {
	if e == nil {
		return "none"
	}
	return e.Spec()
}

func g(x float64) string { return strconv.FormatFloat(x, 'g', 12, 64) }

// Cause is what ended the simulated run.
type Cause string

const (
	Floor    Cause = "floor"     // the load voltage fell to the floor
	EndPoint Cause = "end-point" // a cell's terminal voltage fell to its end-point, or its curve ran out
	None     Cause = ""          // nothing within the simulated span
)

// Result is what one ngspice run gives.
type Result struct {
	CutoffH  float64 // simulated hours to the first cut-off; 0 when Cause is None
	Cause    Cause
	MinLoadV float64 // lowest load voltage seen, volts
	PeakA    float64 // highest load current seen, amperes
}

// Run runs ngspice on a netlist from Build and reads the cut-off.
func Run(netlist string) (Result, error) {
	out, err := spice.Run(netlist)
	if err != nil {
		return Result{}, err
	}
	return Parse(out)
}

// Parse reads a Result from ngspice's output for a netlist from Build.
func Parse(out string) (Result, error) {
	v := spice.Values(out)
	r := Result{}
	var ok1, ok2 bool
	r.MinLoadV, ok1 = v["vmin"]
	r.PeakA, ok2 = v["ipeak"]
	if !ok1 || !ok2 {
		return Result{}, fmt.Errorf("spicenet: ngspice printed no measurements: %s", tailOf(out))
	}
	if t, ok := v["tfloor"]; ok { // a run with NoStop
		r.CutoffH, r.Cause = t, Floor
		return r, nil
	}
	get := func(name string) (float64, float64, bool) {
		x1, ok1 := v[name+"_1"]
		x2, ok2 := v[name+"_2"]
		return x1, x2, ok1 && ok2
	}
	t1, t2, okT := get("t")
	ld1, ld2, okL := get("ld")
	a1, a2, okA := get("a")
	q1, q2, okQ := get("q")
	floor, okF := v["floor"]
	endV, okE := v["endv"]
	qEnd, okQE := v["qend"]
	if !(okT && okL && okA && okQ && okF && okE && okQE) {
		return Result{}, fmt.Errorf("spicenet: ngspice printed no end values: %s", tailOf(out))
	}
	// cross returns where x falls through (or, rising, reaches) the limit
	// between the two points, linearly; ok is false when it does not.
	cross := func(x1, x2, lim float64, rising bool) (float64, bool) {
		if rising {
			x1, x2, lim = -x1, -x2, -lim
		}
		if !(x2 < lim) || x1 < lim || x1 == x2 {
			return 0, false
		}
		return t1 + (t2-t1)*(x1-lim)/(x1-x2), true
	}
	r.CutoffH = math.Inf(1)
	if t, ok := cross(ld1, ld2, floor, false); ok && t < r.CutoffH {
		r.CutoffH, r.Cause = t, Floor
	}
	if t, ok := cross(a1, a2, endV, false); ok && t < r.CutoffH {
		r.CutoffH, r.Cause = t, EndPoint
	}
	if t, ok := cross(q1, q2, qEnd, true); ok && t < r.CutoffH {
		r.CutoffH, r.Cause = t, EndPoint
	}
	if r.Cause == None {
		r.CutoffH = 0
	}
	return r, nil
}

func tailOf(s string) string {
	s = strings.TrimSpace(s)
	if len(s) > 400 {
		s = "…" + s[len(s)-400:]
	}
	return s
}
