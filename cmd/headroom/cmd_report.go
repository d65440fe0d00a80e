package main

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"html/template"
	"math"
	"path/filepath"
	"regexp"
	"runtime/debug"
	"strings"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/guard"
	"headroom/internal/scenario"
	"headroom/internal/units"
	"headroom/protect"
	"headroom/tolerance"
)

var reportCmd = &command{
	name:  "report",
	run:   runReport,
	args:  "[scenario.toml] [flags] -o REPORT.html [--format html|md] [--force]",
	short: "write a one-file report of the design: verdict, chart, line-up, reversed cells",
	help: `
Writes one self-contained report of the design for a design review or a
colleague: the job and the design, the verdict (runtime, delivered and
stranded charge, heat, standby, cost per hour, the cut-off), the discharge
chart, the chemistry line-up, what a reversed pack or a flipped cell does
with each protection element, warnings and cautions, and the headroom
version with the command that reproduces it.

HTML (the default) is one file: no scripts, nothing fetched from the
network, the chart inline as SVG, and a print stylesheet for A4 or Letter.
--format md writes Markdown with the chart as an SVG file beside it
(REPORT-chart.svg). Every number is the one run --format json gives.

Files are written whole or not at all; an existing file is kept unless
--force is given.

flags:
` + designFlagHelp() + `  -o FILE                       the report to write
  --format html|md              the report's format (default html; md when -o ends in .md)
  --force                       replace existing files

examples:
  headroom report -o demo.html
  headroom report testdata/scenarios/example.toml --protect pmos -o pmos.html
  headroom report --format md -o design.md
`,
}

func runReport(c *cli, args []string) error {
	fs := newFlags("report")
	addDesignFlags(fs)
	out := fs.String("o", "", "")
	formatFlag := fs.String("format", "html", "")
	force := fs.Bool("force", false, "")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if err := wantArgs("report", pos, 0, 1, "a scenario file"); err != nil {
		return err
	}
	if *out == "" {
		return errors.New("report: -o is required: the report to write, e.g. -o design.html")
	}
	md := false
	switch strings.ToLower(strings.TrimSpace(*formatFlag)) {
	case "html":
	case "md":
		md = true
	default:
		return fmt.Errorf("--format: %q is not a report format: expected html or md", *formatFlag)
	}
	// A name ending in .md asks for Markdown; a format given that
	// contradicts the name is refused rather than written under it.
	given := false
	fs.Visit(func(f *flag.Flag) { given = given || f.Name == "format" })
	switch ext := strings.ToLower(filepath.Ext(*out)); {
	case !given && (ext == ".md" || ext == ".markdown"):
		md = true
	case given && md && (ext == ".html" || ext == ".htm"):
		return fmt.Errorf("-o: %s: --format md writes Markdown: name the file .md", guard.Clean(*out))
	case given && !md && (ext == ".md" || ext == ".markdown"):
		return fmt.Errorf("-o: %s: --format html writes HTML: name the file .html, or give --format md", guard.Clean(*out))
	case ext != "" && ext != ".html" && ext != ".htm" && ext != ".md" && ext != ".markdown":
		// As plot refuses chart.jpg: HTML written as report.pdf opens as
		// a broken file.
		return fmt.Errorf("-o: %q: expected a file name ending in .html or .md", guard.Clean(*out))
	}
	s, err := designScenario(fs, pos)
	if err != nil {
		return err
	}
	fromFlags(fs, s, pos)
	rep, err := buildReport(s, "headroom "+shellJoin(append([]string{"report"}, args...)))
	if err != nil {
		return err
	}
	write := func(path string, data []byte) error { return writeOutput("-o", path, data, *force) }
	if md {
		chartPath := strings.TrimSuffix(*out, filepath.Ext(*out)) + "-chart.svg"
		text := rep.markdown(filepath.Base(chartPath))
		// The chart first: a report that names a chart must find it.
		if err := write(chartPath, rep.chartSVG); err != nil {
			return err
		}
		if err := write(*out, text); err != nil {
			return err
		}
		_, err = fmt.Fprintf(c.stdout, "wrote %s and %s\n", *out, chartPath)
		return err
	}
	page, err := rep.html()
	if err != nil {
		return err
	}
	if err := write(*out, page); err != nil {
		return err
	}
	_, err = fmt.Fprintf(c.stdout, "wrote %s\n", *out)
	return err
}

