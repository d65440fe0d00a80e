package pick

import (
	"fmt"
	"slices"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/scenario"
	"headroom/protect"
)

// Space is what a search runs over.
type Space struct {
	// Base is the product: its load, floor, ambient, daily pattern,
	// standby and electricity price. Its cell, counts and element are
	// the scenario's own design; a pack of exactly that cell and those
	// counts keeps Base.PackPrice, every other pack is priced by its cells.
	Base discharge.Design
	// Cells are the cells tried, each once.
	Cells []*curves.Cell
	// Series are the series counts tried; nil for every count from 1
	// that fits the voltage window.
	Series []int
	// Parallel are the parallel counts tried; nil for 1 to the limit.
	Parallel []int
	// Elements are the protection parts tried.
	Elements []protect.Element
}

// SpaceOf builds the search space for scenario s: the whole library and
// the file's own cells, every element kind with its ladder, unless the
// file's [options] narrow them (all ignores [options]). A protect option
// written as a bare kind ("pmos") stands for the kind's ladder; one with
// values ("pmos:vth=1.2") is that one part.
func SpaceOf(s *scenario.Scenario, all bool) (*Space, error) {
	sp := &Space{Base: s.Design}
	sp.Base.TracePoints = 0
	opt := func(k string) bool { return !all && slices.Contains(s.OptionKeys, k) }
	if opt("cells") {
		sp.Cells = unique(s.Cells)
	} else {
		sp.Cells = unique(append(curves.Library(), s.FileCells...))
	}
	if opt("series") {
		sp.Series = append([]int(nil), s.Series...)
	}
	if opt("parallel") {
		sp.Parallel = append([]int(nil), s.Parallel...)
	}
	if opt("protect") {
		for i, el := range s.Protects {
			if s.ProtectSpecs[i] == el.Kind() {
				l, err := Ladder(el.Kind())
				if err != nil {
					return nil, err
				}
				sp.Elements = append(sp.Elements, l...)
			} else {
				sp.Elements = append(sp.Elements, el)
			}
		}
	} else {
		for _, k := range protect.Kinds() {
			l, err := Ladder(k)
			if err != nil {
				return nil, err
			}
			sp.Elements = append(sp.Elements, l...)
		}
	}
	sp.Elements = uniqueElements(sp.Elements)
	if len(sp.Cells) == 0 || len(sp.Elements) == 0 {
		return nil, fmt.Errorf("pick: nothing to search")
	}
	return sp, nil
}

func unique(cs []*curves.Cell) []*curves.Cell {
	seen := map[string]bool{}
	var out []*curves.Cell
	for _, c := range cs {
		if !seen[c.ID] {
			seen[c.ID] = true
			out = append(out, c)
		}
	}
	return out
}

func uniqueElements(es []protect.Element) []protect.Element {
	seen := map[string]bool{}
	var out []protect.Element
	for _, e := range es {
		if s := e.Spec(); !seen[s] {
			seen[s] = true
			out = append(out, e)
		}
	}
	return out
}
