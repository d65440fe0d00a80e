package discharge

import (
	"math"
	"strings"
	"testing"
)

// ParseLoad reads the documented syntax (README, "Loads") into the load
// law and values it names; the values are decimal literals read through
// the unit parser, so exact. String writes each back so ParseLoad reads
// the same load.
func TestParseLoad(t *testing.T) {
	cases := []struct {
		in   string
		want Load
	}{
		{"120mA", Load{Kind: ConstantCurrent, Amps: 0.12}},
		{" 2A ", Load{Kind: ConstantCurrent, Amps: 2}},
		{"0.8W", Load{Kind: ConstantPower, Watts: 0.8, Efficiency: 1}},
		{"0.8W@85%", Load{Kind: ConstantPower, Watts: 0.8, Efficiency: 0.85}},
		{"33ohm", Load{Kind: ConstantResistance, Ohms: 33}},
		{"33Ω", Load{Kind: ConstantResistance, Ohms: 33}},
		{"4.7kohm", Load{Kind: ConstantResistance, Ohms: 4700}},
		{"led:vf=2.0,r=47", Load{Kind: LED, Vf: 2, Ohms: 47}},
		// A bare zero is a rest, as in "2A/10s,0/50s" (a bare non-zero
		// number stays refused: its unit is not known).
		{"0", Load{Kind: ConstantCurrent}},
		{" 0.0 ", Load{Kind: ConstantCurrent}},
	}
	for _, c := range cases {
		got, err := ParseLoad(c.in)
		if err != nil {
			t.Errorf("ParseLoad(%q): %v", c.in, err)
			continue
		}
		if got != c.want {
			t.Errorf("ParseLoad(%q) = %+v, want %+v", c.in, got, c.want)
		}
		back, err := ParseLoad(got.String())
		if err != nil || back != got {
			t.Errorf("ParseLoad(%q.String() = %q) = %+v, %v; want the same load", c.in, got.String(), back, err)
		}
	}
	for _, bad := range []string{"", "12", "12V", "-1A", "101A", "0.8W@0%", "0.8W@120%", "0ohm", "led:vf=2", "led:r=47", "NaNA", "1e400A"} {
		if l, err := ParseLoad(bad); err == nil {
			t.Errorf("ParseLoad(%q) = %+v, want an error", bad, l)
		}
	}
}

// Scaling a load by f multiplies what it asks for by f: current and power
// times f, a resistance divided by f (so it draws f times the current at
// the same voltage). Exact for the binary-exact factors used.
func TestLoadScale(t *testing.T) {
	for _, f := range []float64{0.5, 2, 4} {
		if l := (Load{Kind: ConstantCurrent, Amps: 0.1}).Scale(f); l.Amps != 0.1*f {
			t.Errorf("current × %g: %g A", f, l.Amps)
		}
		if l := (Load{Kind: ConstantPower, Watts: 0.8, Efficiency: 0.85}).Scale(f); l.Watts != 0.8*f || l.Efficiency != 0.85 {
			t.Errorf("power × %g: %+v", f, l)
		}
		if l := (Load{Kind: ConstantResistance, Ohms: 33}).Scale(f); l.Ohms != 33/f {
			t.Errorf("resistance × %g: %g Ω", f, l.Ohms)
		}
		if l := (Load{Kind: LED, Vf: 2, Ohms: 47}).Scale(f); l.Ohms != 47/f || l.Vf != 2 {
			t.Errorf("LED × %g: %+v", f, l)
		}
	}
	// A switching regulator delivering 0.8 W at 85 % takes 0.8/0.85 W
	// from its input (the definition of efficiency); 1e-15 relative for
	// the one division.
	if p := (Load{Kind: ConstantPower, Watts: 0.8, Efficiency: 0.85}).InputPower(); math.Abs(p-0.8/0.85) > 1e-15 {
		t.Errorf("input power %g W, want %g W", p, 0.8/0.85)
	}
}

