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

// chemistryCautions are each chemistry's cautions: a few words for a
// table column, and the full sentences. The one home of the cautions
// (docs/cells.md §Cautions); Cautions, PackCautions and ShortCaution read
// it.
var chemistryCautions = map[string]struct {
	short string
	full  func(c *Cell) []string
}{
	"li-ion": {"needs a protection circuit and a Li-ion charger", func(c *Cell) []string {
		return []string{
			"Li-ion cells need a protection circuit (over-charge, over-discharge, over-current) and a proper Li-ion charger.",
			fmt.Sprintf("Never discharge below the %s V end-point nor charge above 4.2 V per cell; a cell taken below it may be unsafe to recharge.", trimV(c.EndPoint)),
			"A damaged, swollen or hot Li-ion cell can vent or catch fire: stop using it."}
	}},
	"lifepo4": {"needs a protection circuit and a LiFePO4 charger", func(c *Cell) []string {
		return []string{
			"LiFePO4 cells need a protection circuit and a charger made for LiFePO4 (not a Li-ion charger).",
			fmt.Sprintf("Never discharge below the %s V end-point nor charge above 3.65 V per cell.", trimV(c.EndPoint))}
	}},
	"nimh": {"NiMH charger only; stop at the end-point", func(*Cell) []string {
		return []string{
			"Charge NiMH cells only in a NiMH charger; never charge primary cells.",
			"A flat NiMH cell in a series pack is reverse-charged by the others: stop at the end-point."}
	}},
	"alkaline":     {"may leak when flat or flipped; do not recharge", primaryAqueous},
	"zinc-carbon":  {"may leak when flat or flipped; do not recharge", primaryAqueous},
	"lithium-fes2": {"do not recharge; may vent if shorted", primaryLithium},
	"lithium-mno2": {"do not recharge; may vent if shorted", primaryLithium},
}

// dischargeLimitC is the highest cell temperature, °C, at which each
// chemistry is usually discharged (the top of the discharge range on
// typical data sheets; typical values from memory, not a maker's).
var dischargeLimitC = map[string]float64{
	"li-ion": 60, "lifepo4": 60, "nimh": 50, "alkaline": 55, "zinc-carbon": 55,
	"lithium-fes2": 60, "lithium-mno2": 70,
}

// DischargeLimitC is the highest temperature, °C, a cell of c's chemistry
// is usually discharged at (typical, from memory), and whether the
// chemistry has one here.
func (c *Cell) DischargeLimitC() (float64, bool) {
	t, ok := dischargeLimitC[c.Chemistry]
	return t, ok
}

// HotWarning is the warning for a pack of c whose cells reach peakC (°C)
// at an ambient of ambientC, "" while that stays within the chemistry's
// usual discharge limit (DischargeLimitC) or the chemistry has none here.
// Where the ambient alone is past the limit the warning says so: more
// cells or moving air do not cool a cell below the air around it.
func HotWarning(c *Cell, peakC, ambientC float64) string {
	lim, ok := c.DischargeLimitC()
	if !ok || !(peakC > lim) {
		return ""
	}
	var w string
	if ambientC >= lim {
		// The ambient alone is at the limit: a rise of any size takes
		// the cells past it, and the cure is the room, not the cells.
		where := "above"
		if ambientC == lim {
			where = "at"
		}
		w = fmt.Sprintf("the %.0f °C ambient is %s the %.0f °C a %s cell is usually discharged at, before the cells' own heat (typical, from memory; the cell maker's data come first): keep the product out of such heat", ambientC, where, lim, c.Chemistry)
	} else {
		w = fmt.Sprintf("the cells warm to about %.0f °C by their own losses (%.0f K above the ambient), above the %.0f °C a %s cell is usually discharged at (typical, from memory; the cell maker's data come first): use bigger cells, more in parallel or less current, and keep them in moving air", peakC, peakC-ambientC, lim, c.Chemistry)
	}
	if c.Chemistry == "li-ion" || c.Chemistry == "lifepo4" {
		w += "; a hot lithium-ion cell ages fast and, past its limits, can vent or catch fire"
	}
	return w
}

func primaryAqueous(*Cell) []string {
	return []string{
		"Do not recharge primary cells.",
		"Primary cells may leak when reverse-driven (a cell flipped in a series pack) or left flat in a product: remove spent cells."}
}

func primaryLithium(*Cell) []string {
	return []string{
		"Do not recharge lithium primary cells.",
		"A lithium primary cell reverse-driven or shorted may heat up and vent."}
}

const (
	buttonCaution  = "Coin and button cells are a swallowing hazard for children: keep the compartment screwed shut; toy-safety standards such as IEC 62115 set rules for battery compartments."
	buttonShort    = "swallowing hazard: screw the compartment shut; "
	mixCaution     = "Never mix old and new cells, or different chemistries, in one pack."
	unknownCaution = "The cell's chemistry is not stated (a CSV cell or an imported log, or chemistry \"custom\"): follow its maker's cautions; a Li-ion or LiFePO4 cell needs a protection circuit and a charger made for it."
	estimates      = "These are estimates, not certification: the cell maker's data and local codes come first."
)

// Cautions returns the usual cautions for the cell's chemistry and form, in
// plain words, ending with the ones that hold for every cell. They are
// reminders, not a safety assessment: the cell maker's data and local codes
// come first. It is PackCautions for a pack whose cell count is not known.
func Cautions(c *Cell) []string { return PackCautions(c, 0) }

// PackCautions is Cautions for a pack of n cells of c: the warning against
// mixing cells is left out for a single cell (n == 1); n == 0 means the
// count is not known, and keeps it.
func PackCautions(c *Cell, n int) []string {
	out := make([]string, 0, 8) // room for every caution: one allocation
	if cc, ok := chemistryCautions[c.Chemistry]; ok {
		out = append(out, cc.full(c)...)
	} else {
		// A CSV cell or an imported log says nothing of its chemistry:
		// a Li-ion log must not read as a cell with nothing to heed.
		out = append(out, unknownCaution)
	}
	if isButton(c) {
		out = append(out, buttonCaution)
	}
	if n != 1 {
		out = append(out, mixCaution)
	}
	return append(out, estimates)
}

// ShortCaution is the cell's main caution in a few words, for a table.
func ShortCaution(c *Cell) string {
	s := "check the maker's data"
	if cc, ok := chemistryCautions[c.Chemistry]; ok {
		s = cc.short
	}
	if isButton(c) {
		s = buttonShort + s
	}
	return s
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
