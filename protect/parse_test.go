package protect

import (
	"math"
	"slices"
	"strings"
	"testing"

	"headroom/internal/units"
)

// The example specs shown to users (README, protect/doc.go), with a value each must have set. Values
// are decimal literals read back through units.Parse, so exact.
func TestParseExamples(t *testing.T) {
	for _, c := range []struct {
		spec string
		get  func(Element) float64
		want float64
	}{
		{"diode:is=10n,n=1.8,rs=0.08", func(e Element) float64 { return e.(Diode).Junction.Rs }, 0.08},
		{"schottky", func(e Element) float64 { return e.(Schottky).Junction.Eg }, 0.69},
		{"pmos:ron=45m,vref=4.5,vth=0.8", func(e Element) float64 { return e.(PMOS).Ron }, 45e-3},
		{"pmos-clamp:vz=5.1,rg=100k", func(e Element) float64 { return e.(PMOSClamp).Rg }, 100e3},
		{"limiter:rsh=8.2", func(e Element) float64 { return e.(Limiter).Rsh }, 8.2},
		{"limiter:rsh=8.2ohm", func(e Element) float64 { return e.(Limiter).Rsh }, 8.2},
		{"pptc:r=0.5,hold=0.3", func(e Element) float64 { return e.(PPTC).Trip }, 0.6}, // trip follows hold
		{"pptc:hold=1.1", func(e Element) float64 { return e.(PPTC).Trip }, 2.2},
		{"crowbar:fuse=0.5", func(e Element) float64 { return e.(Crowbar).Fuse }, 0.5},
		{"crowbar:fuse=2", func(e Element) float64 { return e.(Crowbar).RFuse }, 0.05}, // 0.1 Ω·A / 2 A
		{"ic:ron=0.1,iq=20u,ilim=0.5", func(e Element) float64 { return e.(IC).Iq }, 20e-6},
		{"ic:ilim=500mA", func(e Element) float64 { return e.(IC).Ilim }, 0.5},
		{"none", func(e Element) float64 { return e.Cost() }, 0},
		{" Diode : N = 2 ", func(e Element) float64 { return e.(Diode).Junction.N }, 2},
	} {
		e, err := Parse(c.spec)
		if err != nil {
			t.Errorf("%q: %v", c.spec, err)
			continue
		}
		if got := c.get(e); math.Abs(got-c.want) > 1e-15*math.Abs(c.want) {
			t.Errorf("%q: got %g, want %g", c.spec, got, c.want)
		}
	}
}

// Spec must re-parse to an equal element for every kind, with defaults and
// with every parameter moved off its default.
func TestSpecRoundTrip(t *testing.T) {
	var all []Element
	for _, k := range Kinds() {
		e := Default(k)
		all = append(all, e)
		s, _ := settableOf(e)
		for _, f := range s.fields() {
			// Move every value to an awkward but valid number.
			v := *f.p
			switch {
			case v == 0:
				v = math.Min(f.hi, 1e-7)
			default:
				v *= 1.0000000000000002 * 0.937
			}
			if f.inRange(v) {
				*f.p = v
			}
		}
		if err := validate(s); err != nil {
			t.Fatalf("%s: perturbed element invalid: %v", k, err)
		}
		all = append(all, s.value())
	}
	for _, e := range all {
		back, err := Parse(e.Spec())
		if err != nil {
			t.Errorf("%s: %v", e.Spec(), err)
			continue
		}
		if back != e {
			t.Errorf("round trip changed %s\n  to %s", e.Spec(), back.Spec())
		}
	}
}

func TestParseErrors(t *testing.T) {
	for _, c := range []struct {
		spec string
		want []string // all must appear in the message
	}{
		{"", []string{"empty", "diode"}},
		{"zener", []string{"unknown element", "zener", "none, diode, schottky, pmos, pmos-clamp, limiter, pptc, crowbar, ic"}},
		{"diode:n=5", []string{`"n"`, "5", "0.5", "4"}},
		{"diode:n=0.4", []string{`"n"`, "ideality"}},
		{"diode:is=0", []string{`"is"`, "above 0"}},
		{"diode:is=-1n", []string{`"is"`}},
		{"diode:is=abc", []string{`"is"`, "not a number"}},
		{"diode:is=10mV", []string{`"is"`, "current"}},
		{"diode:foo=1", []string{`"foo"`, "is, n, rs"}},
		{"diode:n=1,n=2", []string{`"n"`, "twice"}},
		{"diode:n", []string{`"n"`, "key=value"}},
		{"pmos:ron=0", []string{`"ron"`}},
		{"pmos:vth=0", []string{`"vth"`}},
		{"pmos:vth=5", []string{`"vref"`, "above vth"}},
		{"pmos-clamp:vz=0.5", []string{`"vz"`, "above vth"}},
		{"pmos-clamp:rg=-5", []string{`"rg"`}},
		{"limiter:rsh=0", []string{`"rsh"`, "sense"}},
		{"limiter:rsh=1V", []string{`"rsh"`, "resistance"}},
		{"pptc:hold=1,trip=0.5", []string{`"trip"`, "hold"}},
		{"crowbar:fuse=0", []string{`"fuse"`}},
		{"ic:ilim=nan", []string{`"ilim"`}},
		{"ic:iq=1e400", []string{`"iq"`}},
		{"none:x=1", []string{`"x"`, "no parameters"}},
		{"diode:cost=-1", []string{`"cost"`}},
		// Thermal keys: θ below 0, τ at or below 0, a package
		// stage above θja. theta=0 itself is an ideal heat sink and valid.
		{"diode:theta=-1", []string{`"theta"`}},
		{"pmos:tau=0", []string{`"tau"`, "above 0"}},
		{"pptc:tauf=-2", []string{`"tauf"`}},
		{"ic:thetaf=300", []string{`"thetaf"`, "at most theta"}},
		{"limiter:theta=50,thetaf=60", []string{`"thetaf"`}},
		{"schottky:thetaf=1000", []string{"schottky", `"thetaf"`}},
		{"pptc:hold=2,trip=1.5", []string{`"trip"`, "hold"}},
	} {
		_, err := Parse(c.spec)
		if err == nil {
			t.Errorf("%q: no error", c.spec)
			continue
		}
		msg := err.Error()
		if !strings.HasPrefix(msg, "protect: ") {
			t.Errorf("%q: message %q lacks the package prefix", c.spec, msg)
		}
		for _, w := range c.want {
			if !strings.Contains(msg, w) {
				t.Errorf("%q: message %q does not mention %q", c.spec, msg, w)
			}
		}
	}
}

