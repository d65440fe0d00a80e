package guard

import (
	"errors"
	"strings"
	"testing"
	"unicode"
)

func TestCheckTOMLAcceptsOrdinaryFiles(t *testing.T) {
	ok := []string{
		"name = \"a.b.c\"\ncell = \"lr6\"\nload = \"100mA\"\n",
		"[sweep]\nfloor = {from = \"1.0V\", to = \"2V\", step = \"0.1V\"}\n",
		"[[define_cell]]\nid = \"x\"\ncurve = [[0, 1.5], [1000, 0.9]]\nrc = [\n  [0.1, 10],\n  [0.2, 100],\n]\n",
		"a.b.c = 1\n[x.y]\nz = '''\n[[[[[[[[[[[[[[[[[[[[\n'''\nw = \"{{{{{{{{{{{{{{{{{{{{{\\\"\"\n",
		"t = {}\nu = { a = {}, b = [{}, {}] }\n# [[[[[[[[[[[[[[[[[[[[[[\n",
		"x = 1.5e3\ny = [1.5, 2.5, 3.5, 4.5, 5.5, 6.5, 7.5, 8.5, 9.5, 10.5]\n",
	}
	for _, s := range ok {
		if err := CheckTOML([]byte(s)); err != nil {
			t.Errorf("%q: %v", s, err)
		}
	}
}

func TestCheckTOMLRefusesDeepAndLong(t *testing.T) {
	deep := "name=\"x\"\nx = " + strings.Repeat("{a=", 10000) + "1" + strings.Repeat("}", 10000) + "\n"
	arr := "x = " + strings.Repeat("[", 17) + strings.Repeat("]", 17)
	dotted := "name=\"x\"\n[" + strings.Repeat("a.", 20000) + "a]\n"
	dottedKey := "\n\n" + strings.Repeat("a.", 9) + "a = 1\n"
	inlineDotted := "x = {" + strings.Repeat("a.", 9) + "b = 1}\n"
	many := strings.Repeat("[t]\n", MaxTOMLKeys+1)
	cases := []struct {
		in, want string
		line     int
	}{
		{deep, "nested more than 16 levels", 2},
		{arr, "nested more than 16 levels", 1},
		{dotted, "more than 8 dotted parts", 2},
		{dottedKey, "more than 8 dotted parts", 3},
		{inlineDotted, "more than 8 dotted parts", 1},
		{many, "more than 10000 keys", MaxTOMLKeys + 1},
	}
	for _, c := range cases {
		err := CheckTOML([]byte(c.in))
		var se *ShapeError
		if !errors.As(err, &se) || !strings.Contains(err.Error(), c.want) || se.Line != c.line {
			t.Errorf("%.40q…: got %v, want line %d %q", c.in, err, c.line, c.want)
		}
	}
	// Exactly at the limits is fine.
	atDepth := "x = " + strings.Repeat("[", MaxTOMLDepth) + strings.Repeat("]", MaxTOMLDepth)
	atParts := strings.Repeat("a.", MaxTOMLKeyParts-1) + "a = 1"
	for _, s := range []string{atDepth, atParts} {
		if err := CheckTOML([]byte(s)); err != nil {
			t.Errorf("%q at the limit: %v", s, err)
		}
	}
}

func TestClean(t *testing.T) {
	cases := map[string]string{
		"plain name":             "plain name",
		"X\x1b]2;pwned\a":        "X]2;pwned",
		"red\x1b[31mtext\x1b[0m": "red[31mtext[0m",
		"tab\tand\nnewline\r":    "tab and newline ",
		"c1\u009b31m":            "c131m",
		"bidi\u202egnp.exe":      "bidignp.exe",
		"bad\xffbyte":            "bad\ufffdbyte",
		"Ωµ° ok":                 "Ωµ° ok",
		"del\x7f":                "del",
		"":                       "",
	}
	for in, want := range cases {
		if got := Clean(in); got != want {
			t.Errorf("Clean(%q) = %q, want %q", in, got, want)
		}
		for _, r := range Clean(in) {
			if unicode.IsControl(r) {
				t.Errorf("Clean(%q) keeps control %U", in, r)
			}
		}
	}
	if got := CleanLines("a\x1b\nb\tc"); got != "a\nb c" {
		t.Errorf("CleanLines: %q", got)
	}
}

// BenchmarkCheckTOMLDeep is the refusal of the 40 kB nested file that took
// the parser 20 s and 4 GB.
func BenchmarkCheckTOMLDeep(b *testing.B) {
	deep := []byte("name=\"x\"\nx = " + strings.Repeat("{a=", 10000) + "1" + strings.Repeat("}", 10000))
	for b.Loop() {
		if CheckTOML(deep) == nil {
			b.Fatal("accepted")
		}
	}
}
