package protect

import "testing"

// Short must round-trip through Parse like Spec, and stay short for
// defaults.
func TestShortRoundTrips(t *testing.T) {
	for _, spec := range []string{"none", "diode", "schottky", "pmos:vth=1.2", "pmos-clamp:vz=5.1,rg=100k",
		"limiter:rsh=8.2", "pptc:r=0.5,hold=0.3", "crowbar:fuse=0.5", "ic:ron=0.1,iq=20u,ilim=0.5", "diode:is=2.5n,n=1.75,rs=0.1"} {
		e, err := Parse(spec)
		if err != nil {
			t.Fatal(err)
		}
		s := Short(e)
		back, err := Parse(s)
		if err != nil {
			t.Fatalf("%s → %s: %v", spec, s, err)
		}
		if back.Spec() != e.Spec() {
			t.Errorf("%s → %s → %s, want %s", spec, s, back.Spec(), e.Spec())
		}
		if d := Default(e.Kind()); d.Spec() == e.Spec() && s != e.Kind() {
			t.Errorf("default %s written as %q, want just the kind", spec, s)
		}
	}
}

// A value the others derive exactly is not written: a polyfuse given only
// its hold reads back as just its hold, not with a 17-digit resistance and
// a trip that the hold sets anyway (pick's ladder showed
// "pptc:r=105.15847704228555mohm,hold=1.1A,trip=2.2A").
func TestShortLeavesOutDerivedKeys(t *testing.T) {
	for spec, want := range map[string]string{
		"pptc:hold=1.1":          "pptc:hold=1.1A",
		"pptc:hold=0.5":          "pptc:hold=500mA",
		"pptc:hold=0.5,trip=1.5": "pptc:hold=500mA,trip=1.5A",
		"crowbar:fuse=1":         "crowbar:fuse=1A",
	} {
		e, err := Parse(spec)
		if err != nil {
			t.Fatal(err)
		}
		if got := Short(e); got != want {
			t.Errorf("Short(%s) = %q, want %q", spec, got, want)
		}
	}
}
