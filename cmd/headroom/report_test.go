package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"golang.org/x/net/html"

	"headroom/internal/spice"
	"headroom/internal/spicetest"
)

// parseHTML parses a report with the HTML5 parser of golang.org/x/net/html
// (an implementation of the WHATWG parsing algorithm, outside this
// project) and returns its root.
func parseHTML(t *testing.T, page []byte) *html.Node {
	t.Helper()
	doc, err := html.Parse(strings.NewReader(string(page)))
	if err != nil {
		t.Fatalf("the report does not parse as HTML: %v", err)
	}
	return doc
}

func walk(n *html.Node, f func(*html.Node)) {
	f(n)
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		walk(c, f)
	}
}

func attr(n *html.Node, key string) (string, bool) {
	for _, a := range n.Attr {
		if a.Key == key {
			return a.Val, true
		}
	}
	return "", false
}

func text(n *html.Node) string {
	var b strings.Builder
	walk(n, func(c *html.Node) {
		if c.Type == html.TextNode {
			b.WriteString(c.Data)
		}
	})
	return strings.TrimSpace(b.String())
}

// The report parses as HTML, has every section, shows every verdict
// number exactly as run --format json gives it for the same design, and
// references nothing outside the file (no script, no stylesheet link, no
// image or frame source, no url() in its style).
func TestReportHTMLMatchesRun(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		name string
		args []string
	}{
		{"demo", nil},
		{"pmos", []string{"--protect", "pmos"}},
		{"example", []string{example, "--cell", "hr6"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			out := filepath.Join(dir, c.name+".html")
			code, _, errs := runCLI(t, append(append([]string{"report"}, c.args...), "-o", out)...)
			if code != 0 {
				t.Fatalf("status %d: %s", code, errs)
			}
			page, err := os.ReadFile(out)
			if err != nil {
				t.Fatal(err)
			}
			want := runJSON(t, append([]string{"run", "--spread"}, c.args...)...)
			doc := parseHTML(t, page)
			ids := map[string]bool{}
			seen := 0
			walk(doc, func(n *html.Node) {
				if n.Type != html.ElementNode {
					return
				}
				if id, ok := attr(n, "id"); ok {
					ids[id] = true
				}
				switch n.Data {
				case "script", "link", "iframe", "object", "embed", "img":
					t.Errorf("the report has a <%s> element: it must reference nothing outside the file", n.Data)
				}
				for _, a := range n.Attr {
					if a.Key == "src" || (a.Key == "href" && !strings.HasPrefix(a.Val, "#")) {
						t.Errorf("<%s %s=%q>: a reference outside the file", n.Data, a.Key, a.Val)
					}
				}
				if n.Data == "style" && strings.Contains(text(n), "url(") {
					t.Errorf("the style sheet fetches something: %s", text(n))
				}
				key, ok := attr(n, "data-key")
				if !ok {
					return
				}
				seen++
				got := text(n)
				switch w := want[key].(type) {
				case float64:
					x, err := strconv.ParseFloat(got, 64)
					if err != nil || x != w {
						t.Errorf("%s: report %q, run --format json %v (the same six-digit figure)", key, got, w)
					}
				case string:
					if got != strings.TrimSpace(w) {
						t.Errorf("%s: report %q, run --format json %q", key, got, w)
					}
				case nil:
					if got != "" {
						t.Errorf("%s: report %q, run --format json null", key, got)
					}
				default:
					t.Errorf("%s: run --format json has %T %v", key, w, w)
				}
			})
			for _, id := range []string{"job", "design", "verdict", "chart", "figures", "spread", "lineup", "reverse", "cautions", "reproduce"} {
				if !ids[id] {
					t.Errorf("section %q missing", id)
				}
			}
			// Every figure of run --spread's JSON but the lists (warnings,
			// cautions, sensitivity, spread warnings) and the name is in
			// the figures and spread tables.
			if n := len(want) - 5; seen != n {
				t.Errorf("%d verdict figures in the report, run --format json has %d", seen, n)
			}
			if !strings.Contains(string(page), "<svg") || !strings.Contains(string(page), "@media print") {
				t.Error("the report has no inline chart or no print style sheet")
			}
			checkClean(t, "report", string(page))
			screenshot(t, out)
		})
	}
}

