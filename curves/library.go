package curves

import (
	"fmt"
	"strings"
)

// builtin is built once; its cells are shared and read-only.
var builtin = library()

var byID = func() map[string]*Cell {
	m := make(map[string]*Cell, len(builtin))
	for _, c := range builtin {
		if err := c.Validate(); err != nil {
			panic("curves: built-in cell " + c.ID + ": " + err.Error())
		}
		if _, dup := m[c.ID]; dup {
			panic("curves: built-in cell id repeats: " + c.ID)
		}
		m[c.ID] = c
	}
	return m
}()

// Library returns the built-in generic cells in a stable order, grouped by
// chemistry (alkaline, zinc-carbon, lithium primaries, NiMH, Li-ion,
// LiFePO4). Their numbers are typical values from memory, not any maker's
// data. The slice is fresh but the cells are shared: treat them as
// read-only.
func Library() []*Cell { return append([]*Cell(nil), builtin...) }

// Lookup returns the built-in cell with the given id (case-insensitive,
// spaces trimmed). The cell is shared: treat it as read-only.
func Lookup(id string) (*Cell, bool) {
	c, ok := byID[strings.ToLower(strings.TrimSpace(id))]
	return c, ok
}

// IDs returns the built-in cells' ids in Library order.
func IDs() []string {
	ids := make([]string, len(builtin))
	for i, c := range builtin {
		ids[i] = c.ID
	}
	return ids
}

// Cautions returns the usual cautions for the cell's chemistry and form, in
// plain words, ending with the ones that hold for every cell. They are
// reminders, not a safety assessment: the cell maker's data and local codes
// come first.
func Cautions(c *Cell) []string {
	var out []string
	switch c.Chemistry {
	case "li-ion":
		out = append(out,
			"Li-ion cells need a protection circuit (over-charge, over-discharge, over-current) and a proper Li-ion charger.",
			fmt.Sprintf("Never discharge below the %s V end-point nor charge above 4.2 V per cell; a cell taken below it may be unsafe to recharge.", trimV(c.EndPoint)),
			"A damaged, swollen or hot Li-ion cell can vent or catch fire: stop using it.")
	case "lifepo4":
		out = append(out,
			"LiFePO4 cells need a protection circuit and a charger made for LiFePO4 (not a Li-ion charger).",
			fmt.Sprintf("Never discharge below the %s V end-point nor charge above 3.65 V per cell.", trimV(c.EndPoint)))
	case "nimh":
		out = append(out,
			"Charge NiMH cells only in a NiMH charger; never charge primary cells.",
			"A flat NiMH cell in a series pack is reverse-charged by the others: stop at the end-point.")
	case "alkaline", "zinc-carbon":
		out = append(out,
			"Do not recharge primary cells.",
			"Primary cells may leak when reverse-driven (a cell flipped in a series pack) or left flat in a product: remove spent cells.")
	case "lithium-fes2", "lithium-mno2":
		out = append(out,
			"Do not recharge lithium primary cells.",
			"A lithium primary cell reverse-driven or shorted may heat up and vent.")
	}
	if isButton(c) {
		out = append(out,
			"Coin and button cells are a swallowing hazard for children: keep the compartment screwed shut; toy-safety standards such as IEC 62115 set rules for battery compartments.")
	}
	out = append(out,
		"Never mix old and new cells, or different chemistries, in one pack.",
		"These are estimates, not certification: the cell maker's data and local codes come first.")
	return out
}

// isButton reports a coin or button cell from its IEC designation: CR/BR
// (lithium), SR (silver oxide), or the LR4x/LR5x alkaline buttons.
func isButton(c *Cell) bool {
	d := strings.ToUpper(c.Designation)
	for _, p := range []string{"CR", "BR", "SR", "LR4", "LR5"} {
		if strings.HasPrefix(d, p) {
			return true
		}
	}
	return false
}

func trimV(v float64) string { return strings.TrimSuffix(fmt.Sprintf("%g", v), ".0") }