// report is everything a report shows, worked out once for both formats.
type report struct {
	Title      string
	Job        string
	Design     [][2]string // label, value
	Verdict    []reportValue
	Summary    []string // the verdict in sentences
	Lineup     []lineupLine
	Misfits    string
	Reverse    []reverseLine
	Warnings   []string
	Cautions   []string
	Spread     []reportValue // the spread's figures, as run --spread --format json gives them
	Sides      []sideLine
	SpreadNote string
	spreadMD   []byte
	Version    string
	Command    string
	chartSVG   []byte
	Chart      template.HTML // the chart, inline
}

type reportValue struct {
	Key, Label, Value string
}

type sideLine struct {
	Name, Low, High, LowH, HighH, Lost string
	Bar                                int // percent of the largest loss
}

type lineupLine struct {
	Cell, Pack, Runtime, PerHour, Stranded, Cost, Caution string
	Current                                               bool
}

type reverseLine struct {
	Kind, Whole, WholeNote, OneCell string
	Current                         bool
}

// buildReport evaluates the scenario's design and gathers the report.
func buildReport(s *scenario.Scenario, command string) (*report, error) {
	d := s.Design
	d.TracePoints = 0
	r, err := discharge.Evaluate(&d)
	if err != nil {
		return nil, fmt.Errorf("design: %w", err)
	}
	rep := &report{Title: s.Name, Command: command, Version: version()}
	if rep.Title == "" {
		rep.Title = "headroom design"
	}
	rep.Job = "How long the product runs on its cells, how much of their charge it leaves unused and why, and what the input protection costs in runtime, heat and money."
	use := "continuous use"
	if d.HoursPerDay > 0 {
		use = short(d.HoursPerDay) + " h of use a day"
	}
	rep.Design = [][2]string{
		{"cells", packWords(&d) + ", " + d.Cell.Chemistry},
		{"fresh pack", fixed(r.FreshV, 2) + " V, " + money(r.PackPrice)},
		{"protection", s.ProtectSpec + " — " + protectWords(d.Protect)},
		{"load", loadWords(&d)},
		{"floor", fixed(d.Floor, 2) + " V at the load"},
		{"conditions", fmt.Sprintf("%s °C ambient, %s, standby %s", short(d.TempC), use, human(d.Standby, units.Current))},
	}
	for _, f := range runRecord(s, &d, r) {
		switch f.key {
		case "warnings", "cautions", "name":
			continue
		}
		rep.Verdict = append(rep.Verdict, reportValue{Key: f.key, Label: f.label, Value: plainValue(f.val)})
	}
	rep.Summary = strings.Split(strings.TrimSpace(summaryText(&d, r)), "\n")
	rep.Warnings = append([]string{}, r.Warnings...)
	rep.Cautions = dedupe(r.Cautions)

	rows, misfits, err := lineupRows(s, &d, s.Budget, false, "cost")
	if err != nil {
		return nil, err
	}
	for _, row := range rows {
		ph := "—"
		if row.r.RuntimeH > 0 {
			ph = money(row.r.CostPerHour)
		}
		stranded := "—" // never starts: no share, as run and compare write it
		if p := strandedPct(row.r); !math.IsNaN(p) {
			stranded = fixed(p, 1) + " %"
		}
		run := units.Duration(row.r.RuntimeH, 3)
		if row.short {
			run += " (under a day's use)"
		}
		rep.Lineup = append(rep.Lineup, lineupLine{Cell: row.cell.ID, Pack: fmt.Sprintf("%d×%d", row.series, row.par),
			Runtime: run, PerHour: ph, Stranded: stranded,
			Cost: money(row.partCost), Caution: curves.ShortCaution(row.cell),
			Current: row.cell == d.Cell && row.series == d.Series})
	}
	rep.Misfits = strings.Join(misfits, ", ")

	pack := discharge.ReversePack(&d)
	cur := "none"
	if d.Protect != nil {
		cur = d.Protect.Kind()
	}
	for _, k := range protect.Kinds() {
		e := protect.Default(k)
		if k == cur && d.Protect != nil {
			e = d.Protect
		}
		if e == nil {
			continue
		}
		rv := e.Reverse(pack)
		rep.Reverse = append(rep.Reverse, reverseLine{Kind: k, Current: k == cur,
			Whole: caseWords(rv.WholePack), WholeNote: rv.WholePack.Note, OneCell: caseWords(rv.OneCell)})
	}

	tr, err := tolerance.Analyse(&d, s.Tolerances, s.Samples, s.Seed)
	if err != nil {
		return nil, fmt.Errorf("spread: %w", err)
	}
	for _, f := range spreadRecord(s, tr, false) {
		if f.key == "sensitivity" || f.key == "spread_warnings" {
			continue
		}
		rep.Spread = append(rep.Spread, reportValue{Key: f.key, Label: f.label, Value: plainValue(f.val)})
	}
	maxLost := 0.0
	for _, sd := range tr.Corner.Sides {
		maxLost = max(maxLost, sd.LostH)
	}
	for _, sd := range tr.Corner.Sides {
		bar := 0
		if maxLost > 0 {
			bar = int(100*sd.LostH/maxLost + 0.5)
		}
		rep.Sides = append(rep.Sides, sideLine{Name: sd.Name, Low: sd.LowText, High: sd.HighText,
			LowH: sig(sd.LowH, 3) + " h", HighH: sig(sd.HighH, 3) + " h", Lost: sig(sd.LostH, 3) + " h", Bar: bar})
	}
	rep.Warnings = append(rep.Warnings, tr.Warnings...)
	rep.SpreadNote = fmt.Sprintf("Each tolerance alone at its limits, the rest nominal, ranked by the hours its worse side loses; the spread is %d samples (Latin hypercube, seed %d). The default tolerances are typical values from memory: set yours in the scenario's [tolerance] table from your data sheets.", tr.Stats.Samples, tr.Stats.Seed)
	var mb bytes.Buffer
	spreadMarkdown(&mb, tr)
	rep.spreadMD = mb.Bytes()

	svg, err := chart(s, false, "svg")
	if err != nil {
		return nil, err
	}
	rep.chartSVG = svg
	rep.Chart = template.HTML(inlineSVG(svg))
	return rep, nil
}

