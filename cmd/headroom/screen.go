package main

import (
	"errors"
	"io"

	"headroom/internal/scenario"
)

// openScreen opens the interactive screen on s. It is a variable so that
// tests can replace it; its body becomes tui.Run(s) once package tui lands.
var openScreen = func(s *scenario.Scenario, stdout io.Writer) error {
	return errors.New("the interactive screen is not built yet")
}
