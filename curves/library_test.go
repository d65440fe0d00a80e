package curves

import (
	"math"
	"slices"
	"strings"
	"testing"
)

func TestLibraryIDs(t *testing.T) {
	want := []string{"lr6", "lr03", "lr14", "lr20", "6lr61", "r6", "fr6", "cr2032",
		"hr6", "hr6-lsd", "hr03", "li-ion-18650", "li-ion-pouch", "lifepo4"}
	ids := IDs()
	for _, id := range want {
		if !slices.Contains(ids, id) {
			t.Errorf("library lacks %q", id)
		}
	}
	if len(Library()) != len(ids) || len(ids) < 14 {
		t.Errorf("%d cells, %d ids; want the same count, at least 14", len(Library()), len(ids))
	}
	for _, id := range ids {
		c, ok := Lookup(strings.ToUpper(" " + id + " "))
		if !ok || c.ID != id {
			t.Errorf("Lookup(%q) = %v, %v", strings.ToUpper(id), c, ok)
		}
	}
	if _, ok := Lookup("lr6x"); ok {
		t.Error("Lookup of an unknown id succeeded")
	}
	// Grouped by chemistry: once a chemistry is left it never comes back.
	seen := map[string]bool{}
	prev := ""
	for _, c := range Library() {
		if c.Chemistry != prev {
			if seen[c.Chemistry] {
				t.Errorf("chemistry %q appears in two groups (at %s)", c.Chemistry, c.ID)
			}
			seen[c.Chemistry], prev = true, c.Chemistry
		}
	}
	// Library hands out a fresh slice each time.
	l := Library()
	l[0] = nil
	if Library()[0] == nil {
		t.Error("Library returned its own slice")
	}
}

// TestLibraryConsistent checks each built-in cell against itself: the
// curve, taken at RefCurrent = RatedCurrent, crosses EndPoint at RatedMAh
// within 1 % (the library's design rule; a typo in a curve point or a
// rating moves it further), and every field is filled.
func TestLibraryConsistent(t *testing.T) {
	for _, c := range Library() {
		if err := c.Validate(); err != nil {
			t.Errorf("%s: %v", c.ID, err)
		}
		if c.Name == "" || c.Chemistry == "" || c.NominalV <= 0 || c.Price <= 0 ||
			len(c.Resistance) == 0 || len(c.Temperature) == 0 || c.SelfDischarge <= 0 || c.Peukert < 1 {
			t.Errorf("%s: a field is left empty: %+v", c.ID, c)
		}
		if !strings.Contains(c.Source, "from memory") || !strings.Contains(c.Source, "not a brand") {
			t.Errorf("%s: source %q must say typical values from memory, not a brand", c.ID, c.Source)
		}
		if c.RefCurrent <= 0 || c.RatedCurrent != c.RefCurrent {
			t.Errorf("%s: RefCurrent %g A, RatedCurrent %g A; want equal and above 0", c.ID, c.RefCurrent, c.RatedCurrent)
		}
		q, ok := c.Curve.ChargeAt(c.EndPoint)
		if !ok || math.Abs(q/c.RatedMAh-1) > 0.01 {
			t.Errorf("%s: curve reaches the %g V end-point at %.1f mAh (reached %v), rated %g mAh; want within 1 %%",
				c.ID, c.EndPoint, q, ok, c.RatedMAh)
		}
		// The engine's own view: terminal voltage at the rating current
		// and 20 °C at RatedMAh is the end-point. Tolerance: the 1 % in
		// charge above times the curve's steepest slope there is larger
		// than this, so check the crossing voltage to 1 % of EndPoint.
		if v := c.Terminal(c.RatedMAh/c.CapacityFactor(c.RatedCurrent, RefTempC), c.RatedCurrent, RefTempC); math.Abs(v/c.EndPoint-1) > 0.01 {
			t.Errorf("%s: terminal at rated charge %.4f V, want the %g V end-point", c.ID, v, c.EndPoint)
		}
		if c.Rechargeable != (c.CycleLife > 0) || c.Rechargeable != (c.ChargeEfficiency > 0) {
			t.Errorf("%s: cycle life and charge efficiency belong to rechargeables only", c.ID)
		}
		// Every table at 20 °C is the identity: curves are stated at
		// RefTempC. Exact, the 20 °C row is in each table.
		if f, r := c.TempFactors(RefTempC); f != 1 || r != 1 {
			t.Errorf("%s: factors at 20 °C are %g, %g; want 1, 1", c.ID, f, r)
		}
		// Internal resistance never falls as the cell empties (docs/cells.md).
		for i := 1; i < len(c.Resistance); i++ {
			if c.Resistance[i].Ohm < c.Resistance[i-1].Ohm {
				t.Errorf("%s: resistance falls at point %d", c.ID, i+1)
			}
		}
		if len(Cautions(c)) < 3 {
			t.Errorf("%s: only %d cautions", c.ID, len(Cautions(c)))
		}
	}
}

