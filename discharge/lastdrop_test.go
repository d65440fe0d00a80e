package discharge

import (
	"math"
	"math/rand/v2"
	"reflect"
	"testing"

	"headroom/protect"
)

// solveTo takes the element's drop at the operating point from the root
// finder's last call at that current instead of working it out again.
// On randomised designs (randomDesign: every load law, one to three
// phases, the library's cells) behind every kind of element at its
// defaults, Evaluate gives the same Result with and without the reuse to
// the last bit (tolerance 0: the drop reused is the element's law at the
// same current, input voltage and temperature, which is a pure function
// of them, so nothing downstream can differ).
func TestReusedDropMatchesFreshDrop(t *testing.T) {
	rng := rand.New(rand.NewPCG(17, 29))
	kinds := []string{"none", "diode", "schottky", "pmos", "pmos-clamp", "limiter", "pptc", "ic", "crowbar"}
	defer func() { reuseDrop = true }()
	for n := 0; n < 180; n++ {
		d := randomDesign(rng)
		el, err := protect.Parse(kinds[n%len(kinds)])
		if err != nil {
			t.Fatal(err)
		}
		d.Protect = el
		reuseDrop = false
		ref, err2 := Evaluate(d)
		reuseDrop = true
		got, err1 := Evaluate(d)
		if (err1 == nil) != (err2 == nil) {
			t.Fatalf("design %d: errors differ: %v / %v", n, err1, err2)
		}
		if err1 != nil {
			continue
		}
		fv, gv := reflect.ValueOf(*got), reflect.ValueOf(*ref)
		for i := range fv.NumField() {
			a, b := fv.Field(i), gv.Field(i)
			if a.Kind() == reflect.Float64 && math.IsNaN(a.Float()) && math.IsNaN(b.Float()) {
				continue
			}
			if !reflect.DeepEqual(a.Interface(), b.Interface()) {
				t.Errorf("design %d (%s): %s %v reusing the drop, %v working it out again",
					n, el.Kind(), fv.Type().Field(i).Name, a.Interface(), b.Interface())
			}
		}
	}
}
