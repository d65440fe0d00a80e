package curves

import "headroom/internal/rc"

// The built-in cells. Every number here is a typical value from memory for
// a generic cell of the type, not any maker's data and not a brand: curve
// shapes after docs/cells.md, capacities and prices as commonly seen in retail.
// Each curve is the terminal voltage at the cell's RefCurrent and 20 °C, and
// each RatedMAh is the charge where that curve crosses EndPoint, so the
// library is self-consistent (TestLibraryConsistent checks it).

const fromMemory = "typical values from memory, not a brand"

// shape is a curve in units of rated capacity: fractions of RatedMAh
// against volts. A point at fraction 1 sits on the end-point.
type shape struct{ f, v []float64 }

func (s shape) curve(ratedMAh, vScale float64) *Curve {
	q := make([]float64, len(s.f))
	v := make([]float64, len(s.v))
	for i := range q {
		q[i], v[i] = s.f[i]*ratedMAh, s.v[i]*vScale
	}
	return MustCurve(q, v)
}

// alkalineShape is a generic alkaline (Zn/MnO2) curve under a moderate load
// (about a 20–50 h rate): a quick fall from about 1.56 V, a steady slope
// through 1.3–1.2 V and a fall to the 0.9 V end-point. From memory.
var alkalineShape = shape{
	f: []float64{0, 0.02, 0.08, 0.17, 0.29, 0.42, 0.54, 0.67, 0.79, 0.875, 0.94, 0.97, 1.0, 1.02},
	v: []float64{1.56, 1.49, 1.43, 1.39, 1.34, 1.30, 1.26, 1.22, 1.17, 1.12, 1.05, 0.98, 0.90, 0.80},
}

// alkalineResistance is the instant series resistance R0, rising
// several-fold near the end (docs/cells.md); scaled per size by the fresh
// total resistance, half of which is R0 and half the polarisation
// branches (alkalineRC), so that a steady current meets what it met
// before the cells had memory. From memory.
func alkalineResistance(fresh float64) []ResistancePoint {
	return []ResistancePoint{{0, 0.5 * fresh}, {0.5, 0.75 * fresh}, {0.8, 1.3 * fresh}, {0.95, 2.5 * fresh}, {1, 4.5 * fresh}}
}

// alkalineRC are the polarisation branches: a fast one (charge transfer,
// seconds) and a slow one (diffusion in the zinc and the electrolyte, ten
// minutes), together half the fresh resistance. The slow one is what
// makes alkaline cells recover strongly in a rest: intermittent use
// delivers clearly more than continuous use at the same current. Typical
// values from memory, not a fit.
func alkalineRC(fresh float64) []rc.Stage {
	return []rc.Stage{{R: 0.15 * fresh, Tau: 2}, {R: 0.35 * fresh, Tau: 600}}
}

// alkalineTemperature: alkaline cells are strongly cold-sensitive. From
// memory.
var alkalineTemperature = []TempPoint{{-20, 0.25, 5}, {0, 0.65, 2}, {20, 1, 1}, {45, 1.05, 0.85}}

// alkalineSelfDischarge is about 2.5 % a year, per month.
const alkalineSelfDischarge = 0.025 / 12

func alkaline(id, name, desig string, ratedMAh, refA, freshOhm, price float64) *Cell {
	return &Cell{
		ID: id, Name: name, Chemistry: "alkaline", Designation: desig,
		Curve: alkalineShape.curve(ratedMAh, 1), RefCurrent: refA,
		NominalV: 1.5, RatedMAh: ratedMAh, RatedCurrent: refA, EndPoint: 0.9,
		Resistance: alkalineResistance(freshOhm), RC: alkalineRC(freshOhm), Peukert: 1.25,
		Temperature: alkalineTemperature, SelfDischarge: alkalineSelfDischarge,
		Price: price, Source: fromMemory,
	}
}

