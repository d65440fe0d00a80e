package tui

import (
	"regexp"
	"strings"
	"unicode/utf8"

	"github.com/charmbracelet/x/ansi"
)

// pad fits plain text s to exactly w columns: cut with "…" or filled with
// spaces.
func pad(s string, w int) string {
	if w <= 0 {
		return ""
	}
	n := ansi.StringWidth(s)
	if n > w {
		return ansi.Truncate(s, w, "…")
	}
	return s + strings.Repeat(" ", w-n)
}

// wrap breaks plain text s into lines of at most w columns at spaces; a
// word longer than a line is cut.
func wrap(s string, w int) string {
	return strings.Join(wrapLines(s, w), "\n")
}

func wrapLines(s string, w int) []string {
	if w < 1 {
		w = 1
	}
	var out []string
	for _, para := range strings.Split(s, "\n") {
		line, lw := "", 0
		for _, word := range glueUnits(strings.Fields(para)) {
			ww := ansi.StringWidth(word)
			for ww > w { // hard-break a word longer than a line
				if lw > 0 {
					out = append(out, line)
					line, lw = "", 0
				}
				head := ansi.Truncate(word, w, "")
				if head == "" { // a character wider than the line
					_, n := utf8.DecodeRuneInString(word)
					head = word[:n]
				}
				out = append(out, head)
				word = word[len(head):]
				ww = ansi.StringWidth(word)
			}
			switch {
			case ww == 0:
			case lw == 0:
				line, lw = word, ww
			case lw+1+ww <= w:
				line, lw = line+" "+word, lw+1+ww
			default:
				out = append(out, line)
				line, lw = word, ww
			}
		}
		out = append(out, line)
	}
	return out
}

// unitWord is a unit symbol (with an SI prefix) as it follows a number,
// with any punctuation after it: "V", "mA,", "°C)", "days".
var unitWord = regexp.MustCompile(`^[fpnµmkMG]?(V|A|W|Ω|Wh|Ah|mAh|µAh|s|min|h|%|°C|days|months|years|cells?|strings?)[,.;:)]*$`)

// glueUnits joins a unit to the number before it ("4.00", "V" → "4.00 V")
// so that a line never breaks between them.
func glueUnits(words []string) []string {
	out := words[:0:0]
	for _, w := range words {
		if n := len(out); n > 0 && unitWord.MatchString(w) {
			if p := out[n-1]; p != "" && p[len(p)-1] >= '0' && p[len(p)-1] <= '9' {
				out[n-1] = p + " " + w
				continue
			}
		}
		out = append(out, w)
	}
	return out
}

// fitLines cuts or pads a block to exactly h lines of at most w columns.
func fitLines(block string, w, h int) []string {
	lines := strings.Split(block, "\n")
	if len(lines) > h {
		lines = lines[:h]
	}
	for i, l := range lines {
		if ansi.StringWidth(l) > w {
			lines[i] = ansi.Truncate(l, w, "")
		}
	}
	for len(lines) < h {
		lines = append(lines, "")
	}
	return lines
}

// padRight pads a styled line to w columns.
func padRight(l string, w int) string {
	n := ansi.StringWidth(l)
	if n >= w {
		return l
	}
	return l + strings.Repeat(" ", w-n)
}

// besides joins two blocks of lines side by side with a gap.
func besides(left []string, lw int, right []string, gap int) []string {
	n := max(len(left), len(right))
	out := make([]string, n)
	for i := range n {
		var l, r string
		if i < len(left) {
			l = left[i]
		}
		if i < len(right) {
			r = right[i]
		}
		out[i] = padRight(l, lw) + strings.Repeat(" ", gap) + r
	}
	return out
}
