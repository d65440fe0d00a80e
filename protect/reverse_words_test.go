package protect

import (
	"strings"
	"testing"
)

// The flipped-cell note names the harm of the pack's own chemistry: a NiMH
// pack is not told that alkaline cells may leak.
func TestFlippedCellWordsFitChemistry(t *testing.T) {
	p := Pack{Series: 4, CellV: 1.3, CellR: 0.03, Parallel: 1, LoadR: 10, TempC: 20, Chemistry: "nimh"}
	if n := FlippedCell(p, 0).Note; strings.Contains(n, "alkaline") || !strings.Contains(n, "NiMH") {
		t.Errorf("NiMH pack: %q", n)
	}
	p.Chemistry = "alkaline"
	if n := FlippedCell(p, 0).Note; !strings.Contains(n, "alkaline") {
		t.Errorf("alkaline pack: %q", n)
	}
}
