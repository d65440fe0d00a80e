package discharge

import (
	"slices"
	"strings"
	"testing"

	"headroom/curves"
)

// The cautions have one home, curves (PackCautions): the pack's cautions
// are that list for the pack's cell count, for every library cell (a
// toy-safety reminder may follow); a single cell gets no warning against
// mixing cells and a pack of two does.
func TestCautionsOneHome(t *testing.T) {
	for _, c := range curves.Library() {
		for _, n := range []int{1, 2, 6} {
			got := Cautions(c, n)
			want := curves.PackCautions(c, n)
			extra := len(got) - len(want)
			if extra < 0 || !slices.Equal(got[:len(want)], want) || extra > 1 || extra == 1 && !strings.Contains(got[len(got)-1], "IEC 62115") {
				t.Errorf("%s, %d cells: %q\nwant curves.PackCautions (and at most the toy-safety line): %q", c.ID, n, got, want)
			}
			mixing := slices.ContainsFunc(got, func(s string) bool { return strings.Contains(s, "mix old and new") })
			if mixing != (n > 1) {
				t.Errorf("%s, %d cells: mixing caution shown %v", c.ID, n, mixing)
			}
		}
	}
}
