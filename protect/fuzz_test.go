package protect

import (
	"math"
	"strings"
	"testing"
)

// FuzzParse checks the spec parser: a spec either fails with a
// "protect: " error or gives a valid element whose Spec and Short both
// parse back to the same element (same Spec text, which lists every
// parameter with a round-tripping decimal), whose main knob can be set to
// its own value without change, and whose models give finite numbers.
func FuzzParse(f *testing.F) {
	for _, k := range Kinds() {
		f.Add(k)
		f.Add(Default(k).Spec())
	}
	for _, s := range []string{
		"diode:is=10n,n=1.8,rs=0.08", "pmos:ron=45m,vref=4.5,vth=0.8", "pmos-clamp:vz=5.1,rg=100k",
		"limiter:rsh=8.2ohm", "pptc:r=0.5,hold=0.3", "pptc:hold=0.3,trip=1", "pptc:derate=50%",
		"crowbar:fuse=0.5", "crowbar:fuse=2,rfuse=0.05", "pptc:hold=0.5,trip=0.6", "crowbar:fuse=1,rfuse=0.2", "ic:ron=0.1,iq=20u,ilim=0.5", " Diode : N = 2 ",
		"diode:cost=$0.02", "diode:cost=0.02", "pptc:derate=33.3%",
		// nasty
		"", ":", "diode:", "diode:,", "diode:=", "diode:is", "diode:is=", "diode:is=NaN", "diode:is=Inf",
		"diode:is=1e400", "diode:is=-1", "diode:n=0", "diode:is=1n,is=2n", "bogus", "none:x=1",
		"pmos:vth=5,vref=1", "pptc:hold=2,trip=1", "crowbar:fuse=0", "diode:rs=1e-320",
		"diode:tjmax=25", "diode:theta=0", "limiter:rsh=0.1m", "ic:ilim=3mA,iq=9", "diode:is=1n:n=2",
		"\x00", "diode:is=\xff", "DIODE:IS=1N",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, spec string) {
		e, err := Parse(spec)
		if err != nil {
			if e != nil {
				t.Fatalf("Parse(%q) returned %v with error %v", spec, e, err)
			}
			if !strings.HasPrefix(err.Error(), "protect: ") || strings.Contains(err.Error(), "\n") {
				t.Fatalf("Parse(%q) error %q: want one line starting \"protect: \"", spec, err)
			}
			return
		}
		if err := Validate(e); err != nil {
			t.Fatalf("Parse(%q) gave an invalid element: %v", spec, err)
		}
		full := e.Spec()
		for _, text := range []string{full, Short(e)} {
			back, err := Parse(text)
			if err != nil {
				t.Fatalf("Parse(%q): %s does not parse back: %v", spec, text, err)
			}
			if back.Spec() != full {
				t.Fatalf("Parse(%q): %s parses back as %s, want %s", spec, text, back.Spec(), full)
			}
		}
		if k, ok := PrimaryOf(e); ok {
			same, err := WithPrimary(e, k.Value)
			if err != nil {
				t.Fatalf("%s: WithPrimary(%s=%v), its own value: %v", full, k.Key, k.Value, err)
			}
			if same.Spec() != full {
				t.Fatalf("%s: WithPrimary to its own %s gives %s", full, k.Key, same.Spec())
			}
		}
		// The models must stay finite at ordinary and odd operating points
		// (the Element contract: Drop at least 0 and finite, Quiescent at
		// least 0).
		for _, tc := range []float64{-40, 20, 85} {
			for _, vin := range []float64{0, 1.5, 3, 48} {
				q := e.Quiescent(vin, tc)
				if !(q >= 0) || math.IsInf(q, 0) {
					t.Fatalf("%s: Quiescent(%v V, %v °C) = %v", full, vin, tc, q)
				}
				prev := 0.0
				for _, i := range []float64{0, 1e-6, 0.01, 0.5, 5} {
					d := e.Drop(i, vin, tc)
					if !(d >= 0) || math.IsInf(d, 0) {
						t.Fatalf("%s: Drop(%v A, %v V, %v °C) = %v", full, i, vin, tc, d)
					}
					// Drop must not fall as the current rises (contract);
					// 1e-12 V absorbs rounding in the element laws.
					if d < prev-1e-12 {
						t.Fatalf("%s: Drop falls from %v to %v V at %v A (%v V, %v °C)", full, prev, d, i, vin, tc)
					}
					prev = d
				}
			}
			if l := e.Limit(tc); math.IsNaN(l.Clamp) || math.IsNaN(l.Trip) || l.Clamp <= 0 || l.Trip <= 0 {
				t.Fatalf("%s: Limit(%v °C) = %+v", full, tc, l)
			}
		}
	})
}
