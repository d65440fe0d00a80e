package pick

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/scenario"
	"headroom/protect"
)

// The checks here compare the pruned search with plain enumeration: every
// candidate evaluated by discharge.Evaluate and judged by the constraints
// as the command's help states them, restated below without the search's code. The
// reference is the definition (brute force), not a number from memory.

type bruteDesign struct {
	cell          *curves.Cell
	series, par   int
	spec          string
	cost, runtime float64
	r             *discharge.Result
	passes, other bool // passes every constraint; every one but the target
}

func (b bruteDesign) id() string {
	return fmt.Sprintf("%s %dS%dP %s", b.cell.ID, b.series, b.par, b.spec)
}

// brute enumerates the space and judges each design from scratch.
func brute(t *testing.T, sp *Space, lim Limits, st Statistic) []bruteDesign {
	t.Helper()
	maxIn := lim.MaxInput
	if maxIn == 0 {
		maxIn = 1.5 * float64(sp.Base.Series) * sp.Base.Cell.OpenCircuit(0, sp.Base.TempC)
	}
	var out []bruteDesign
	for _, cell := range sp.Cells {
		ocv := cell.OpenCircuit(0, sp.Base.TempC)
		series := sp.Series
		if series == nil {
			for s := 1; s <= 48; s++ {
				series = append(series, s)
			}
		}
		for _, s := range series {
			for _, p := range sp.Parallel {
				for _, e := range sp.Elements {
					fresh := float64(s) * ocv
					if fresh <= sp.Base.Floor || fresh > maxIn {
						continue
					}
					d := sp.Base
					d.Cell, d.Series, d.Parallel, d.Protect, d.PackPrice, d.TracePoints = cell, s, p, e, 0, 0
					r, err := st.Evaluate(&d)
					if err != nil {
						continue
					}
					cost := cell.Price*float64(s*p) + e.Cost()
					rev := e.Reverse(discharge.ReversePack(&d))
					stranded := 0.0
					if r.ReferenceMAh > 0 {
						stranded = r.StrandedMAh / r.ReferenceMAh
					}
					other := (lim.Budget == 0 || cost <= lim.Budget) &&
						(lim.MaxCells == 0 || s*p <= lim.MaxCells) &&
						stranded <= lim.MaxStranded && r.JunctionC <= lim.MaxJunction &&
						(!lim.BlockReversed || rev.WholePack.Outcome == protect.Blocked) && rev.OneCell.Volts >= 0
					out = append(out, bruteDesign{cell: cell, series: s, par: p, spec: protect.Short(e), cost: cost,
						runtime: r.RuntimeH, r: r, other: other && r.RuntimeH > 0, passes: other && r.RuntimeH >= lim.Need})
				}
			}
		}
	}
	return out
}

// dominated reports whether a is beaten on cost and runtime by b.
func dominated(aCost, aRun, bCost, bRun float64) bool {
	return bCost <= aCost && bRun >= aRun && (bCost < aCost || bRun > aRun)
}

func idOf(d *Design) string {
	return fmt.Sprintf("%s %dS%dP %s", d.Cell.ID, d.Series, d.Parallel, d.Spec)
}

func mustLadder(t *testing.T, kinds ...string) []protect.Element {
	var out []protect.Element
	for _, k := range kinds {
		l, err := Ladder(k)
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, l...)
	}
	return out
}

func demoBase(t *testing.T, load string) discharge.Design {
	d := scenario.Demo().Design
	if load != "" {
		p, err := discharge.ParseProfile(load)
		if err != nil {
			t.Fatal(err)
		}
		d.Profile = p
	}
	return d
}

