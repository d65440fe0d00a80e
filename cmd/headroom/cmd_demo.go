package main

import "headroom/internal/scenario"

var demoCmd = &command{
	name:  "demo",
	run:   runDemo,
	args:  "",
	short: "print the built-in demo scenario (an invented toy) to start a file from",
	help: `
Prints the built-in demo scenario, a commented TOML file for an invented toy,
so that a scenario of your own can start from it.

examples:
  headroom demo > my-toy.toml
  headroom table my-toy.toml --sort runtime --desc
`,
}

func runDemo(c *cli, args []string) error {
	fs := newFlags("demo")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if err := wantArgs("demo", pos, 0, 0, "no arguments"); err != nil {
		return err
	}
	_, err = c.stdout.Write(scenario.DemoTOML())
	return err
}