// screenshot opens the report in a headless browser when one is installed
// (Debian's chromium) and keeps the picture as a test artefact; without
// one it says so and skips.
func screenshot(t *testing.T, page string) {
	t.Helper()
	var browser string
	for _, b := range []string{"chromium", "chromium-browser", "google-chrome"} {
		if p, err := exec.LookPath(b); err == nil {
			browser = p
			break
		}
	}
	if browser == "" {
		t.Log("no headless browser (apt-get install chromium) — the report is checked by parsing only")
		return
	}
	shot := filepath.Join(os.TempDir(), "headroom-report-"+filepath.Base(page)+".png")
	cmd := exec.Command(browser, "--headless", "--no-sandbox", "--disable-gpu", "--screenshot="+shot, "--window-size=1200,1600", "file://"+page)
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Errorf("%s could not render the report: %v\n%s", browser, err, out)
		return
	}
	t.Logf("screenshot of the report: %s", shot)
}

// The demo's report, HTML and Markdown, against golden files (go test
// -update rewrites them after a deliberate change). The version line
// depends on the build, so it is replaced before comparing.
func TestReportGolden(t *testing.T) {
	dir := t.TempDir()
	stable := func(s string) string {
		lines := strings.Split(s, "\n")
		for i, l := range lines {
			if strings.HasPrefix(l, "<p>headroom ") || strings.HasPrefix(l, "headroom ") && strings.Contains(l, "Estimates, not certification") {
				lines[i] = "VERSION LINE"
			}
		}
		return strings.ReplaceAll(strings.Join(lines, "\n"), dir, "DIR")
	}
	out := filepath.Join(dir, "demo.html")
	if code, _, errs := runCLI(t, "report", "-o", out); code != 0 {
		t.Fatal(errs)
	}
	page, _ := os.ReadFile(out)
	golden(t, "demo.html", stable(string(page)))
	md := filepath.Join(dir, "demo.md")
	if code, stdout, errs := runCLI(t, "report", "--format", "md", "-o", md); code != 0 || !strings.Contains(stdout, "demo-chart.svg") {
		t.Fatalf("status %d: %s %s", code, stdout, errs)
	}
	text, _ := os.ReadFile(md)
	if !strings.Contains(string(text), "](demo-chart.svg)") {
		t.Error("the Markdown report does not link its chart")
	}
	if svg, err := os.ReadFile(filepath.Join(dir, "demo-chart.svg")); err != nil || !strings.Contains(string(svg), "<svg") {
		t.Errorf("the chart beside the Markdown report: %v", err)
	}
	golden(t, "demo.md", stable(string(text)))
}

// Bad output paths: one line, status 2, nothing left behind.
func TestReportAndNetlistBadOutput(t *testing.T) {
	dir := t.TempDir()
	existing := filepath.Join(dir, "old.html")
	if err := os.WriteFile(existing, []byte("keep me"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"report", "-o", filepath.Join(dir, "no", "such", "r.html")}, "-o"},
		{[]string{"report", "-o", dir}, "-o"},
		{[]string{"report", "-o", existing}, "--force"},
		{[]string{"report"}, "-o is required"},
		{[]string{"report", "--format", "pdf", "-o", filepath.Join(dir, "x.pdf")}, "--format"},
		{[]string{"netlist", "-o", filepath.Join(dir, "no", "such", "d.cir")}, "-o"},
		{[]string{"netlist", "-o", dir}, "-o"},
		{[]string{"netlist", "-o", existing}, "--force"},
		{[]string{"netlist", "--protect", "pptc", "-o", filepath.Join(dir, "p.cir")}, "no circuit"},
	} {
		code, stdout, errs := runCLI(t, c.args...)
		if code != 2 || strings.Count(strings.TrimSpace(errs), "\n") != 0 || !strings.Contains(errs, c.want) || stdout != "" {
			t.Errorf("%v: status %d, stdout %q, stderr %q; want status 2 and one line naming %q", c.args, code, stdout, errs, c.want)
		}
	}
	if b, _ := os.ReadFile(existing); string(b) != "keep me" {
		t.Error("an existing file was overwritten without --force")
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		var names []string
		for _, e := range entries {
			names = append(names, e.Name())
		}
		t.Errorf("files left behind: %v", names)
	}
}

