package scenario

import (
	"fmt"
	"reflect"
	"strings"

	"github.com/BurntSushi/toml"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/guard"
	"headroom/internal/units"
	"headroom/protect"
)

// tomlString is curves.TOMLString, the one home of TOML string quoting
// (Go's %q is not TOML escaping: "\a" in a name would not read back).
func tomlString(s string) string { return curves.TOMLString(s) }

// Update rewrites the design's top-level values in orig, the scenario
// file the design came from, and keeps everything else as it was: the
// comments, [options], [sweep], [tolerance], [[define_cell]] tables and
// the note. A value is replaced where its key stands (a comment
// after it stays); a key the file lacks is added before its first table.
// The load is rewritten only when it changed (was, the design as read from
// orig, tells). The result reads back to s's design (Parse).
func Update(orig []byte, was *discharge.Design, s Saved) []byte {
	d := s.Design
	spec := s.ProtectSpec
	if d.Protect != nil {
		spec = protect.Short(d.Protect)
	}
	if spec == "" {
		spec = "none"
	}
	set := []struct{ key, val string }{
		{"cell", tomlString(d.Cell.ID)},
		{"series", fmt.Sprint(d.Series)},
		{"parallel", fmt.Sprint(d.Parallel)},
		{"protect", tomlString(spec)},
		{"floor", tomlString(units.Format(d.Floor, units.Voltage))},
		{"temp", tomlString(g(d.TempC) + "C")},
		{"standby", tomlString(units.Format(d.Standby, units.Current))},
	}
	if s.Name != "" {
		set = append(set, struct{ key, val string }{"name", tomlString(s.Name)})
	}
	// The note is written only when it was edited: a file's own note (a
	// multi-line string, say) stays as the file wrote it.
	var old struct {
		Note string `toml:"note"`
	}
	if _, err := toml.Decode(string(orig), &old); err != nil || guard.CleanLines(old.Note) != s.Note {
		set = append(set, struct{ key, val string }{"note", tomlString(s.Note)})
	}
	if d.HoursPerDay > 0 {
		set = append(set, struct{ key, val string }{"hours_per_day", g(d.HoursPerDay)})
	}
	if d.PackPrice > 0 || d.PriceGiven {
		set = append(set, struct{ key, val string }{"price", g(d.PackPrice)})
	}
	loadChanged := was == nil || !reflect.DeepEqual(was.Profile, d.Profile)

	lines := strings.Split(string(orig), "\n")
	done := map[string]bool{}
	var out []string
	top := true      // before the first table header
	inPhase := false // inside a [[phase]] table being dropped
	firstTable := -1
	for _, l := range lines {
		t := strings.TrimSpace(l)
		if strings.HasPrefix(t, "[") {
			if top {
				firstTable = len(out)
			}
			top = false
			inPhase = loadChanged && strings.HasPrefix(strings.ReplaceAll(t, " ", ""), "[[phase]]")
			if inPhase {
				continue
			}
		}
		if inPhase {
			continue
		}
		if top {
			k, rest, ok := strings.Cut(t, "=")
			k = strings.TrimSpace(k)
			if ok && !strings.HasPrefix(t, "#") {
				if k == "load" && loadChanged {
					continue
				}
				for _, kv := range set {
					if kv.key == k && !done[k] {
						indent := l[:len(l)-len(strings.TrimLeft(l, " \t"))]
						l = indent + k + " = " + kv.val + trailingComment(rest)
						done[k] = true
					}
				}
			}
		}
		out = append(out, l)
	}
	var add []string
	for _, kv := range set {
		if !done[kv.key] {
			add = append(add, kv.key+" = "+kv.val)
		}
	}
	if firstTable < 0 {
		firstTable = len(out)
		for firstTable > 0 && strings.TrimSpace(out[firstTable-1]) == "" {
			firstTable--
		}
	}
	out = append(out[:firstTable], append(add, out[firstTable:]...)...)
	text := strings.TrimRight(strings.Join(out, "\n"), "\n") + "\n"
	if loadChanged {
		var b strings.Builder
		for _, p := range d.Profile {
			b.WriteString("\n[[phase]]\n")
			if p.Name != "" {
				b.WriteString("name = " + tomlString(p.Name) + "\n")
			}
			b.WriteString("load = " + tomlString(p.Load.String()) + "\nduration = " + tomlString(g(p.Seconds)+"s") + "\n")
		}
		text += b.String()
	}
	return []byte(text)
}

// trailingComment returns the " # …" comment after a one-line TOML value
// (rest is the text after "="), or "".
func trailingComment(rest string) string {
	inStr := byte(0)
	for i := 0; i < len(rest); i++ {
		c := rest[i]
		switch {
		case inStr != 0 && c == '\\' && inStr == '"':
			i++
		case inStr != 0 && c == inStr:
			inStr = 0
		case inStr == 0 && (c == '"' || c == '\''):
			inStr = c
		case inStr == 0 && c == '#':
			j := i
			for j > 0 && (rest[j-1] == ' ' || rest[j-1] == '\t') {
				j--
			}
			return rest[j:]
		}
	}
	return ""
}
