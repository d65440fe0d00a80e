package main

import (
	"io"

	"headroom/internal/scenario"
	"headroom/tui"
)

// openTUI opens the interactive screen on s: the cli's openScreen, which
// tests replace without starting a real terminal program. The screen's r
// key writes the same report as headroom report.
func openTUI(s *scenario.Scenario, stdout io.Writer) error {
	return tui.Run(s, tui.WithReport(writeReportFile))
}

// writeReportFile writes scenario s's HTML report to path, never over an
// existing file (scenario.ErrExists).
func writeReportFile(s *scenario.Scenario, path string) error {
	rep, err := buildReport(s, "headroom (the screen's r key) on "+reportSource(s))
	if err != nil {
		return err
	}
	page, err := rep.html()
	if err != nil {
		return err
	}
	return scenario.WriteFile(path, page, false)
}

// reportSource names where the screen's design came from.
func reportSource(s *scenario.Scenario) string {
	if s.Path != "" {
		return s.Path + ", changed on the screen"
	}
	return "the built-in demo, changed on the screen"
}
