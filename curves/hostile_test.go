package curves

import (
	"strings"
	"testing"
)

// A cell file nested 10,000 deep or with a 30,000-part dotted key (which
// took the TOML library 20 s and 4 GB) is refused on its raw text, with
// the file and line in the message (cells check, --cell).
func TestCellTOMLShapeRefused(t *testing.T) {
	deep := "id = \"x\"\nx = " + strings.Repeat("{a=", 10000) + "1" + strings.Repeat("}", 10000) + "\n"
	dotted := "id = \"x\"\n[" + strings.Repeat("a.", 30000) + "a]\n"
	for name, text := range map[string]string{"deep": deep, "dotted": dotted} {
		_, err := ReadCellTOML(strings.NewReader(text), name+".toml")
		if err == nil || !strings.HasPrefix(err.Error(), name+".toml line 2: ") || !strings.Contains(err.Error(), "refuses the file before reading it") {
			t.Errorf("%s: got %v", name, err)
		}
	}
}
