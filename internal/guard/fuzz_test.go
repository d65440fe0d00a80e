package guard

import (
	"errors"
	"strings"
	"testing"

	"github.com/BurntSushi/toml"
)

// depth is how deep containers (tables and arrays) nest in a decoded TOML
// value, the top-level table not counted.
func depth(v any) int {
	d := 0
	switch x := v.(type) {
	case map[string]any:
		for _, e := range x {
			d = max(d, 1+depth(e))
		}
	case []map[string]any:
		for _, e := range x {
			d = max(d, 1+depth(e))
		}
	case []any:
		for _, e := range x {
			d = max(d, 1+depth(e))
		}
	}
	return d
}

// FuzzCheckTOML checks the shape check against the TOML library itself
// (BurntSushi/toml, an outside reader): a file refused for its nesting or
// its dotted keys that the library can read must really nest that deep
// (every [ ] or { } and every key part is one level), so the check never
// refuses a file on a shape it does not have. Inputs are kept small, so the
// library's own cost stays low.
func FuzzCheckTOML(f *testing.F) {
	for _, s := range []string{
		"a = 1\n", "[x.y]\nz = [1, [2, [3]]]\n", "t = {a = {b = {c = 1}}}\n",
		"x = " + strings.Repeat("[", 17) + strings.Repeat("]", 17) + "\n",
		"x = " + strings.Repeat("{a=", 17) + "1" + strings.Repeat("}", 17) + "\n",
		strings.Repeat("a.", 8) + "b = 1\n", "[" + strings.Repeat("a.", 8) + "b]\n",
		"s = \"[[[[[[[[[[[[[[[[[[[[\"\nm = '''\n{{{{{{{{{{{{{{{{{{{{\n'''\n# [[[[[[[[[[[[[[[[[[[[\n",
		"[[a]]\nb = [{c = [{d = 1}]}]\n", "\"a.b.c.d.e.f.g.h.i\" = 1\n",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) > 4096 {
			return
		}
		err := CheckTOML(data)
		var se *ShapeError
		if err == nil {
			return
		}
		if !errors.As(err, &se) || se.Line < 1 || se.Line > strings.Count(string(data), "\n")+1 {
			t.Fatalf("refusal %v: want a ShapeError on a line of the file", err)
		}
		var v map[string]any
		if _, perr := toml.Decode(string(data), &v); perr != nil {
			return // not TOML anyway
		}
		d := depth(v)
		switch {
		case strings.Contains(se.Reason, "nested more than"):
			if d <= MaxTOMLDepth {
				t.Fatalf("refused for nesting, but the library reads it %d deep:\n%q", d, data)
			}
		case strings.Contains(se.Reason, "dotted parts"):
			if d < MaxTOMLKeyParts {
				t.Fatalf("refused for a long key, but the library reads it %d deep:\n%q", d, data)
			}
		}
	})
}
