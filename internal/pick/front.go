package pick

import "sort"

// Front returns the Pareto front of unit cost against runtime among ds,
// cheapest first: the designs no other design matches or beats on both
// (cost no higher and runtime no lower, one of them strictly). Designs
// equal on both are all kept.
func Front(ds []Design) []Design {
	s := append([]Design(nil), ds...)
	sort.SliceStable(s, func(i, j int) bool {
		if s[i].UnitCost != s[j].UnitCost {
			return s[i].UnitCost < s[j].UnitCost
		}
		return s[i].Result.RuntimeH > s[j].Result.RuntimeH
	})
	var out []Design
	best := -1.0 // longest runtime of strictly cheaper designs
	for i := 0; i < len(s); {
		j := i
		for j < len(s) && s[j].UnitCost == s[i].UnitCost {
			j++
		}
		top := s[i].Result.RuntimeH // the group's longest
		if top > best {
			for k := i; k < j && s[k].Result.RuntimeH == top; k++ {
				out = append(out, s[k])
			}
			best = top
		}
		i = j
	}
	return out
}