// summaryText is the verdict in the words run's text output uses.
func summaryText(d *discharge.Design, r *discharge.Result) string {
	var b strings.Builder
	days := d.CalendarText(r)
	if d.HoursPerDay > 0 {
		days += " at " + short(d.HoursPerDay) + " h a day"
	}
	if r.RuntimeH > 0 {
		fmt.Fprintf(&b, "Runtime %s of use (%s).\n", units.Duration(r.RuntimeH, 3), days)
	} else {
		b.WriteString("Runtime 0 h: the product does not start.\n") // as run says it
	}
	if _, ok := r.StrandedShare(); ok {
		fmt.Fprintf(&b, "Stranded %s of a %s reference (%s %%): %s, %s by the floor.\n",
			mAh(r.StrandedMAh), mAh(r.ReferenceMAh), fixed(strandedPct(r), 1), r.ProtectionShareText(), mAh(r.StrandedByFloorMAh))
	} else {
		fmt.Fprintf(&b, "Stranded: — (the product never starts, so no share of the charge is stranded).\n")
	}
	fmt.Fprintf(&b, "The product %s.\n", strings.TrimPrefix(d.CutoffText(r), "the product "))
	return b.String()
}

// protectWords is the element with its part values for people.
func protectWords(e protect.Element) string {
	if e == nil {
		return "no protection element"
	}
	return e.Spec() + fmt.Sprintf(" (part about %s)", money(e.Cost()))
}

// caseWords is one wrong insertion in a few words.
func caseWords(c protect.Case) string { return c.Words() }

// inlineSVG strips the XML prolog gonum/plot writes, so the drawing can sit
// inside an HTML page.
func inlineSVG(svg []byte) string {
	s := string(svg)
	if i := strings.Index(s, "<svg"); i > 0 {
		s = s[i:]
	}
	return s
}

// version is headroom's module version and source revision, as the Go
// build records them.
func version() string {
	bi, ok := debug.ReadBuildInfo()
	if !ok {
		return "headroom (version unknown)"
	}
	v := "headroom " + bi.Main.Version
	for _, s := range bi.Settings {
		if s.Key == "vcs.revision" && len(s.Value) >= 12 {
			v += ", revision " + s.Value[:12]
		}
		if s.Key == "vcs.modified" && s.Value == "true" {
			v += " (modified)"
		}
	}
	return v
}

// shellJoin quotes arguments for a POSIX shell where they need it.
var shellSafe = regexp.MustCompile(`^[A-Za-z0-9@%+=:,./_-]+$`)

