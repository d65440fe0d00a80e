package protect

import (
	"errors"
	"strings"
	"testing"
)

// Every refusal from Parse is a *SpecError naming the kind and key it is
// about, and Unprefixed leaves off only the "protect: " prefix while the
// chain still reaches the SpecError (callers used to cut the prefix off
// the text and lost it).
func TestSpecError(t *testing.T) {
	cases := []struct {
		spec, kind, key, detail string
	}{
		{"", "", "", "empty element spec"},
		{"wire", "", "", `unknown element "wire"`},
		{"diode:is", "diode", "", `diode: "is" is not key=value`},
		{"diode:zz=1", "diode", "", `diode: unknown key "zz"`},
		{"none:x=1", "none", "", `none: unknown key "x": none takes no parameters`},
		{"diode:n=1,n=2", "diode", "", `diode: key "n" given twice`},
		{"diode:is=abc", "diode", "is", `diode: key "is": `},
		{"diode:is=0", "diode", "is", `diode: key "is": 0 A is out of range`},
		{"pmos:vref=1,vth=2", "pmos", "vref", `pmos: key "vref": 1V must be above vth 2V`},
		{"pmos-clamp:vz=1,vth=2", "pmos-clamp", "vz", `pmos-clamp: key "vz": `},
		{"pptc:hold=1,trip=0.5", "pptc", "trip", `pptc: key "trip": `},
	}
	for _, c := range cases {
		_, err := Parse(c.spec)
		var se *SpecError
		if !errors.As(err, &se) {
			t.Errorf("Parse(%q) = %v, want a *SpecError", c.spec, err)
			continue
		}
		if se.Kind != c.kind || se.Key != c.key {
			t.Errorf("Parse(%q): kind %q key %q, want %q %q", c.spec, se.Kind, se.Key, c.kind, c.key)
		}
		if !strings.HasPrefix(se.Detail(), c.detail) {
			t.Errorf("Parse(%q): detail %q, want it to start %q", c.spec, se.Detail(), c.detail)
		}
		if err.Error() != "protect: "+se.Detail() {
			t.Errorf("Parse(%q): message %q is not the prefix and the detail", c.spec, err)
		}
		u := Unprefixed(err)
		if u.Error() != se.Detail() {
			t.Errorf("Unprefixed(%q) = %q, want %q", c.spec, u, se.Detail())
		}
		var back *SpecError
		if !errors.As(u, &back) || back != se {
			t.Errorf("Unprefixed(%q) lost the *SpecError", c.spec)
		}
	}
	plain := errors.New("other")
	if Unprefixed(plain) != plain {
		t.Errorf("Unprefixed changed an error that is not protect's")
	}
	if _, err := WithPrimary(None{}, 1); !errors.As(err, new(*SpecError)) {
		t.Errorf("WithPrimary on a kind with no knob: %v, want a *SpecError", err)
	}
}