// TestPrunedMatchesBrute: on small spaces (a few hundred designs) the
// pruned search returns the same ranked list and the same Pareto front as
// enumerating everything, over randomised targets, budgets and limits
// (a property test; the reference is the brute-force definition).
func TestPrunedMatchesBrute(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 2026))
	lib := curves.Library()
	loads := []string{"", "", "", "0.6W@85%", "33ohm"} // the demo's pulses (CC), constant power, a resistor
	kinds := protect.Kinds()
	pruned, cases := 0, 66
	if testing.Short() {
		cases = 18
	}
	for n := range cases {
		// Every eleventh case judges the runtime at the worst corner, every
		// eleventh but one at the tenth percentile, on a smaller space.
		st := Statistic(Nominal{})
		switch n % 11 {
		case 9:
			st, _ = StatisticFor("worst", nil, 1)
		case 10:
			st, _ = StatisticFor("p10", nil, 1)
		}
		sp := &Space{Base: demoBase(t, loads[rng.IntN(len(loads))]), Parallel: []int{1, 2, 3}[:1+rng.IntN(3)]}
		for _, i := range rng.Perm(len(lib))[:2+rng.IntN(3)] {
			sp.Cells = append(sp.Cells, lib[i])
		}
		nk := 2 + rng.IntN(4)
		if st.Name() != "nominal" {
			sp.Cells, sp.Parallel, nk = sp.Cells[:2], sp.Parallel[:min(2, len(sp.Parallel))], 2
		}
		for _, i := range rng.Perm(len(kinds))[:nk] {
			sp.Elements = append(sp.Elements, mustLadder(t, kinds[i])...)
		}
		lim := DefaultLimits()
		lim.Need = 2 + 60*rng.Float64()
		if rng.IntN(3) > 0 {
			lim.Budget = 0.5 + 4*rng.Float64()
		}
		if rng.IntN(3) == 0 {
			lim.MaxStranded = 0.05 + 0.5*rng.Float64()
		}
		if rng.IntN(4) == 0 {
			lim.MaxJunction = 25 + 30*rng.Float64()
		}
		lim.BlockReversed = rng.IntN(3) == 0
		if rng.IntN(4) == 0 {
			lim.MaxCells = 2 + rng.IntN(6)
		}
		lim.Top = 1 + rng.IntN(12)
		if rng.IntN(3) == 0 {
			lim.By = ByCostPerHour
		}
		lim.MaxParallel = slices.Max(sp.Parallel)
		lim.At = st.Name()
		name := fmt.Sprintf("case%d-%s", n, st.Name())
		t.Run(name, func(t *testing.T) {
			got, err := Search(sp, lim, st, nil)
			if err != nil {
				t.Fatal(err)
			}
			pruned += got.Pruned
			all := brute(t, sp, lim, st)
			checkList(t, got, all, lim)
			checkFront(t, got, all)
		})
	}
	if pruned == 0 {
		t.Errorf("no case pruned anything: the property test did not exercise the pruning")
	}
}

// checkList: the list holds passing designs only, in order, and every
// passing design ranking strictly ahead of the last listed one is in it.
func checkList(t *testing.T, got *Outcome, all []bruteDesign, lim Limits) {
	t.Helper()
	keyOf := func(cost, cph float64) float64 {
		if lim.By == ByCostPerHour {
			return cph
		}
		return cost
	}
	var pass []bruteDesign
	byID := map[string]bruteDesign{}
	for _, b := range all {
		byID[b.id()] = b
		if b.passes {
			pass = append(pass, b)
		}
	}
	top := lim.Top
	if len(got.Designs) != min(top, len(pass)) {
		t.Fatalf("listed %d designs, brute force has %d passing (top %d)", len(got.Designs), len(pass), top)
	}
	if len(pass) == 0 {
		return
	}
	slices.SortStableFunc(pass, func(a, b bruteDesign) int {
		return cmpF(keyOf(a.cost, a.r.CostPerHour), keyOf(b.cost, b.r.CostPerHour))
	})
	// The best design: same key as brute force's best (ties may differ in
	// which one comes first, never in the key).
	if k0, kb := key(&got.Designs[0], lim.By), keyOf(pass[0].cost, pass[0].r.CostPerHour); k0 != kb {
		t.Errorf("best key %v, brute force %v (%s)", k0, kb, pass[0].id())
	}
	listed := map[string]bool{}
	for i := range got.Designs {
		d := &got.Designs[i]
		b, ok := byID[idOf(d)]
		if !ok || !b.passes {
			t.Errorf("listed %s does not pass by brute force", idOf(d))
		}
		if i > 0 && key(d, lim.By) < key(&got.Designs[i-1], lim.By) {
			t.Errorf("list out of order at %d", i)
		}
		listed[idOf(d)] = true
	}
	last := key(&got.Designs[len(got.Designs)-1], lim.By)
	for _, b := range pass {
		if keyOf(b.cost, b.r.CostPerHour) < last && !listed[b.id()] {
			t.Errorf("passing %s (key %v) ranks ahead of the last listed (%v) but is missing", b.id(), keyOf(b.cost, b.r.CostPerHour), last)
		}
	}
}

