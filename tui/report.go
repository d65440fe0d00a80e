package tui

import (
	"errors"
	"fmt"
	"path/filepath"
	"strings"

	tea "github.com/charmbracelet/bubbletea"

	"headroom/discharge"
	"headroom/internal/guard"
	"headroom/internal/scenario"
	"headroom/protect"
)

// ReportWriter writes the one-file report of scenario s to path, never
// over an existing file (scenario.ErrExists then). The command line gives
// the screen its own (headroom report's), so the screen and the command
// write the same report.
type ReportWriter func(s *scenario.Scenario, path string) error

// WithReport is an option of Run: r writes the report when the user
// presses r.
func WithReport(r ReportWriter) Option { return func(m *Model) { m.writeReport = r } }

// Option changes a new screen before it opens.
type Option func(*Model)

// reportMsg reports a finished report.
type reportMsg struct {
	path string
	err  error
}

// maxReportTries is how many numbered names the screen tries beside an
// existing report before giving up.
const maxReportTries = 99

// reportCmd writes the report off the key loop, to base.html or, when that
// exists, base-2.html, base-3.html, …: a report never replaces a file.
func reportCmd(w ReportWriter, s *scenario.Scenario, base string) tea.Cmd {
	return func() tea.Msg {
		for n := 1; n <= maxReportTries; n++ {
			path := base + ".html"
			if n > 1 {
				path = fmt.Sprintf("%s-%d.html", base, n)
			}
			err := w(s, path)
			if errors.Is(err, scenario.ErrExists) {
				continue
			}
			return reportMsg{path: path, err: err}
		}
		return reportMsg{err: fmt.Errorf("%s.html and %d numbered names beside it exist", base, maxReportTries)}
	}
}

// reportBase is the report's file name without .html: beside the scenario
// file, named after it, or headroom-report in the save folder.
func (sh *shared) reportBase() string {
	base := "headroom-report"
	dir := sh.saveDir
	if p := sh.scen.Path; p != "" {
		base = strings.TrimSuffix(filepath.Base(p), filepath.Ext(p)) + "-report"
		if dir == "" {
			dir = filepath.Dir(p)
		}
	}
	return filepath.Join(dir, base)
}

// currentScenario is the scenario with the screen's design in it: the
// knobs' cell, pack, element, load level, floor and conditions, and the
// product form's name and note. The chart of a report draws the current
// element only.
func (sh *shared) currentScenario() *scenario.Scenario {
	s := *sh.scen
	d := sh.design()
	s.Design = d
	if sh.vals.name != "" {
		s.Name = sh.vals.name
	}
	s.Note = sh.vals.note
	el := d.Protect
	if el == nil {
		el = protect.None{}
	}
	s.ProtectSpec = el.Spec()
	s.LoadSpec = discharge.FormatProfile(d.Profile)
	s.Protects, s.ProtectSpecs = []protect.Element{el}, []string{protect.Short(el)}
	return &s
}

// reported puts a finished report's news on the status line.
func (m *Model) reported(r reportMsg) {
	if r.err != nil {
		m.save.status, m.save.failed = "Report not written: "+guard.Clean(r.err.Error()), true
		return
	}
	p := r.path
	if abs, err := filepath.Abs(p); err == nil {
		p = abs
	}
	m.save.status, m.save.failed = "Wrote the report to "+guard.Clean(p), false
}
