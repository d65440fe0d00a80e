package scenario

import (
	"path/filepath"
	"reflect"
	"testing"

	"headroom/curves"
	"headroom/discharge"
	"headroom/protect"
)

// What headroom writes, headroom reads back: a design with every field
// Format writes set away from its default, and a cell from a file (written
// out in full as [[define_cell]]), parses back to a design that the engine
// evaluates to the same runtime and cost (exactly: the same numbers go in).
func TestFormatKeepsEveryField(t *testing.T) {
	s := Demo()
	d := s.Design
	var err error
	if d.Cell, err = s.ResolveCell(filepath.Join("..", "..", "testdata", "cells", "example-cell.csv")); err != nil {
		t.Fatal(err)
	}
	d.Series, d.Parallel = 3, 2
	d.Floor, d.TempC, d.HoursPerDay, d.Standby = 2.7, -5, 1.5, 30e-6
	d.PackPrice, d.ElectricityPrice = 4.2, 0.17
	if d.Profile, err = discharge.ParseProfile("450mA/3s,0.5W@90%/2s,15mA/25s"); err != nil {
		t.Fatal(err)
	}
	el, err := protect.Parse("pmos-clamp:vz=5.1,rg=100k")
	if err != nil {
		t.Fatal(err)
	}
	d.Protect = el
	data := Format(Saved{Name: "every field", Note: "a note", Design: d, Budget: 3.5})
	back, err := Parse(data, "saved.toml", "")
	if err != nil {
		t.Fatalf("saved scenario does not parse: %v\n%s", err, data)
	}
	b := back.Design
	if back.Name != "every field" || back.Note != "a note" || back.Budget != 3.5 {
		t.Errorf("labels: %q %q %v", back.Name, back.Note, back.Budget)
	}
	if b.Series != 3 || b.Parallel != 2 || b.Floor != 2.7 || b.TempC != -5 || b.HoursPerDay != 1.5 ||
		b.Standby != 30e-6 || b.PackPrice != 4.2 || b.ElectricityPrice != 0.17 || b.Protect.Spec() != el.Spec() {
		t.Errorf("design changed:\n%s", data)
	}
	r1, err1 := discharge.Evaluate(&d)
	r2, err2 := discharge.Evaluate(&b)
	if err1 != nil || err2 != nil {
		t.Fatalf("evaluate: %v, %v", err1, err2)
	}
	if r1.RuntimeH != r2.RuntimeH || r1.CostPerHour != r2.CostPerHour || r1.ReferenceMAh != r2.ReferenceMAh {
		t.Errorf("read back, the design runs %v h at $%v/h; written, %v h at $%v/h", r2.RuntimeH, r2.CostPerHour, r1.RuntimeH, r1.CostPerHour)
	}
}

// A custom cell with every kind of data — RC branches, a pack cut-off
// with its delay, heat capacity and thermal resistance, a temperature
// table — comes back from a saved scenario's [[define_cell]] as the same
// cell (reflect.DeepEqual), and so runs the same. Before the cell's keys
// had one writer, the scenario's own left out the RC branches and the
// cut-off, and a saved Li-ion cell lost its polarisation.
func TestFormatKeepsACellsEveryKey(t *testing.T) {
	lib, ok := curves.Lookup("li-ion-18650")
	if !ok {
		t.Fatal("no li-ion-18650")
	}
	c := *lib
	c.ID, c.Name, c.Source = "my-cell", "a cell with \"quotes\", 2.6 Ah µ-pack", "bench, 2026"
	if len(c.RC) == 0 || c.CutoffV == 0 || !c.SelfHeats() || len(c.Temperature) == 0 {
		t.Fatalf("li-ion-18650 no longer has RC branches, a cut-off, thermal data and a temperature table: pick another cell")
	}
	s := Demo()
	d := s.Design
	d.Cell = &c
	d.Series = 1
	data := Format(Saved{Name: "cell keys", Design: d})
	back, err := Parse(data, "saved.toml", "")
	if err != nil {
		t.Fatalf("saved scenario does not parse: %v\n%s", err, data)
	}
	got := *back.Design.Cell
	if !reflect.DeepEqual(&got, &c) {
		t.Errorf("cell read back differs:\nwrote %+v\nread  %+v\n%s", c, got, data)
	}
}
