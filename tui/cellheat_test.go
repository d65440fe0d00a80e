package tui

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"headroom/internal/scenario"
)

// The verdict's cells row at 120×40: a library cell (thermal data) shows
// its hottest; a cell defined without thermal data says it is taken at
// the ambient instead of quoting the ambient as a temperature it reached.
func TestVerdictCellsRow(t *testing.T) {
	row := func(m tea.Model) string {
		m, _ = m.Update(tea.WindowSizeMsg{Width: 120, Height: 40})
		for l := range strings.SplitSeq(ansi.Strip(m.View()), "\n") {
			if strings.HasPrefix(l, "Cells") {
				return l
			}
		}
		return ""
	}
	if l := row(New(nil)); !strings.Contains(l, "Cells hottest") || !strings.Contains(l, "°C") {
		t.Errorf("demo (alkaline AA with thermal data): %q", l)
	}
	dir := t.TempDir()
	text := "name = \"plain\"\ncell = \"mine\"\nseries = 2\nload = \"100mA\"\nfloor = 1.8\n" +
		"[[define_cell]]\nid = \"mine\"\ncurve = [[0, 1.5], [1000, 1.2], [1200, 0.9]]\n"
	path := filepath.Join(dir, "plain.toml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	sc, err := scenario.Load(path)
	if err != nil {
		t.Fatal(err)
	}
	if l := row(New(sc)); !strings.Contains(l, "at ambient") || strings.Contains(l, "hottest") {
		t.Errorf("a cell without thermal data: %q", l)
	}
}