func TestKindsAndDefaults(t *testing.T) {
	want := []string{"none", "diode", "schottky", "pmos", "pmos-clamp", "limiter", "pptc", "crowbar", "ic"}
	if got := Kinds(); !slices.Equal(got, want) {
		t.Errorf("Kinds() = %q, want %q", got, want)
	}
	for _, k := range Kinds() {
		e := Default(k)
		if e == nil || e.Kind() != k {
			t.Errorf("Default(%q) = %v", k, e)
			continue
		}
		if Describe(k) == "" {
			t.Errorf("Describe(%q) is empty", k)
		}
		if err := Validate(e); err != nil {
			t.Errorf("Default(%q) invalid: %v", k, err)
		}
	}
	if Default("zener") != nil || Describe("zener") != "" {
		t.Errorf("unknown kind gave a default or a description")
	}
	bad := DefaultPMOS()
	bad.Vref = 0.5
	if err := Validate(bad); err == nil || !strings.Contains(err.Error(), "vref") {
		t.Errorf("Validate(Vref < Vth) = %v", err)
	}
}

func TestMainKnob(t *testing.T) {
	wantKey := map[string]string{"diode": "is", "schottky": "is", "pmos": "vth", "pmos-clamp": "vz",
		"limiter": "rsh", "pptc": "hold", "crowbar": "fuse", "ic": "ilim"}
	for _, k := range Kinds() {
		e := Default(k)
		knob, ok := PrimaryOf(e)
		lo, hi, logScale, rok := PrimaryRange(k)
		if k == "none" {
			if ok || rok {
				t.Errorf("none has a knob")
			}
			if _, err := WithPrimary(e, 1); err == nil {
				t.Errorf("WithPrimary(none) gave no error")
			}
			continue
		}
		if !ok || !rok || knob.Key != wantKey[k] || knob.Min != lo || knob.Max != hi || knob.Log != logScale {
			t.Errorf("%s: knob %+v, range %g..%g", k, knob, lo, hi)
			continue
		}
		if knob.Value < lo || knob.Value > hi {
			t.Errorf("%s: default %g outside the slider range %g..%g", k, knob.Value, lo, hi)
		}
		// Set to a point inside the range and read it back exactly.
		v := lo + 0.37*(hi-lo)
		if logScale {
			v = lo * math.Pow(hi/lo, 0.37)
		}
		e2, err := WithPrimary(e, v)
		if err != nil {
			t.Errorf("%s: WithPrimary(%g): %v", k, v, err)
			continue
		}
		if k2, _ := PrimaryOf(e2); k2.Value != v {
			t.Errorf("%s: set %g, read %g", k, v, k2.Value)
		}
		if _, err := Parse(e2.Spec()); err != nil {
			t.Errorf("%s: moved element does not re-parse: %v", k, err)
		}
		if _, err := WithPrimary(e, -1); err == nil || !strings.Contains(err.Error(), knob.Key) {
			t.Errorf("%s: WithPrimary(-1) = %v, want an error naming %q", k, err, knob.Key)
		}
	}
	// Followers: a polyfuse keeps trip/hold, a bigger fuse has less
	// resistance and more I²t. Ratios of exact decimals: 1e-12.
	p, _ := WithPrimary(DefaultPPTC(), 0.9)
	if r := p.(PPTC).Trip / p.(PPTC).Hold; math.Abs(r-2) > 1e-12 {
		t.Errorf("pptc trip/hold after the knob = %g, want 2", r)
	}
	c, _ := WithPrimary(DefaultCrowbar(), 1)
	if cb := c.(Crowbar); math.Abs(cb.RFuse-0.1) > 1e-12 || math.Abs(cb.I2t-0.5) > 1e-12 {
		t.Errorf("1 A crowbar: %g Ω, %g A²s; want 0.1 Ω, 0.5 A²s", cb.RFuse, cb.I2t)
	}
	if k, _ := PrimaryOf(DefaultLimiter()); k.Kind != units.Resistance {
		t.Errorf("limiter knob kind %v", k.Kind)
	}
}