// nimhShape: about 1.38 V just after charge under 0.2 It, a flat plateau
// near 1.2 V, a knee and the 1.0 V end-point (IEC 61951-2 rates to 1.0 V
// at 0.2 It). From memory.
var nimhShape = shape{
	f: []float64{0, 0.02, 0.08, 0.2, 0.4, 0.6, 0.78, 0.88, 0.94, 0.975, 1.0, 1.01},
	v: []float64{1.38, 1.30, 1.26, 1.24, 1.225, 1.21, 1.19, 1.16, 1.12, 1.07, 1.00, 0.90},
}

// nimhTemperature: NiMH loses much of its capacity below 0 °C. From memory.
var nimhTemperature = []TempPoint{{-20, 0.55, 3}, {0, 0.85, 1.6}, {20, 1, 1}, {45, 0.95, 0.9}}

func nimh(id, name, desig string, ratedMAh, freshOhm, selfDischarge float64, cycles int, price float64) *Cell {
	it := ratedMAh / 1000 // It = rated capacity ÷ 1 h, in A (IEC 61951-2)
	return &Cell{
		ID: id, Name: name, Chemistry: "nimh", Designation: desig,
		Curve: nimhShape.curve(ratedMAh, 1), RefCurrent: 0.2 * it,
		NominalV: 1.2, RatedMAh: ratedMAh, RatedCurrent: 0.2 * it, EndPoint: 1.0,
		// R0, and 30 % of the fresh resistance in two branches: NiMH
		// recovers a little in a rest.
		Resistance: []ResistancePoint{{0, 0.7 * freshOhm}, {0.6, 0.8 * freshOhm}, {0.9, 1.1 * freshOhm}, {1, 1.7 * freshOhm}},
		RC:         []rc.Stage{{R: 0.15 * freshOhm, Tau: 5}, {R: 0.15 * freshOhm, Tau: 300}},
		Peukert:    1.05, Temperature: nimhTemperature, SelfDischarge: selfDischarge,
		Rechargeable: true, CycleLife: cycles, ChargeEfficiency: 0.75,
		Price: price, Source: fromMemory,
	}
}

// liionShape: graphite/NMC cell at 0.2 It: 4.17 V just after a full charge
// to 4.2 V, through the 3.6–3.7 V nominal region to a knee and a 2.75 V
// end-point. From memory.
var liionShape = shape{
	f: []float64{0, 0.04, 0.115, 0.23, 0.35, 0.46, 0.58, 0.69, 0.77, 0.846, 0.904, 0.942, 0.973, 1.0, 1.004},
	v: []float64{4.17, 4.08, 4.00, 3.92, 3.85, 3.78, 3.72, 3.66, 3.60, 3.52, 3.42, 3.30, 3.10, 2.75, 2.50},
}

// liionTemperature: Li-ion delivers much less and sags more in the cold.
// From memory.
var liionTemperature = []TempPoint{{-20, 0.6, 4}, {0, 0.85, 2}, {20, 1, 1}, {45, 1.0, 0.8}}

// liionRC are a lithium cell's polarisation branches: about 15 s (charge
// transfer) and about 7 minutes (diffusion in the particles), ohms given.
// Lithium cells recover a little in a rest. Typical, from memory.
func liionRC(fast, slow float64) []rc.Stage {
	return []rc.Stage{{R: fast, Tau: 15}, {R: slow, Tau: 400}}
}

// The pack protection of lithium cells: under-voltage cut-off per cell
// and its detection delay. Typical protection ICs trip at about 2.4–3.0 V
// after tens to a few hundred milliseconds (from memory, not a part).
const (
	liionCutoffV    = 2.5
	packCutoffDelay = 0.15
)