// TestLibraryStandards checks the built-in cells against the ratings in
// the IEC standards (docs/references.md).
func TestLibraryStandards(t *testing.T) {
	for _, c := range Library() {
		fresh := c.OpenCircuit(0, RefTempC)
		switch c.Chemistry {
		case "nimh":
			// IEC 61951-2: nominal 1.2 V; rated capacity at 0.2 It to 1.0 V,
			// It = rated capacity ÷ 1 h. Tolerance 1e-12 relative: exact
			// arithmetic on the stored values.
			if c.NominalV != 1.2 || c.EndPoint != 1.0 || math.Abs(c.RatedCurrent/(0.2*c.RatedMAh/1000)-1) > 1e-12 {
				t.Errorf("%s: nominal %g V, end %g V, rated at %g A for %g mAh; IEC 61951-2 wants 1.2 V, 1.0 V, 0.2 It",
					c.ID, c.NominalV, c.EndPoint, c.RatedCurrent, c.RatedMAh)
			}
			// About 1.4 V after charge (docs/cells.md, from memory): 1.35–1.45 V.
			if fresh < 1.35 || fresh > 1.45 {
				t.Errorf("%s: fresh open-circuit %.3f V, want about 1.4 V", c.ID, fresh)
			}
		case "li-ion":
			// IEC 61960-3: nominal usually 3.6 or 3.7 V; rated at 0.2 It to
			// the maker's end-of-discharge voltage, commonly 2.5–3.0 V.
			if (c.NominalV != 3.6 && c.NominalV != 3.7) || c.EndPoint < 2.5 || c.EndPoint > 3.0 ||
				math.Abs(c.RatedCurrent/(0.2*c.RatedMAh/1000)-1) > 1e-12 {
				t.Errorf("%s: nominal %g V, end %g V, rated at %g A for %g mAh; IEC 61960-3 wants 3.6/3.7 V, 2.5–3.0 V, 0.2 It",
					c.ID, c.NominalV, c.EndPoint, c.RatedCurrent, c.RatedMAh)
			}
			// Charged to 4.2 V (common practice): at rest the fresh cell
			// sits at or just under 4.2 V (4.1–4.2 V).
			if fresh < 4.1 || fresh > 4.2 {
				t.Errorf("%s: fresh open-circuit %.3f V, want 4.1–4.2 V", c.ID, fresh)
			}
		case "lifepo4":
			// Rated like Li-ion at 0.2 It (IEC 61960-3); nominal 3.2 V and a
			// 3.65 V charge limit are common practice (from memory).
			if c.NominalV != 3.2 || math.Abs(c.RatedCurrent/(0.2*c.RatedMAh/1000)-1) > 1e-12 || fresh > 3.65 {
				t.Errorf("%s: nominal %g V, rated at %g A for %g mAh, fresh %.3f V", c.ID, c.NominalV, c.RatedCurrent, c.RatedMAh, fresh)
			}
		}
	}
	// IEC 60086-1/-2 primary cells: nominal voltages, and fresh
	// open-circuit voltages below the maxima (from memory): 1.65 V for the
	// L system, 1.83 V for F, 3.7 V for C, six L cells for 6LR61. The
	// lower bounds are docs/cells.md's rough shapes (from memory): alkaline
	// about 1.6 V fresh, coin about 3.0 V or a little above.
	prim := []struct {
		id               string
		nominal, lo, max float64
	}{
		{"lr6", 1.5, 1.5, 1.65},
		{"lr03", 1.5, 1.5, 1.65},
		{"lr14", 1.5, 1.5, 1.65},
		{"lr20", 1.5, 1.5, 1.65},
		{"6lr61", 9, 6 * 1.5, 6 * 1.65},
		{"fr6", 1.5, 1.6, 1.83},
		{"cr2032", 3.0, 3.0, 3.7},
		{"r6", 1.5, 1.45, 1.65}, // zinc-carbon: nominal 1.5 V (IEC 60086-1); the 1.65 V cap is ours, from memory
	}
	for _, p := range prim {
		c, ok := Lookup(p.id)
		if !ok {
			t.Fatalf("no %s", p.id)
		}
		fresh := c.OpenCircuit(0, RefTempC)
		if c.NominalV != p.nominal || fresh < p.lo || fresh >= p.max {
			t.Errorf("%s: nominal %g V, fresh open-circuit %.3f V; want %g V and %g ≤ V < %g",
				p.id, c.NominalV, fresh, p.nominal, p.lo, p.max)
		}
	}
}

