// Package guard holds headroom's defences against hostile and huge input,
// each in one place: the shape limits a TOML file must meet before the
// TOML library sees it, and the sanitiser every user-supplied string goes
// through before it reaches a terminal. It is a leaf: anyone may use it.
package guard

import (
	"fmt"
	"strings"
	"unicode/utf8"
)

// Limits on the raw text of a TOML file (scenario or cell), checked before
// parsing. The TOML library's time and memory grow with the square of the
// nesting (a 40 kB file of 10,000 nested inline tables took 20 s and 4 GB),
// so a file past any of these is refused without being parsed. Headroom's
// own files nest at most 3 deep ([[define_cell]] with curve = [[mAh, V]])
// and use one- or two-part keys.
const (
	// MaxTOMLDepth is how deep [ ] and { } may sit inside one another.
	MaxTOMLDepth = 16
	// MaxTOMLKeyParts is the most parts one dotted key or table header
	// may have (a.b.c has 3).
	MaxTOMLKeyParts = 8
	// MaxTOMLKeys is the most keys and table headers one file may hold.
	MaxTOMLKeys = 10000
)

// ShapeError is a TOML file refused for its shape. Line is 1-based.
type ShapeError struct {
	Line   int
	Reason string
}

func (e *ShapeError) Error() string { return fmt.Sprintf("line %d: %s", e.Line, e.Reason) }

// CheckTOML scans the raw text of a TOML file and refuses one nested deeper
// than MaxTOMLDepth, with a key of more than MaxTOMLKeyParts parts, or with
// more than MaxTOMLKeys keys. It reads the text once, in time linear in its
// length, and allocates only the bracket stack (at most MaxTOMLDepth+1).
// It does not validate TOML: what it lets through, the parser judges.
func CheckTOML(data []byte) error {
	line := 1
	var stack []byte // open '[' and '{' of values, innermost last
	keys := 0
	// inKey: scanning a key (up to '=') or a table header (up to ']');
	// header: that key is a [table] or [[array]] header; parts: the
	// current key's parts so far; started: the current top-level line
	// has shown something other than blanks.
	inKey, header, started := true, false, false
	parts := 1
	n := len(data)
	for i := 0; i < n; i++ {
		c := data[i]
		switch c {
		case '\n':
			line++
			if len(stack) == 0 && !header {
				inKey, started, parts = true, false, 1
			}
			continue
		case ' ', '\t', '\r':
			continue
		case '#':
			for i+1 < n && data[i+1] != '\n' {
				i++
			}
			continue
		case '"', '\'':
			var err error
			i, line, err = skipString(data, i, line)
			if err != nil {
				return err
			}
			started = true
			continue
		}
		if inKey {
			switch {
			case c == '[' && !started && len(stack) == 0:
				header = true
				if i+1 < n && data[i+1] == '[' {
					i++
				}
			case c == ']' && header:
				if i+1 < n && data[i+1] == ']' {
					i++
				}
				if keys++; keys > MaxTOMLKeys {
					return tooMany(line)
				}
				header, inKey, parts = false, false, 1
			case c == '.':
				if parts++; parts > MaxTOMLKeyParts {
					return &ShapeError{line, fmt.Sprintf("a key with more than %d dotted parts; headroom refuses the file before reading it", MaxTOMLKeyParts)}
				}
			case c == '=' && !header:
				if keys++; keys > MaxTOMLKeys {
					return tooMany(line)
				}
				inKey, parts = false, 1
			case c == '}' && len(stack) > 0 && stack[len(stack)-1] == '{':
				stack = stack[:len(stack)-1] // an empty inline table {}
				inKey = false
			}
			started = true
			continue
		}
		started = true
		switch c {
		case '[', '{':
			stack = append(stack, c)
			if len(stack) > MaxTOMLDepth {
				return &ShapeError{line, fmt.Sprintf("nested more than %d levels deep ([ ] and { } inside one another); headroom refuses the file before reading it", MaxTOMLDepth)}
			}
			if c == '{' {
				inKey, parts = true, 1
			}
		case ']', '}':
			if len(stack) > 0 {
				stack = stack[:len(stack)-1]
			}
		case ',':
			if len(stack) > 0 && stack[len(stack)-1] == '{' {
				inKey, parts = true, 1
			}
		}
	}
	return nil
}

