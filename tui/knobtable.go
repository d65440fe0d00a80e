package tui

import (
	"fmt"
	"math"
	"strings"

	"headroom/internal/scenario"
	"headroom/internal/units"
	"headroom/protect"
)

// knobSpec is everything about one knob in one place: its names, its
// slider, how it steps, how typed text is parsed and applied, how its
// value is written for the field and shown for people, and its words.
type knobSpec struct {
	name  string // for messages: "floor"
	label string // row label: "Floor"
	// slider is the knob's range; ok false for a cycling knob or a part
	// with nothing to set. pos is the value the slider marks.
	slider func(sh *shared) (r knobRange, ok bool)
	pos    func(v values) float64
	// cycle is the position and number of choices of a cycling knob.
	cycle func(sh *shared) (i, n int)
	// step moves the knob one step in direction dir (coarse: a big one)
	// within the slider, on the values; false when it cannot move.
	step func(sh *shared, v *values, dir int, coarse bool) bool
	// parse reads typed text with the parser the file and the flags use,
	// and returns how to apply it to the values.
	parse func(sh *shared, s string) (func(v *values), error)
	text  func(sh *shared) string // the field's text, which parse reads back
	show  func(sh *shared) string // the value for people, with its unit
	about func(sh *shared) string // a sentence or two on the knob
	hint  func(sh *shared) string // what the field accepts
}

// floatKnob builds the step, parse and text of a plain number knob whose
// value is *at(v) and whose parser is parse.
func floatKnob(k knobSpec, at func(v *values) *float64, parse func(string) (float64, error), text func(float64) string) knobSpec {
	k.pos = func(v values) float64 { return *at(&v) }
	k.step = func(sh *shared, v *values, dir int, coarse bool) bool {
		r, _ := k.slider(sh)
		p := at(v)
		*p = r.step(*p, dir, coarse)
		return true
	}
	k.parse = func(_ *shared, s string) (func(*values), error) {
		x, err := parse(s)
		if err != nil {
			return nil, err
		}
		return func(v *values) { *at(v) = x }, nil
	}
	k.text = func(sh *shared) string { return text(*at(&sh.vals)) }
	return k
}

// countKnob is floatKnob for a whole-number knob.
func countKnob(k knobSpec, at func(v *values) *int, check func(int) error) knobSpec {
	k.pos = func(v values) float64 { return float64(*at(&v)) }
	k.step = func(sh *shared, v *values, dir int, coarse bool) bool {
		r, _ := k.slider(sh)
		p := at(v)
		*p = int(r.step(float64(*p), dir, coarse))
		return true
	}
	k.parse = func(_ *shared, s string) (func(*values), error) {
		n, err := scenario.ParseCount(s, check)
		if err != nil {
			return nil, err
		}
		return func(v *values) { *at(v) = n }, nil
	}
	k.text = func(sh *shared) string { return fmt.Sprint(*at(&sh.vals)) }
	return k
}

// cycleStep moves index i among n choices: one at a time, three coarse.
func cycleStep(i, n, dir int, coarse bool) int {
	s := 1
	if coarse {
		s = 3
	}
	return ((i+dir*s)%n + n) % n
}

// partSlider is the range of the element's main part value.
func partSlider(sh *shared) (knobRange, bool) {
	lo, hi, lg, ok := protect.PrimaryRange(sh.vals.elem.Kind())
	switch {
	case !ok:
		return knobRange{}, false
	case lg:
		return knobRange{lo: lo, hi: hi, log: true, fine: math.Pow(hi/lo, 1.0/40), coarse: math.Pow(hi/lo, 1.0/8), sig: 2}, true
	}
	return knobRange{lo: lo, hi: hi, fine: niceStep((hi - lo) / 50), coarse: niceStep((hi - lo) / 10)}, true
}