func shellJoin(args []string) string {
	out := make([]string, len(args))
	for i, a := range args {
		if shellSafe.MatchString(a) {
			out[i] = a
			continue
		}
		out[i] = "'" + strings.ReplaceAll(a, "'", `'\''`) + "'"
	}
	return strings.Join(out, " ")
}

func (rep *report) html() ([]byte, error) {
	var b bytes.Buffer
	if err := reportPage.Execute(&b, rep); err != nil {
		return nil, fmt.Errorf("report: %w", err)
	}
	return b.Bytes(), nil
}

func (rep *report) markdown(chartFile string) []byte {
	var b strings.Builder
	esc := func(s string) string {
		return strings.NewReplacer("|", `\|`, "\n", " ", "<", "&lt;", ">", "&gt;").Replace(s)
	}
	fmt.Fprintf(&b, "# %s\n\n%s\n\n## Design\n\n| | |\n|---|---|\n", esc(rep.Title), rep.Job)
	for _, kv := range rep.Design {
		fmt.Fprintf(&b, "| %s | %s |\n", kv[0], esc(kv[1]))
	}
	b.WriteString("\n## Verdict\n\n")
	for _, s := range rep.Summary {
		fmt.Fprintf(&b, "%s\n", esc(s))
	}
	b.WriteString("\n| quantity | key | value |\n|---|---|---:|\n")
	for _, v := range rep.Verdict {
		fmt.Fprintf(&b, "| %s | `%s` | %s |\n", v.Label, v.Key, esc(v.Value))
	}
	fmt.Fprintf(&b, "\n## Discharge\n\n![Pack and load voltage over the run](%s)\n", chartFile)
	fmt.Fprintf(&b, "\n## Spread over the tolerances\n\n%s\n\n", rep.SpreadNote)
	b.Write(rep.spreadMD)
	b.WriteString("\n## Chemistry line-up\n\n| cell | S×P | runtime | $/h | stranded | pack+part | caution |\n|---|---|---:|---:|---:|---:|---|\n")
	for _, l := range rep.Lineup {
		cell := l.Cell
		if l.Current {
			cell = "**" + cell + "** (this design)"
		}
		fmt.Fprintf(&b, "| %s | %s | %s | %s | %s | %s | %s |\n", cell, l.Pack, l.Runtime, l.PerHour, l.Stranded, l.Cost, esc(l.Caution))
	}
	if rep.Misfits != "" {
		fmt.Fprintf(&b, "\nNo series count fits: %s.\n", rep.Misfits)
	}
	b.WriteString("\n## Cells put in wrong\n\n| element | whole pack reversed | one cell flipped |\n|---|---|---|\n")
	for _, l := range rep.Reverse {
		k := l.Kind
		if l.Current {
			k = "**" + k + "** (this design)"
		}
		fmt.Fprintf(&b, "| %s | %s | %s |\n", k, esc(l.Whole), esc(l.OneCell))
	}
	list := func(title string, xs []string) {
		if len(xs) == 0 {
			return
		}
		fmt.Fprintf(&b, "\n## %s\n\n", title)
		for _, x := range xs {
			fmt.Fprintf(&b, "- %s\n", esc(x))
		}
	}
	list("Warnings", rep.Warnings)
	list("Cautions", rep.Cautions)
	fmt.Fprintf(&b, "\n## Reproduce\n\n%s. Estimates, not certification.\n\n```\n%s\n```\n", rep.Version, rep.Command)
	return []byte(b.String())
}