func tooMany(line int) error {
	return &ShapeError{line, fmt.Sprintf("more than %d keys and tables; headroom refuses the file before reading it", MaxTOMLKeys)}
}

// skipString returns the index of the last byte of the string that opens
// at data[i] (basic "…", literal '…', or their multi-line forms) and the
// line count after it. An unterminated string ends the scan quietly: the
// parser reports it.
func skipString(data []byte, i, line int) (int, int, error) {
	q := data[i]
	n := len(data)
	if i+2 < n && data[i+1] == q && data[i+2] == q {
		// Multi-line: up to the next three quotes (up to two more quotes
		// may stand right before the closing three).
		for j := i + 3; j < n; j++ {
			switch data[j] {
			case '\n':
				line++
			case '\\':
				if q == '"' {
					if j+1 < n && data[j+1] == '\n' {
						line++
					}
					j++
				}
			case q:
				if j+2 < n && data[j+1] == q && data[j+2] == q {
					k := j + 2
					for k+1 < n && data[k+1] == q && k-j < 4 {
						k++
					}
					return k, line, nil
				}
			}
		}
		return n, line, nil
	}
	if i+1 < n && data[i+1] == q {
		return i + 1, line, nil // "" or ''
	}
	for j := i + 1; j < n; j++ {
		switch data[j] {
		case '\n':
			return j - 1, line, nil // unterminated on its line: the parser says so
		case '\\':
			if q == '"' {
				j++
			}
		case q:
			return j, line, nil
		}
	}
	return n, line, nil
}

// Clean returns s fit to print on a terminal: tabs and line breaks become
// spaces, every other control character (C0, DEL, C1, and the Unicode
// bidirectional overrides that reorder what a line shows) is dropped, and
// bytes that are not UTF-8 become U+FFFD. An escape sequence in a name
// ("\x1b]2;title\a") thus prints as its harmless letters.
func Clean(s string) string {
	if clean(s) {
		return s
	}
	var b strings.Builder
	b.Grow(len(s))
	for i := 0; i < len(s); {
		r, size := utf8.DecodeRuneInString(s[i:])
		i += size
		switch {
		case r == utf8.RuneError && size == 1:
			b.WriteRune(utf8.RuneError)
		case r == '\t' || r == '\n' || r == '\r' || r == '\v' || r == '\f':
			b.WriteByte(' ')
		case unsafe(r):
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}

// clean reports whether s needs no change (the common case, no allocation).
func clean(s string) bool {
	for i := 0; i < len(s); i++ {
		c := s[i]
		if c < 0x20 || c == 0x7f {
			return false
		}
		if c >= 0x80 {
			// Decode the rest only when there is non-ASCII text.
			for _, r := range s[i:] {
				if r == utf8.RuneError || unsafe(r) || r < 0x20 {
					return false
				}
			}
			return true
		}
	}
	return true
}

// unsafe reports a rune Clean drops.
func unsafe(r rune) bool {
	switch {
	case r < 0x20, r == 0x7f, r >= 0x80 && r < 0xa0: // C0, DEL, C1
		return true
	case r >= 0x202a && r <= 0x202e, r >= 0x2066 && r <= 0x2069, r == 0x200e, r == 0x200f, r == 0x061c: // bidi controls
		return true
	}
	return false
}

// CleanLines is Clean for text that keeps its line breaks: each line is
// cleaned and the lines joined again with "\n".
func CleanLines(s string) string {
	if clean(strings.ReplaceAll(s, "\n", "")) {
		return s
	}
	ls := strings.Split(s, "\n")
	for i, l := range ls {
		ls[i] = Clean(l)
	}
	return strings.Join(ls, "\n")
}

// MinPrice and MaxPrice bound any price above 0, in dollars: a cell's, a
// pack's, electricity's per kWh or a budget. Past MaxPrice a cost per hour
// or a pack price can overflow to infinity and print as nothing; below
// MinPrice (a ten-thousandth of a cent) a price is noise that prints as a
// row of zeros.
const (
	MinPrice = 1e-6
	MaxPrice = 1e6
)

// PriceOK reports whether v is 0 or between MinPrice and MaxPrice.
func PriceOK(v float64) bool { return v == 0 || v >= MinPrice && v <= MaxPrice }