// TestLibraryShapes checks docs/cells.md's rough figures (from memory) where
// they are stated: Peukert exponents, fresh resistances and
// self-discharge.
func TestLibraryShapes(t *testing.T) {
	month := func(yearly float64) float64 { return yearly / 12 }
	cases := []struct {
		id             string
		kLo, kHi       float64
		rLo, rHi       float64 // fresh internal resistance, Ω
		sdLo, sdHi     float64 // per month
		coldCapAtMinus float64 // capacity factor at −20 °C at most this
	}{
		{"lr6", 1.2, 1.3, 0.1, 0.2, month(0.02), month(0.03), 0.3},
		{"hr6", 1.0, 1.1, 0.02, 0.04, 0.20, 0.30, 0.7},
		{"hr6-lsd", 1.0, 1.1, 0.02, 0.04, month(0.15), month(0.30), 0.7},
		{"li-ion-18650", 1.0, 1.1, 0.03, 0.06, 0.02, 0.03, 0.8},
		{"cr2032", 1.0, 1.3, 10, 20, 0, month(0.02), 1},
	}
	for _, k := range cases {
		c, _ := Lookup(k.id)
		// docs/cells.md's ranges are the resistance a steady current meets:
		// R0 and the polarisation branches together.
		r0 := c.SteadyResistance(0, RefTempC)
		cold, _ := c.TempFactors(-20)
		if c.Peukert < k.kLo || c.Peukert > k.kHi || r0 < k.rLo || r0 > k.rHi ||
			c.SelfDischarge < k.sdLo || c.SelfDischarge > k.sdHi || cold > k.coldCapAtMinus {
			t.Errorf("%s: k %g, steady R %g Ω, self-discharge %g/month, −20 °C capacity %g; outside docs/cells.md", k.id, c.Peukert, r0, c.SelfDischarge, cold)
		}
		// Resistance rises several-fold towards empty for alkaline.
		if end := c.SteadyResistance(c.Curve.End(), RefTempC); k.id == "lr6" && end < 3*r0 {
			t.Errorf("lr6: resistance at empty %g Ω, want several times %g Ω", end, r0)
		}
	}
}

func TestCautions(t *testing.T) {
	has := func(id string, words ...string) {
		t.Helper()
		c, _ := Lookup(id)
		all := strings.Join(Cautions(c), "\n")
		for _, w := range words {
			if !strings.Contains(all, w) {
				t.Errorf("%s cautions lack %q:\n%s", id, w, all)
			}
		}
	}
	has("li-ion-18650", "protection circuit", "charger", "2.75 V", "4.2 V", "mix")
	has("lifepo4", "protection circuit", "3.65 V", "2.5 V")
	has("lr6", "leak", "mix", "maker's data")
	has("cr2032", "swallowing", "IEC 62115", "screwed shut")
	has("hr6", "reverse-charged")
	c, _ := Lookup("lr6")
	if strings.Contains(strings.Join(Cautions(c), " "), "swallowing") {
		t.Error("an AA cell got the coin-cell caution")
	}
	// A cell whose chemistry is not stated (a CSV file, an imported Li-ion
	// log) is told to follow its maker's cautions, Li-ion's named.
	custom := &Cell{Chemistry: "custom"}
	if got := Cautions(custom); len(got) != 3 || !strings.Contains(got[0], "Li-ion") || !strings.Contains(got[1], "mix") {
		t.Errorf("custom cell cautions %q, want the unstated chemistry's and the two general ones", got)
	}
}

// Every library cell has thermal data, from its form factor (formHeat:
// typical values from memory), with a time constant between a minute and
// an hour and a half — the range of bare cells in still air from a coin to
// a D cell (from memory).
func TestLibraryHeat(t *testing.T) {
	for _, c := range Library() {
		st := c.ThermalStage()
		if !c.SelfHeats() || st.Tau < 60 || st.Tau > 5400 {
			t.Errorf("%s: C %v J/K, θ %v K/W, τ %v s", c.ID, c.HeatCapacity, c.ThermalRes, st.Tau)
		}
	}
}

// The hot-cell warning: above the chemistry's usual discharge limit
// (typical values from memory: 60 °C for Li-ion), none at or below it;
// where the ambient alone is past the limit it names the ambient, not the
// cells' own losses (whose remedies would not help).
func TestHotWarning(t *testing.T) {
	c, _ := Lookup("li-ion-18650")
	if w := HotWarning(c, 60, 20); w != "" {
		t.Errorf("at 60 °C: %q", w)
	}
	w := HotWarning(c, 64, 20)
	if !strings.Contains(w, "64 °C") || !strings.Contains(w, "60 °C") || !strings.Contains(w, "44 K above") || !strings.Contains(w, "maker's data") {
		t.Errorf("at 64 °C: %q", w)
	}
	w = HotWarning(c, 65.1, 65)
	if !strings.Contains(w, "65 °C ambient") || strings.Contains(w, "own losses") || strings.Contains(w, "moving air") {
		t.Errorf("at a 65 °C ambient: %q", w)
	}
	// At exactly the limit the ambient is the cause, not a 1 K rise.
	w = HotWarning(c, 61, 60)
	if !strings.Contains(w, "60 °C ambient is at the 60 °C") || strings.Contains(w, "own losses") {
		t.Errorf("at a 60 °C ambient: %q", w)
	}
	if w := HotWarning(&Cell{Chemistry: "custom"}, 200, 20); w != "" {
		t.Errorf("a chemistry without a limit: %q", w)
	}
}