// knobTable is the knobs in their panel order (the knob constants index it).
var knobTable = [knobCount]knobSpec{
	knobCell: {
		name: "cell", label: "Cell",
		slider: func(*shared) (knobRange, bool) { return knobRange{}, false },
		cycle:  func(sh *shared) (int, int) { return sh.vals.cell, len(sh.cells) },
		step: func(sh *shared, v *values, dir int, coarse bool) bool {
			v.cell = cycleStep(v.cell, len(sh.cells), dir, coarse)
			return true
		},
		parse: func(sh *shared, s string) (func(*values), error) {
			c, err := sh.scen.ResolveCell(s)
			if err != nil {
				// "LR6" for lr6; a file's own error stands when that fails too.
				if lc, lerr := sh.scen.ResolveCell(strings.ToLower(s)); lerr == nil {
					c, err = lc, nil
				}
			}
			if err != nil {
				return nil, err
			}
			i := sh.addCell(c)
			return func(v *values) { v.cell = i }, nil
		},
		text: func(sh *shared) string { return sh.cell().ID },
		show: func(sh *shared) string { return cellLabel(sh.cell()) },
		about: func(sh *shared) string {
			c := sh.cell()
			s := fmt.Sprintf("%s: %s, %s rated, %s nominal, %s a cell", c.ID, c.Name, units.MAh(c.RatedMAh, 4),
				units.Eng(c.NominalV, units.Voltage, 3), units.Dollars(c.Price))
			if c.Rechargeable {
				s += fmt.Sprintf(", rechargeable (%d cycles)", c.CycleLife)
			}
			return s + fmt.Sprintf(". Cell %d of %d.", sh.vals.cell+1, len(sh.cells))
		},
		hint: func(sh *shared) string {
			return "a cell id (" + strings.Join(firstIDs(sh.cells, 4), ", ") + ", …) or a .csv/.toml cell file"
		},
	},
	knobSeries: countKnob(knobSpec{
		name: "series", label: "In series",
		slider: func(*shared) (knobRange, bool) { return knobRange{lo: 1, hi: seriesHi, fine: 1, coarse: 4}, true },
		show:   func(sh *shared) string { return plural(sh.vals.series, "cell", "cells") },
		about: func(sh *shared) string {
			c := sh.cell()
			return fmt.Sprintf("Cells in each string; the pack is %d × %s = %s nominal.", sh.vals.series,
				units.Eng(c.NominalV, units.Voltage, 3), units.Eng(float64(sh.vals.series)*c.NominalV, units.Voltage, 3))
		},
		hint: func(*shared) string { return fmt.Sprintf("a whole number from 1 to %d", seriesHi) },
	}, func(v *values) *int { return &v.series }, scenario.CheckSeries),
	knobParallel: countKnob(knobSpec{
		name: "parallel", label: "In parallel",
		slider: func(*shared) (knobRange, bool) { return knobRange{lo: 1, hi: parallelHi, fine: 1, coarse: 2}, true },
		show:   func(sh *shared) string { return plural(sh.vals.parallel, "string", "strings") },
		about:  func(*shared) string { return "Strings side by side: more capacity, less sag on pulses." },
		hint:   func(*shared) string { return fmt.Sprintf("a whole number from 1 to %d", parallelHi) },
	}, func(v *values) *int { return &v.parallel }, scenario.CheckParallel),
	knobProtect: {
		name: "protection", label: "Protection",
		slider: func(*shared) (knobRange, bool) { return knobRange{}, false },
		cycle:  func(sh *shared) (int, int) { return sh.vals.kind, len(sh.kinds) },
		step: func(sh *shared, v *values, dir int, coarse bool) bool {
			for range len(sh.kinds) {
				v.kind = cycleStep(v.kind, len(sh.kinds), dir, coarse)
				if e := protect.Default(sh.kinds[v.kind]); e != nil {
					v.elem = e
					return true
				}
			}
			return false
		},
		parse: func(sh *shared, s string) (func(*values), error) {
			e, err := protect.Parse(s)
			if err != nil {
				return nil, err
			}
			i := sh.kindIndex(e.Kind())
			return func(v *values) { v.kind, v.elem = i, e }, nil
		},
		text:  func(sh *shared) string { return sh.vals.elem.Spec() },
		show:  func(sh *shared) string { return sh.vals.elem.Kind() },
		about: func(sh *shared) string { return protect.Describe(sh.vals.elem.Kind()) + "." },
		hint: func(sh *shared) string {
			return "a kind (" + strings.Join(sh.kinds, ", ") + ") or a spec such as pmos:vth=1.2"
		},
	},
	knobPart: {
		name: "part", label: " └ its drop",
		slider: partSlider,
		pos: func(v values) float64 {
			kn, _ := protect.PrimaryOf(v.elem)
			return kn.Value
		},
		step: func(sh *shared, v *values, dir int, coarse bool) bool {
			r, ok := partSlider(sh)
			if !ok {
				return false
			}
			kn, _ := protect.PrimaryOf(v.elem)
			e, err := protect.WithPrimary(v.elem, r.step(kn.Value, dir, coarse))
			if err != nil {
				return false // the step left the element's valid range: stay put
			}
			v.elem = e
			return true
		},
		parse: func(sh *shared, s string) (func(*values), error) {
			kn, ok := protect.PrimaryOf(sh.vals.elem)
			if !ok {
				return nil, fmt.Errorf("%s has no part value to set", sh.vals.elem.Kind())
			}
			x, err := units.Parse(s, kn.Kind, true)
			if err != nil {
				return nil, err
			}
			e, err := protect.WithPrimary(sh.vals.elem, x)
			if err != nil {
				return nil, err
			}
			return func(v *values) { v.elem = e }, nil
		},
		text: func(sh *shared) string {
			if kn, ok := protect.PrimaryOf(sh.vals.elem); ok {
				return units.Human(kn.Value, kn.Kind, 4)
			}
			return ""
		},
		// The part in plain words first (the drop it gives at the load's
		// peak), the model's key beside it.
		show: func(sh *shared) string {
			kn, ok := protect.PrimaryOf(sh.vals.elem)
			if !ok {
				return "nothing to set"
			}
			drop, _ := sh.peakDrop()
			return units.Eng(drop, units.Voltage, 2) + " (" + partName(kn.Key) + " " + units.Eng(kn.Value, kn.Kind, 2) + ")"
		},
		about: func(sh *shared) string {
			kn, ok := protect.PrimaryOf(sh.vals.elem)
			if !ok {
				return "This element has no part value to set; pick another protection."
			}
			drop, at := sh.peakDrop()
			return fmt.Sprintf("On the fresh pack at the %s peak the %s drops %s. The value you set is its model's %s: %s, now %s.",
				units.Eng(at, units.Current, 3), sh.vals.elem.Kind(), units.Eng(drop, units.Voltage, 3), partName(kn.Key), kn.Detail, units.Eng(kn.Value, kn.Kind, 3))
		},
		hint: func(sh *shared) string {
			if kn, ok := protect.PrimaryOf(sh.vals.elem); ok {
				return partName(kn.Key) + ": " + kn.Kind.String() + ", e.g. " + units.Human(kn.Value, kn.Kind, 3)
			}
			return "nothing: this element has no part value"
		},
	},
	knobLoad: floatKnob(knobSpec{
		name: "load level", label: "Load level",
		slider: func(*shared) (knobRange, bool) {
			return knobRange{lo: loadLo, hi: loadHi, log: true, fine: math.Pow(loadHi/loadLo, 1.0/40), coarse: math.Pow(loadHi/loadLo, 1.0/8), sig: 2}, true
		},
		show: func(sh *shared) string {
			return fmt.Sprintf("%s× (%s peak)", trimFloat(sh.vals.scale), peakLabel(sh.profile()))
		},
		about: func(sh *shared) string {
			return "Multiplies every phase of the load: " + profileLabel(sh.profile()) + ". Press e to change the phases themselves."
		},
		hint: func(*shared) string { return "a factor such as 1.5 or 150%" },
	}, func(v *values) *float64 { return &v.scale }, parseScale, func(x float64) string { return trimFloat(x) + "x" }),
	knobFloor: floatKnob(knobSpec{
		name: "floor", label: "Floor",
		slider: func(sh *shared) (knobRange, bool) {
			return knobRange{lo: 0, hi: sh.floorHi(), fine: 0.05, coarse: 0.5}, true
		},
		show: func(sh *shared) string { return units.Eng(sh.vals.floor, units.Voltage, 3) + " at load" },
		about: func(*shared) string {
			return "The lowest voltage the product works at, measured at the load after the protection (brown-out, regulator dropout)."
		},
		hint: func(*shared) string { return "a voltage such as 1.8V" },
	}, func(v *values) *float64 { return &v.floor }, scenario.ParseFloor, func(x float64) string { return trimFloat(x) + " V" }),
	knobTemp: floatKnob(knobSpec{
		name: "ambient", label: "Ambient",
		slider: func(*shared) (knobRange, bool) { return knobRange{lo: tempLo, hi: tempHi, fine: 1, coarse: 5}, true },
		show:   func(sh *shared) string { return units.Eng(sh.vals.tempC, units.Temperature, 3) },
		about: func(*shared) string {
			return "Air temperature around the pack; cold cuts capacity and raises resistance."
		},
		hint: func(*shared) string { return "a temperature such as -10C" },
	}, func(v *values) *float64 { return &v.tempC }, scenario.ParseTemp, func(x float64) string { return trimFloat(x) + " C" }),
	knobHours: floatKnob(knobSpec{
		name: "hours a day", label: "Use a day",
		slider: func(*shared) (knobRange, bool) {
			return knobRange{lo: hoursLo, hi: hoursHi, fine: 0.25, coarse: 2}, true
		},
		show: func(sh *shared) string { return trimFloat(sh.vals.hours) + " h/day" },
		about: func(*shared) string {
			return "Hours of use a day; the rest of the day the product draws its standby current (press e to set it)."
		},
		hint: func(*shared) string { return "hours such as 2 or 90min" },
	}, func(v *values) *float64 { return &v.hours }, scenario.ParseHoursPerDay, func(x float64) string { return trimFloat(x) + " h" }),
}