// ParseProfile reads phases LOAD/DURATION with any time unit and a bare
// load as one phase; FormatProfile writes what it reads back.
func TestProfileRoundTrip(t *testing.T) {
	cases := []struct {
		in      string
		seconds []float64
		kinds   []LoadKind
	}{
		{"120mA", []float64{1}, []LoadKind{ConstantCurrent}},
		{"450mA/3s,120mA/2s,15mA/25s", []float64{3, 2, 25}, []LoadKind{ConstantCurrent, ConstantCurrent, ConstantCurrent}},
		{"0.5W@90%/1min, 33ohm/500ms", []float64{60, 0.5}, []LoadKind{ConstantPower, ConstantResistance}},
		{"led:vf=2,r=47/2s,15mA/1h", []float64{2, 3600}, []LoadKind{LED, ConstantCurrent}},
	}
	for _, c := range cases {
		ph, err := ParseProfile(c.in)
		if err != nil {
			t.Errorf("ParseProfile(%q): %v", c.in, err)
			continue
		}
		if len(ph) != len(c.seconds) {
			t.Errorf("ParseProfile(%q): %d phases, want %d", c.in, len(ph), len(c.seconds))
			continue
		}
		for i, p := range ph {
			if p.Seconds != c.seconds[i] || p.Load.Kind != c.kinds[i] {
				t.Errorf("ParseProfile(%q) phase %d: %v s, kind %v; want %v s, %v", c.in, i+1, p.Seconds, p.Load.Kind, c.seconds[i], c.kinds[i])
			}
		}
		back, err := ParseProfile(FormatProfile(ph))
		if err != nil || len(back) != len(ph) {
			t.Errorf("round trip of %q through %q: %v", c.in, FormatProfile(ph), err)
			continue
		}
		for i := range ph {
			if back[i] != ph[i] {
				t.Errorf("round trip of %q phase %d: %+v, want %+v", c.in, i+1, back[i], ph[i])
			}
		}
	}
	for _, bad := range []string{"", "450mA/3s,15mA", "450mA/0s", "450mA/-1s", "450mA/3V", "x/3s"} {
		if _, err := ParseProfile(bad); err == nil || strings.Contains(err.Error(), "\n") {
			t.Errorf("ParseProfile(%q): %v, want a one-line error", bad, err)
		}
	}
}

// ProfileWords is the one wording of a load profile for people (run,
// compare, spread, table, pick, report and the screen's line-up, pick view
// and product view); expected strings written by hand.
func TestProfileWords(t *testing.T) {
	cases := []struct{ spec, want string }{
		{"450mA/3s,120mA/2s,15mA/25s", "450 mA for 3 s, 120 mA for 2 s, 15 mA for 25 s"},
		{"1.2W@85%/4s,250mA/1.5s", "1.2 W at 85 % for 4 s, 250 mA for 1.5 s"},
		{"led:vf=2.0,r=47", "LED 2 V + 47 Ω"},
		{"120mA", "120 mA"},
		{"33ohm/90min,1mA/10s", "33 Ω for 1.5 h, 1 mA for 10 s"},
	}
	for _, c := range cases {
		prof, err := ParseProfile(c.spec)
		if err != nil {
			t.Fatalf("%s: %v", c.spec, err)
		}
		if got := ProfileWords(prof); got != c.want {
			t.Errorf("ProfileWords(%s) = %q, want %q", c.spec, got, c.want)
		}
	}
	// A phase's name is the user's own and keeps its digits.
	named := []Phase{
		{Name: "mode 2.50", Load: Load{Kind: ConstantCurrent, Amps: 0.45}, Seconds: 3},
		{Name: "idle", Load: Load{Kind: ConstantCurrent, Amps: 0.015}, Seconds: 25},
	}
	if got, want := ProfileWords(named), "mode 2.50 450 mA for 3 s, idle 15 mA for 25 s"; got != want {
		t.Errorf("named phases: %q, want %q", got, want)
	}
}