// library builds the built-in cells, grouped by chemistry. Typical values
// from memory, not a brand.
func library() []*Cell {
	cells := []*Cell{
		// Alkaline (IEC 60086 L system). Reference currents are moderate
		// loads for each size; capacities at those loads to 0.9 V. From memory.
		alkaline("lr6", "alkaline AA", "LR6", 2400, 0.100, 0.15, 0.50),
		alkaline("lr03", "alkaline AAA", "LR03", 1000, 0.050, 0.25, 0.50),
		alkaline("lr14", "alkaline C", "LR14", 6500, 0.200, 0.15, 1.20),
		alkaline("lr20", "alkaline D", "LR20", 13000, 0.250, 0.10, 1.50),
		{
			// Six alkaline cells in one block, modelled as a single 9 V
			// "cell": the alkaline shape times six, end-point 6 × 0.9 V.
			ID: "6lr61", Name: "alkaline 9 V block", Chemistry: "alkaline", Designation: "6LR61",
			Curve: alkalineShape.curve(550, 6), RefCurrent: 0.025,
			NominalV: 9, RatedMAh: 550, RatedCurrent: 0.025, EndPoint: 5.4,
			Resistance: alkalineResistance(1.7), RC: alkalineRC(1.7), Peukert: 1.3,
			Temperature: alkalineTemperature, SelfDischarge: alkalineSelfDischarge,
			Price: 2.50, Source: fromMemory,
		},
		{
			// Zinc-carbon: steeper slope, higher resistance, more rate- and
			// cold-sensitive than alkaline.
			ID: "r6", Name: "zinc-carbon AA", Chemistry: "zinc-carbon", Designation: "R6",
			Curve: MustCurve(
				[]float64{0, 50, 150, 300, 450, 600, 700, 800, 860, 900, 930},
				[]float64{1.52, 1.42, 1.35, 1.28, 1.22, 1.15, 1.09, 1.02, 0.96, 0.90, 0.80}),
			RefCurrent: 0.050, NominalV: 1.5, RatedMAh: 900, RatedCurrent: 0.050, EndPoint: 0.9,
			// R0 plus a fast and a slow branch (0.25 Ω together): zinc-
			// carbon recovers in a rest even more than alkaline.
			Resistance:  []ResistancePoint{{0, 0.10}, {0.5, 0.25}, {0.8, 0.55}, {1, 1.55}},
			RC:          []rc.Stage{{R: 0.10, Tau: 3}, {R: 0.15, Tau: 600}},
			Peukert:     1.35,
			Temperature: []TempPoint{{-20, 0.15, 6}, {0, 0.55, 2.2}, {20, 1, 1}, {45, 1.0, 0.85}},
			// About 6 % a year.
			SelfDischarge: 0.005, Price: 0.25, Source: fromMemory,
		},
		{
			// Lithium-iron-disulfide: about 1.8 V open-circuit fresh, a flat
			// 1.5 V plateau, good at high drain and in the cold, 20-year shelf.
			ID: "fr6", Name: "lithium-iron-disulfide AA", Chemistry: "lithium-fes2", Designation: "FR6",
			Curve: MustCurve(
				[]float64{0, 30, 150, 500, 1000, 1500, 2000, 2400, 2700, 2850, 2930, 2980, 3000, 3010},
				[]float64{1.72, 1.60, 1.55, 1.52, 1.50, 1.48, 1.45, 1.42, 1.37, 1.30, 1.18, 1.02, 0.90, 0.80}),
			RefCurrent: 0.100, NominalV: 1.5, RatedMAh: 3000, RatedCurrent: 0.100, EndPoint: 0.9,
			Resistance:    []ResistancePoint{{0, 0.06}, {0.5, 0.07}, {0.9, 0.12}, {1, 0.29}},
			RC:            []rc.Stage{{R: 0.03, Tau: 3}, {R: 0.03, Tau: 300}},
			Peukert:       1.08,
			Temperature:   []TempPoint{{-20, 0.8, 2}, {0, 0.95, 1.3}, {20, 1, 1}, {45, 1.0, 0.9}},
			SelfDischarge: 0.001, Price: 1.50, Source: fromMemory,
		},
		{
			// Lithium coin (Li/MnO2), rated at a light load of about 0.2 mA
			// (a 15 kΩ resistor) to 2.0 V. Its 10–20 Ω resistance makes a
			// 20 mA pulse sag it by a volt or more (docs/cells.md).
			ID: "cr2032", Name: "lithium coin 20 × 3.2 mm", Chemistry: "lithium-mno2", Designation: "CR2032",
			Curve: MustCurve(
				[]float64{0, 5, 30, 80, 130, 170, 195, 210, 218, 225, 228},
				[]float64{3.15, 3.00, 2.95, 2.92, 2.88, 2.82, 2.72, 2.55, 2.35, 2.00, 1.80}),
			RefCurrent: 0.0002, NominalV: 3.0, RatedMAh: 225, RatedCurrent: 0.0002, EndPoint: 2.0,
			// R0 plus 4 Ω of polarisation: coin cells recover well
			// between pulses.
			Resistance:  []ResistancePoint{{0, 8}, {0.5, 11}, {0.9, 21}, {1, 36}},
			RC:          []rc.Stage{{R: 1.5, Tau: 2}, {R: 2.5, Tau: 900}},
			Peukert:     1.15,
			Temperature: []TempPoint{{-20, 0.6, 3}, {0, 0.85, 1.6}, {20, 1, 1}, {45, 1.0, 0.8}},
			// About 1 % a year.
			SelfDischarge: 0.01 / 12, Price: 0.40, Source: fromMemory,
		},
		// NiMH, rated at 0.2 It to 1.0 V (IEC 61951-2).
		nimh("hr6", "NiMH AA standard", "HR6", 2400, 0.030, 0.25, 500, 3.00),
		nimh("hr6-lsd", "NiMH AA low self-discharge", "HR6", 2000, 0.030, 0.02, 1000, 3.50),
		nimh("hr03", "NiMH AAA standard", "HR03", 800, 0.050, 0.25, 500, 2.50),
		{
			// Li-ion cylindrical 18650, graphite/NMC, rated at 0.2 It to
			// 2.75 V (IEC 61960-3 style rating).
			ID: "li-ion-18650", Name: "Li-ion cylindrical 18650", Chemistry: "li-ion", Designation: "INR19/66",
			Curve: liionShape.curve(2600, 1), RefCurrent: 0.52,
			NominalV: 3.6, RatedMAh: 2600, RatedCurrent: 0.52, EndPoint: 2.75,
			Resistance: []ResistancePoint{{0, 0.023}, {0.5, 0.028}, {0.9, 0.048}, {1, 0.098}},
			RC:         liionRC(0.012, 0.010),
			CutoffV:    liionCutoffV, CutoffDelay: packCutoffDelay,
			Peukert:       1.03,
			Temperature:   liionTemperature,
			SelfDischarge: 0.025, Rechargeable: true, CycleLife: 500, ChargeEfficiency: 0.95,
			Price: 5.00, Source: fromMemory,
		},
		{
			// Li-ion pouch for small products, rated at 0.2 It to 3.0 V.
			ID: "li-ion-pouch", Name: "Li-ion pouch 1000 mAh", Chemistry: "li-ion", Designation: "",
			Curve: MustCurve(
				[]float64{0, 40, 115, 230, 350, 460, 580, 690, 770, 846, 904, 942, 973, 1000, 1004},
				[]float64{4.16, 4.07, 3.99, 3.91, 3.85, 3.79, 3.74, 3.69, 3.64, 3.57, 3.48, 3.38, 3.22, 3.00, 2.75}),
			RefCurrent: 0.2, NominalV: 3.7, RatedMAh: 1000, RatedCurrent: 0.2, EndPoint: 3.0,
			Resistance: []ResistancePoint{{0, 0.045}, {0.5, 0.055}, {0.9, 0.095}, {1, 0.175}},
			RC:         liionRC(0.025, 0.020),
			CutoffV:    liionCutoffV, CutoffDelay: packCutoffDelay,
			Peukert:       1.04,
			Temperature:   liionTemperature,
			SelfDischarge: 0.025, Rechargeable: true, CycleLife: 500, ChargeEfficiency: 0.95,
			Price: 6.00, Source: fromMemory,
		},
		{
			// LiFePO4 18650: 3.65 V charge limit, a very flat 3.2–3.3 V
			// plateau, end-point 2.5 V; rated at 0.2 It.
			ID: "lifepo4", Name: "LiFePO4 cylindrical 18650", Chemistry: "lifepo4", Designation: "IFR19/66",
			Curve: MustCurve(
				[]float64{0, 30, 150, 400, 700, 1000, 1200, 1350, 1420, 1460, 1485, 1500, 1506},
				[]float64{3.40, 3.33, 3.30, 3.28, 3.26, 3.24, 3.21, 3.15, 3.05, 2.90, 2.75, 2.50, 2.30}),
			RefCurrent: 0.3, NominalV: 3.2, RatedMAh: 1500, RatedCurrent: 0.3, EndPoint: 2.5,
			Resistance: []ResistancePoint{{0, 0.03}, {0.5, 0.035}, {0.9, 0.05}, {1, 0.10}},
			RC:         liionRC(0.015, 0.015),
			CutoffV:    2.0, CutoffDelay: packCutoffDelay, // about 2.0–2.5 V, from memory
			Peukert:       1.03,
			Temperature:   []TempPoint{{-20, 0.55, 4.5}, {0, 0.85, 2}, {20, 1, 1}, {45, 1.0, 0.8}},
			SelfDischarge: 0.03, Rechargeable: true, CycleLife: 2000, ChargeEfficiency: 0.95,
			Price: 5.00, Source: fromMemory,
		},
	}
	for _, c := range cells {
		h := formHeat[cellForm[c.ID]]
		c.HeatCapacity, c.ThermalRes = h.capacity, h.theta
	}
	return cells
}

