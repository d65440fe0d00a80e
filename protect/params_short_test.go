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