func cmpF(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// checkFront: the same front as brute force, and no point on it dominated
// by any design meeting the other constraints (the Pareto property).
func checkFront(t *testing.T, got *Outcome, all []bruteDesign) {
	t.Helper()
	want := map[string]bool{}
	for _, a := range all {
		if !a.other {
			continue
		}
		on := true
		for _, b := range all {
			if b.other && dominated(a.cost, a.runtime, b.cost, b.runtime) {
				on = false
				break
			}
		}
		if on {
			want[a.id()] = true
		}
	}
	have := map[string]bool{}
	for i := range got.Front {
		have[idOf(&got.Front[i])] = true
	}
	for id := range want {
		if !have[id] {
			t.Errorf("front misses %s", id)
		}
	}
	for id := range have {
		if !want[id] {
			t.Errorf("front has %s, not on brute force's front", id)
		}
	}
	for i := range got.Front {
		f := &got.Front[i]
		for j := range got.Others {
			o := &got.Others[j]
			if dominated(f.UnitCost, f.Result.RuntimeH, o.UnitCost, o.Result.RuntimeH) {
				t.Errorf("front point %s dominated by evaluated %s", idOf(f), idOf(o))
			}
		}
	}
}

// TestReturnedMeetEveryConstraint re-evaluates every listed design from
// scratch (a new Design from the spec string, as run --protect would read
// it) and checks each constraint against the limits.
func TestReturnedMeetEveryConstraint(t *testing.T) {
	s := scenario.Demo()
	sp, err := SpaceOf(s, true)
	if err != nil {
		t.Fatal(err)
	}
	lim := DefaultLimits()
	lim.Need, lim.Budget, lim.MaxStranded, lim.MaxJunction, lim.BlockReversed, lim.Top = 20, 2.5, 0.3, 60, true, 50
	got, err := Search(sp, lim, Nominal{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(got.Designs) == 0 {
		t.Fatal("nothing passes on the demo at 20 h and $2.50: the check checks nothing")
	}
	for _, d := range got.Designs {
		el, err := protect.Parse(d.Spec)
		if err != nil {
			t.Fatalf("%s: spec does not parse back: %v", idOf(&d), err)
		}
		fresh := s.Design
		fresh.Cell, fresh.Series, fresh.Parallel, fresh.Protect, fresh.PackPrice = d.Cell, d.Series, d.Parallel, el, 0
		r, err := discharge.Evaluate(&fresh)
		if err != nil {
			t.Fatal(err)
		}
		cost := d.Cell.Price*float64(d.Series*d.Parallel) + el.Cost()
		rev := el.Reverse(discharge.ReversePack(&fresh))
		fv := float64(d.Series) * d.Cell.OpenCircuit(0, fresh.TempC)
		switch {
		case r.RuntimeH < lim.Need:
			t.Errorf("%s runs %v h < %v", idOf(&d), r.RuntimeH, lim.Need)
		case cost > lim.Budget:
			t.Errorf("%s costs %v > %v", idOf(&d), cost, lim.Budget)
		case r.StrandedMAh/r.ReferenceMAh > lim.MaxStranded:
			t.Errorf("%s strands %v", idOf(&d), r.StrandedMAh/r.ReferenceMAh)
		case r.JunctionC > lim.MaxJunction:
			t.Errorf("%s junction %v", idOf(&d), r.JunctionC)
		case rev.WholePack.Outcome != protect.Blocked:
			t.Errorf("%s reversed pack: %v", idOf(&d), rev.WholePack.Outcome)
		case rev.OneCell.Volts < 0:
			t.Errorf("%s flipped cell reverses the load", idOf(&d))
		case fv > got.MaxInput || fv <= fresh.Floor:
			t.Errorf("%s fresh %v V outside (%v, %v]", idOf(&d), fv, fresh.Floor, got.MaxInput)
		}
		// The figures reported are the fresh evaluation's, exactly: the
		// engine is deterministic.
		if r.RuntimeH != d.Result.RuntimeH {
			t.Errorf("%s: reported %v h, fresh %v h", idOf(&d), d.Result.RuntimeH, r.RuntimeH)
		}
	}
}

// TestHandBuilt is a case with a known answer. Two cells, each 2S1P: lr6
// priced $0.50 and fr6 priced $1.50 (the library's prices); two elements:
// none ($0) and the default pmos ($0.08). With the whole pack reversed
// required to be blocked, none is out (it lets the reversed pack reach the
// load), so the candidates are lr6+pmos = 2 × $0.50 + $0.08 = $1.08 and
// fr6+pmos = 2 × $1.50 + $0.08 = $3.08. Both run well past 20 h on the
// demo's load (checked first), so the cheapest passing design is
// lr6 2S1P pmos at $1.08, then fr6 at $3.08. Without the reverse rule it
// is lr6 2S1P none at $1.00. With a $1.05 budget and the reverse rule,
// nothing passes and lr6+pmos is a near miss, (1.08 − 1.05)/1.05 ≈ 2.9 %
// over budget.
func TestHandBuilt(t *testing.T) {
	lr6, _ := curves.Lookup("lr6")
	fr6, _ := curves.Lookup("fr6")
	if lr6.Price != 0.50 || fr6.Price != 1.50 || protect.DefaultPMOS().Price != 0.08 {
		t.Fatalf("library prices changed: lr6 %v, fr6 %v, pmos %v; restate the arithmetic", lr6.Price, fr6.Price, protect.DefaultPMOS().Price)
	}
	sp := &Space{Base: demoBase(t, ""), Cells: []*curves.Cell{lr6, fr6}, Series: []int{2}, Parallel: []int{1},
		Elements: []protect.Element{protect.None{}, protect.DefaultPMOS()}}
	for _, c := range sp.Cells { // the premise: both run past 20 h with the pmos
		d := sp.Base
		d.Cell, d.Series, d.Parallel, d.Protect = c, 2, 1, protect.DefaultPMOS()
		r, err := discharge.Evaluate(&d)
		if err != nil || r.RuntimeH < 20 {
			t.Fatalf("premise: %s 2S1P pmos runs %v h (err %v), expected past 20 h", c.ID, r, err)
		}
	}
	lim := DefaultLimits()
	lim.Need, lim.BlockReversed = 20, true
	got, err := Search(sp, lim, Nominal{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(got.Designs) != 2 || idOf(&got.Designs[0]) != "lr6 2S1P pmos" || idOf(&got.Designs[1]) != "fr6 2S1P pmos" {
		t.Fatalf("got %v", ids(got.Designs))
	}
	// Exact to rounding: two sums of a few cents.
	if math.Abs(got.Designs[0].UnitCost-1.08) > 1e-12 || math.Abs(got.Designs[1].UnitCost-3.08) > 1e-12 {
		t.Errorf("costs %v, %v; want 1.08, 3.08", got.Designs[0].UnitCost, got.Designs[1].UnitCost)
	}
	if got.Screened[Reverse] != 2 {
		t.Errorf("screened by reverse: %d, want 2 (both none designs)", got.Screened[Reverse])
	}

	lim.BlockReversed = false
	got, _ = Search(sp, lim, Nominal{}, nil)
	if idOf(&got.Designs[0]) != "lr6 2S1P none" || got.Designs[0].UnitCost != 1.00 {
		t.Errorf("without the reverse rule: %v", ids(got.Designs))
	}

	lim.BlockReversed, lim.Budget = true, 1.05
	got, _ = Search(sp, lim, Nominal{}, nil)
	if len(got.Designs) != 0 {
		t.Fatalf("at $1.05: %v, want none", ids(got.Designs))
	}
	if len(got.NearMisses) == 0 || idOf(&got.NearMisses[0]) != "lr6 2S1P pmos" || got.NearMisses[0].Misses[0].Constraint != Budget {
		t.Fatalf("near misses %v", ids(got.NearMisses))
	}
	// (1.08 − 1.05)/1.05, to rounding.
	if g := got.NearMisses[0].Misses[0].Gap; math.Abs(g-0.03/1.05) > 1e-9 {
		t.Errorf("gap %v, want %v", g, 0.03/1.05)
	}
}

func ids(ds []Design) []string {
	var out []string
	for i := range ds {
		out = append(out, idOf(&ds[i]))
	}
	return out
}

// TestImpossibleTarget: nothing runs 100 000 h; the outcome is empty, not
// an error, and names the longest-running design.
func TestImpossibleTarget(t *testing.T) {
	sp, err := SpaceOf(scenario.Demo(), false)
	if err != nil {
		t.Fatal(err)
	}
	lim := DefaultLimits()
	lim.Need = 1e5
	got, err := Search(sp, lim, Nominal{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(got.Designs) != 0 || got.Longest == nil || !(got.Longest.Result.RuntimeH > 0) {
		t.Fatalf("designs %d, longest %v", len(got.Designs), got.Longest)
	}
	for i := range got.Others {
		if got.Others[i].Result.RuntimeH > got.Longest.Result.RuntimeH {
			t.Errorf("%s runs longer than the longest named", idOf(&got.Others[i]))
		}
	}
}

// TestContradictions: limits that cannot all hold are refused, naming the
// key.
func TestContradictions(t *testing.T) {
	sp, _ := SpaceOf(scenario.Demo(), false)
	for _, c := range []struct {
		set  func(*Limits)
		want string
	}{
		{func(l *Limits) { l.Need = 0 }, "need"},
		{func(l *Limits) { l.MaxInput = 1.5 }, "max_input"}, // demo floor 1.8 V
		{func(l *Limits) { l.MaxJunction = 10 }, "max_junction"},
		{func(l *Limits) { l.MaxCells, l.MaxParallel = 2, 3 }, "max_parallel"},
	} {
		lim := DefaultLimits()
		lim.Need = 20
		c.set(&lim)
		_, err := Search(sp, lim, Nominal{}, nil)
		if err == nil || !startsWith(err.Error(), c.want+":") {
			t.Errorf("%s: err %v", c.want, err)
		}
	}
}

func startsWith(s, p string) bool { return len(s) >= len(p) && s[:len(p)] == p }

// TestKeysParse: the flag and file parsers refuse bad values naming why.
func TestKeysParse(t *testing.T) {
	for _, c := range []struct {
		key, val string
		ok       bool
	}{
		{"need", "20h", true}, {"need", "20", true}, {"need", "90min", true}, {"need", "3d", true}, {"need", "xd", false}, {"need", "0", false}, {"need", "-3h", false},
		{"budget", "1.50", true}, {"budget", "$2", true}, {"budget", "-1", false}, {"budget", "0", false}, {"budget", "none", true},
		{"max_stranded", "30%", true}, {"max_stranded", "30", true}, {"max_stranded", "130%", false},
		{"max_junction", "125C", true}, {"max_input", "6V", true}, {"max_input", "0", false},
		{"at", "worst", true}, {"at", "mean", false}, {"by", "cost-per-hour", true}, {"by", "runtime", false},
		{"top", "5", true}, {"top", "0", false}, {"max_cells", "x", false}, {"block_reversed", "yes", false},
	} {
		k, ok := LookupKey(c.key)
		if !ok {
			t.Fatalf("no key %s", c.key)
		}
		l := DefaultLimits()
		err := k.Set(&l, c.val)
		if (err == nil) != c.ok {
			t.Errorf("%s=%q: err %v", c.key, c.val, err)
		}
	}
	l := DefaultLimits()
	k, _ := LookupKey("need")
	_ = k.Set(&l, "90min")
	if l.Need != 1.5 { // 90 min is 1.5 h exactly
		t.Errorf("90min → %v h", l.Need)
	}
}

// TestSpaceOfOptions: a file's [options] narrow the space; a bare kind
// stands for its ladder, a part with values for itself; --all ignores
// them.
func TestSpaceOfOptions(t *testing.T) {
	src := `cell = "lr6"
series = 2
load = "100mA"
[options]
cells = ["lr6", "fr6"]
parallel = [1, 2]
protect = ["pmos", "limiter:rsh=0.47"]
`
	s, err := scenario.Parse([]byte(src), "t.toml", "")
	if err != nil {
		t.Fatal(err)
	}
	sp, err := SpaceOf(s, false)
	if err != nil {
		t.Fatal(err)
	}
	pm, _ := Ladder("pmos")
	if len(sp.Cells) != 2 || !slices.Equal(sp.Parallel, []int{1, 2}) || sp.Series != nil || len(sp.Elements) != len(pm)+1 {
		t.Fatalf("cells %d, parallel %v, series %v, elements %d", len(sp.Cells), sp.Parallel, sp.Series, len(sp.Elements))
	}
	if last := protect.Short(sp.Elements[len(sp.Elements)-1]); last != "limiter:rsh=470mohm" {
		t.Errorf("the exact part became %q", last)
	}
	all, _ := SpaceOf(s, true)
	if len(all.Cells) != len(curves.Library()) || all.Parallel != nil {
		t.Errorf("--all: %d cells, parallel %v", len(all.Cells), all.Parallel)
	}
}