// rangeOf gives the slider of a numeric knob; ok is false for the cycling
// knobs and for a protection element without a main parameter.
func (sh *shared) rangeOf(k knob) (knobRange, bool) { return knobTable[k].slider(sh) }

// adjust moves knob k one step and re-evaluates.
func (sh *shared) adjust(k knob, dir int, coarse bool) {
	v := sh.vals
	if knobTable[k].step(sh, &v, dir, coarse) {
		sh.vals = v
		sh.evaluate()
	}
}

// floatOf is the value a numeric knob's slider marks.
func (sh *shared) floatOf(k knob) float64 { return knobTable[k].pos(sh.vals) }

// editText is the text a knob's field starts with: its value in a form
// the parser reads back.
func (sh *shared) editText(k knob) string { return knobTable[k].text(sh) }

// setText sets knob k from typed text with the parsers the command line's
// flags use, and re-evaluates. The error says what was wrong.
func (sh *shared) setText(k knob, s string) error {
	s = strings.TrimSpace(s)
	if s == "" {
		return fmt.Errorf("empty: type a value or press esc")
	}
	apply, err := knobTable[k].parse(sh, s)
	if err != nil {
		return err
	}
	apply(&sh.vals)
	sh.evaluate()
	return nil
}

// row is one knob as shown: its name, value with unit, and where the
// slider's marker sits (-1 for none).
type row struct {
	name, value string
	frac        float64
	steps       int // >0: a cycling knob with this many choices
}

func (sh *shared) row(k knob) row {
	spec := knobTable[k]
	r := row{name: spec.label, value: spec.show(sh), frac: -1}
	if kr, ok := spec.slider(sh); ok {
		r.frac = kr.frac(spec.pos(sh.vals))
	}
	if spec.cycle != nil {
		i, n := spec.cycle(sh)
		r.frac, r.steps = float64(i)/math.Max(1, float64(n-1)), n
	}
	return r
}

// detail explains knob k in a sentence or two ("" for no knob: the view
// draws whatever the selection holds).
func (sh *shared) detail(k knob) string {
	if !k.valid() {
		return ""
	}
	return knobTable[k].about(sh)
}

// typingHint says what a knob's text field accepts.
func (sh *shared) typingHint(k knob) string {
	if !k.valid() {
		return ""
	}
	return knobTable[k].hint(sh)
}

// name is the knob's name, for messages.
func (k knob) name() string {
	if !k.valid() {
		return "?"
	}
	return knobTable[k].name
}

// valid reports whether k is one of the knobs.
func (k knob) valid() bool { return k >= 0 && k < knobCount }
