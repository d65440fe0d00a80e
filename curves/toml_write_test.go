package curves

import (
	"bytes"
	"reflect"
	"strings"
	"testing"

	"headroom/internal/rc"
)

// What WriteCellTOML writes, ReadCellTOML reads back to the same cell:
// every library cell, and one with polarisation branches and a cut-off.
// Exact equality: numbers are written in the shortest round-tripping form.
func TestWriteCellTOMLRoundTrip(t *testing.T) {
	cells := Library()
	x := *cells[len(cells)-1]
	x.ID, x.RC, x.CutoffV, x.CutoffDelay = "with-rc", []rc.Stage{{R: 0.031, Tau: 12.5}, {R: 0.0207, Tau: 611}}, 2.5, 0.05
	cells = append(cells, &x)
	for _, c := range cells {
		var b bytes.Buffer
		if err := WriteCellTOML(&b, c, []string{"a note", ""}); err != nil {
			t.Fatalf("%s: %v", c.ID, err)
		}
		if !strings.HasPrefix(b.String(), "# a note\n#\n\n") {
			t.Errorf("%s: comment block not first: %.40q", c.ID, b.String())
		}
		got, err := ReadCellTOML(&b, c.ID+".toml")
		if err != nil {
			t.Fatalf("%s: reading back: %v\n%s", c.ID, err, b.String())
		}
		for i := 0; i < c.Curve.Len(); i++ {
			q0, v0 := c.Curve.Point(i)
			q1, v1 := got.Curve.Point(i)
			if q0 != q1 || v0 != v1 {
				t.Errorf("%s: point %d %v,%v read back as %v,%v", c.ID, i, q0, v0, q1, v1)
			}
		}
		want := *c
		want.Curve, got.Curve = nil, nil
		if !reflect.DeepEqual(&want, got) {
			t.Errorf("%s: read back\n%+v\nwant\n%+v", c.ID, got, &want)
		}
	}
}