// reportPage is the HTML report. html/template escapes every value; the
// chart is gonum/plot's own SVG. No script, no link, no outside resource.
var reportPage = template.Must(template.New("report").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{{.Title}} — headroom report</title>
<style>
body { font: 14px/1.45 system-ui, sans-serif; color: #1b1b1b; margin: 2rem auto; max-width: 62rem; padding: 0 1rem; }
h1 { font-size: 1.5rem; margin-bottom: .2rem; }
h2 { font-size: 1.15rem; border-bottom: 1px solid #bbb; margin-top: 1.6rem; }
table { border-collapse: collapse; width: 100%; margin: .4rem 0; }
th, td { text-align: left; padding: .2rem .5rem; border-bottom: 1px solid #e2e2e2; vertical-align: top; }
th { white-space: nowrap; }
td { overflow-wrap: anywhere; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
tr.this { background: #eef4fa; font-weight: 600; }
.job { color: #444; }
.key { color: #777; font-family: ui-monospace, monospace; font-size: .85em; }
.chart svg { width: 100%; height: auto; }
td.barcell { width: 30%; }
.bar { background: #c8553d; height: .8em; margin-top: .25em; print-color-adjust: exact; -webkit-print-color-adjust: exact; }
pre { background: #f4f4f4; padding: .5rem; white-space: pre-wrap; word-break: break-all; }
@media print {
  @page { size: A4; margin: 15mm; }
  body { margin: 0; max-width: none; font-size: 10pt; }
  section { break-inside: avoid; }
  .chart { break-inside: avoid; }
  tr.this { background: none; }
}
</style>
</head>
<body>
<header id="job">
<h1>{{.Title}}</h1>
<p class="job">{{.Job}}</p>
</header>
<section id="design">
<h2>Design</h2>
<table>{{range .Design}}<tr><th>{{index . 0}}</th><td>{{index . 1}}</td></tr>
{{end}}</table>
</section>
<section id="verdict">
<h2>Verdict</h2>
{{range .Summary}}<p>{{.}}</p>
{{end}}</section>
<section id="chart" class="chart">
<h2>Discharge</h2>
{{.Chart}}
</section>
<section id="figures">
<h2>All figures</h2>
<p>The same figures, under the same keys, as <code>headroom run --format json</code> gives for this design.</p>
<table>
<tr><th>quantity</th><th>key</th><th class="num">value</th></tr>
{{range .Verdict}}<tr><td>{{.Label}}</td><td class="key">{{.Key}}</td><td class="num" data-key="{{.Key}}">{{.Value}}</td></tr>
{{end}}</table>
</section>
<section id="spread">
<h2>Spread over the tolerances</h2>
<table>
<tr><th>quantity</th><th>key</th><th class="num">value</th></tr>
{{range .Spread}}<tr><td>{{.Label}}</td><td class="key">{{.Key}}</td><td class="num" data-key="{{.Key}}">{{.Value}}</td></tr>
{{end}}</table>
<p>{{.SpreadNote}}</p>
<table>
<tr><th>tolerance</th><th class="num">low</th><th class="num">runtime</th><th class="num">high</th><th class="num">runtime</th><th class="num">lost</th><th></th></tr>
{{range .Sides}}<tr><td>{{.Name}}</td><td class="num">{{.Low}}</td><td class="num">{{.LowH}}</td><td class="num">{{.High}}</td><td class="num">{{.HighH}}</td><td class="num">{{.Lost}}</td><td class="barcell"><div class="bar" style="width: {{.Bar}}%"></div></td></tr>
{{end}}</table>
</section>
<section id="lineup">
<h2>Chemistry line-up</h2>
<table>
<tr><th>cell</th><th>S×P</th><th>runtime</th><th>$/h</th><th>stranded</th><th>pack+part</th><th>caution</th></tr>
{{range .Lineup}}<tr{{if .Current}} class="this"{{end}}><td>{{.Cell}}</td><td>{{.Pack}}</td><td class="num">{{.Runtime}}</td><td class="num">{{.PerHour}}</td><td class="num">{{.Stranded}}</td><td class="num">{{.Cost}}</td><td>{{.Caution}}</td></tr>
{{end}}</table>
{{if .Misfits}}<p>No series count fits: {{.Misfits}}.</p>{{end}}
</section>
<section id="reverse">
<h2>Cells put in wrong</h2>
<table>
<tr><th>element</th><th>whole pack reversed</th><th>one cell flipped</th></tr>
{{range .Reverse}}<tr{{if .Current}} class="this"{{end}}><td>{{.Kind}}</td><td title="{{.WholeNote}}">{{.Whole}}</td><td>{{.OneCell}}</td></tr>
{{end}}</table>
</section>
{{if .Warnings}}<section id="warnings">
<h2>Warnings</h2>
<ul>{{range .Warnings}}<li>{{.}}</li>
{{end}}</ul>
</section>
{{end}}<section id="cautions">
<h2>Cautions</h2>
<ul>{{range .Cautions}}<li>{{.}}</li>
{{end}}</ul>
<p>Estimates, not certification: defer to the cell maker's data, local codes and licensed practice.</p>
</section>
<footer id="reproduce">
<h2>Reproduce</h2>
<p>{{.Version}}. The command that wrote this report:</p>
<pre>{{.Command}}</pre>
</footer>
</body>
</html>
`))