// The exported netlist runs in ngspice (Debian's package) with no edits,
// and its measured time to the floor agrees with headroom's runtime within
// 1 % (the acceptance bound) — one design per load law, a pulsed profile, and
// one behind the current limiter. The demo's netlist is also kept as a
// golden file.
// The elements sit on an ideal heat sink (theta=0): the circuit has no
// self-heating, so like is compared with like (the thermal network has its
// own checks in protect).
func TestNetlistRunsInNgspice(t *testing.T) {
	spicetest.Require(t)
	dir := t.TempDir()
	for _, c := range []struct {
		name string
		args []string
	}{
		{"current", []string{"--load", "300mA", "--protect", "diode:theta=0", "--floor", "2.0", "--hours-per-day", "24", "--standby", "0"}},
		{"power", []string{"--load", "0.5W@85%", "--protect", "schottky:theta=0", "--floor", "1.8", "--hours-per-day", "24", "--standby", "0"}},
		{"resistance", []string{"--load", "8.2ohm", "--protect", "pmos:theta=0", "--floor", "2.0", "--hours-per-day", "24", "--standby", "0"}},
		{"led", []string{"--load", "led:vf=1.9,r=10", "--protect", "none", "--floor", "2.1", "--hours-per-day", "24", "--standby", "0"}},
		{"pulsed demo", []string{"--protect", "diode:theta=0"}},
		{"limiter", []string{"--load", "400mA/20s,100mA/40s", "--protect", "limiter:theta=0", "--floor", "2.0"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			out := filepath.Join(dir, strings.ReplaceAll(c.name, " ", "-")+".cir")
			code, _, errs := runCLI(t, append(append([]string{"netlist"}, c.args...), "-o", out)...)
			if code != 0 {
				t.Fatalf("status %d: %s", code, errs)
			}
			net, _ := os.ReadFile(out)
			if c.name == "pulsed demo" {
				golden(t, "demo.cir", string(net))
			}
			res, err := spice.Run(string(net))
			if err != nil {
				t.Fatal(err)
			}
			got, ok := spice.Values(res)["tfloor"]
			if !ok {
				t.Fatalf("ngspice measured no crossing of the floor:\n%s", res)
			}
			args := append([]string{"run"}, c.args...)
			if c.name == "pulsed demo" || c.name == "limiter" {
				args = append(args, "--hours-per-day", "24", "--standby", "0")
			}
			want := num(t, runJSON(t, args...), "runtime_h")
			if rel := (got - want) / want; rel > 0.01 || rel < -0.01 {
				t.Errorf("ngspice %.6g h, headroom %.6g h: %.3g %% apart (1 %% allowed)", got, want, 100*rel)
			} else {
				t.Logf("ngspice %.6g h, headroom %.6g h (%+.3f %%)", got, want, 100*rel)
			}
		})
	}
}

// A protection spec with every parameter spelled out is one long word; the
// table cells must be allowed to break it, or it runs off the page (it did,
// in the demo's report, at a 900 px window and on A4).
func TestReportCellsWrapLongSpecs(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "r.html")
	if code, _, errs := runCLI(t, "report", "-o", out); code != 0 {
		t.Fatal(errs)
	}
	page, _ := os.ReadFile(out)
	var css string
	walk(parseHTML(t, page), func(n *html.Node) {
		if n.Type == html.ElementNode && n.Data == "style" {
			css += text(n)
		}
	})
	found := false
	for _, rule := range strings.Split(css, "}") {
		sel, body, ok := strings.Cut(rule, "{")
		if ok && strings.Contains(sel, "td") && strings.Contains(body, "overflow-wrap: anywhere") {
			found = true
		}
	}
	if !found {
		t.Error("no style rule lets a table cell break a long word (overflow-wrap: anywhere)")
	}
}