// formHeat is a form factor's lumped heat capacity and still-air thermal
// resistance to the ambient: the cell's mass times about 1 J/(g·K), and
// 1/(h·A) for its outer surface A with h ≈ 10 W/(m²·K) for natural
// convection and radiation together from a bare cell standing in still
// air. Typical values from memory, not a measurement: a cell in a closed
// battery box or pressed against others runs warmer (a higher θ).
var formHeat = map[string]struct{ capacity, theta float64 }{
	"AA":    {23, 38},  // ~23 g; 14.5 × 50.5 mm, ~26 cm²
	"AAA":   {11, 60},  // ~11 g; 10.5 × 44.5 mm, ~16 cm²
	"C":     {66, 20},  // ~66 g; 26 × 50 mm, ~51 cm²
	"D":     {140, 12}, // ~140 g; 34 × 61.5 mm, ~84 cm²
	"9V":    {46, 19},  // ~46 g; 48.5 × 26.5 × 17.5 mm, ~52 cm²
	"18650": {45, 24},  // ~45 g; 18 × 65 mm, ~42 cm²
	"pouch": {20, 23},  // ~20 g; about 50 × 34 × 6 mm, ~44 cm²
	"coin":  {3, 120},  // ~3 g; 20 × 3.2 mm, ~8 cm² (on a board, less)
}

// cellForm is each library cell's form factor, for formHeat.
var cellForm = map[string]string{
	"lr6": "AA", "r6": "AA", "fr6": "AA", "hr6": "AA", "hr6-lsd": "AA",
	"lr03": "AAA", "hr03": "AAA", "lr14": "C", "lr20": "D", "6lr61": "9V",
	"li-ion-18650": "18650", "lifepo4": "18650", "li-ion-pouch": "pouch", "cr2032": "coin",
}
