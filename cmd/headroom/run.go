package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime/debug"
	"strings"

	"github.com/mattn/go-isatty"

	"headroom/internal/guard"
	"headroom/internal/scenario"
	"headroom/internal/units"
	"headroom/tui"
)

// command is one subcommand: its name, synopsis, help text and body.
type command struct {
	name  string
	args  string // synopsis after the name
	short string // one line for the command list
	help  string // what it does, its flags and two or three real examples
	run   func(c *cli, args []string) error
}

// cli is one invocation: its streams, how to tell a terminal and how to
// open the screen. Tests build one with newCLI and replace terminal or
// openScreen on it; nothing global is swapped.
type cli struct {
	stdin          io.Reader
	stdout, stderr io.Writer
	terminal       bool // standard output is a terminal
	// openScreen opens the interactive screen on a scenario (tui.Run).
	openScreen func(s *scenario.Scenario, stdout io.Writer) error
	out        *recordingWriter // stdout, remembering the first write error
}

// errHelp asks for the command's help on standard output and exit status 0.
var errHelp = errors.New("help requested")

// commands lists the subcommands in the order "headroom help" shows them.
var commands = []*command{runCmd, spreadCmd, tableCmd, compareCmd, pickCmd, cellsCmd, plotCmd, reportCmd, netlistCmd, demoCmd, helpCmd}

// helpCmd's body lists commands, which lists helpCmd: the one cycle the
// table has, broken here.
func init() { helpCmd.run = runHelp }

func lookupCommand(name string) *command {
	for _, c := range commands {
		if c.name == name {
			return c
		}
	}
	return nil
}

func commandNames() string {
	var n []string
	for _, c := range commands {
		n = append(n, c.name)
	}
	return strings.Join(n, ", ")
}

// Exit statuses. Like Go's own tools, 2 is for what the user typed or
// gave (a flag, an argument, a file, a value) and 1 for a failure that is
// not the input's fault: an internal error, standard output that cannot
// be written, a screen that cannot open.
const (
	exitOK      = 0
	exitFailure = 1
	exitInput   = 2
)

// failure marks an error that is not the input's fault (exit status 1).
type failure struct{ err error }

func (f failure) Error() string { return f.err.Error() }
func (f failure) Unwrap() error { return f.err }

// run is the whole program: it returns the exit status (see exitInput).
// Errors print one line on stderr.
func run(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	return newCLI(stdin, stdout, stderr).main(args)
}

// newCLI is an invocation on these streams with the real terminal test
// and screen.
func newCLI(stdin io.Reader, stdout, stderr io.Writer) *cli {
	out := &recordingWriter{w: stdout}
	return &cli{stdin: stdin, stdout: out, stderr: stderr, out: out,
		terminal: isTerminal(stdout), openScreen: openTUI}
}

// main runs one command line and returns the exit status.
func (c *cli) main(args []string) (code int) {
	defer func() {
		// Last guard only: a panic here is a bug to fix at its source, so
		// its stack goes with it.
		if r := recover(); r != nil {
			fmt.Fprintf(c.stderr, "headroom: internal error: %s\n%s", oneLine(fmt.Sprint(r)), debug.Stack())
			code = exitFailure
		}
	}()
	err := c.dispatch(args)
	var se *tui.SignalError
	if errors.As(err, &se) {
		// The screen closed on a signal: 128 + its number, as shells expect.
		fmt.Fprintf(c.stderr, "headroom: %s\n", se)
		return se.ExitCode()
	}
	if c.out.err != nil {
		fmt.Fprintf(c.stderr, "headroom: writing the output: %s\n", oneLine(c.out.err.Error()))
		return exitFailure
	}
	if err != nil {
		fmt.Fprintf(c.stderr, "headroom: %s\n", oneLine(err.Error()))
		var f failure
		if errors.As(err, &f) {
			return exitFailure
		}
		return exitInput
	}
	return exitOK
}

// recordingWriter passes writes on and remembers the first error, so a
// full disk or a closed pipe is reported once, with status 1.
type recordingWriter struct {
	w   io.Writer
	err error
}

func (r *recordingWriter) Write(p []byte) (int, error) {
	if r.err != nil {
		return 0, r.err
	}
	n, err := r.w.Write(p)
	if err != nil {
		r.err = err
	}
	return n, err
}

// isTerminal reports whether w is a terminal.
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	return isatty.IsTerminal(f.Fd()) || isatty.IsCygwinTerminal(f.Fd())
}

func (c *cli) dispatch(args []string) error {
	if len(args) == 0 {
		if c.terminal {
			return c.screen(scenario.Demo())
		}
		c.usage(c.stdout)
		return nil
	}
	first := args[0]
	switch first {
	case "-h", "-help", "--help":
		c.usage(c.stdout)
		return nil
	case "-version", "--version":
		fmt.Fprintln(c.stdout, version())
		return nil
	}
	if cmd := lookupCommand(first); cmd != nil {
		err := cmd.run(c, args[1:])
		if errors.Is(err, errHelp) {
			cmd.printHelp(c.stdout)
			return nil
		}
		return err
	}
	if strings.HasPrefix(first, "-") {
		return fmt.Errorf("unknown flag %s before a command: expected a command (%s) or a scenario file", first, commandNames())
	}
	if strings.EqualFold(filepath.Ext(first), ".toml") || fileExists(first) {
		if len(args) > 1 {
			return fmt.Errorf("the interactive screen takes one scenario file, got %d arguments (did you mean headroom run %s?)", len(args), strings.Join(args, " "))
		}
		s, err := scenario.Load(first)
		if err != nil {
			return err
		}
		if !c.terminal {
			return fmt.Errorf("%s: the interactive screen needs a terminal; for a report use headroom run %s", first, first)
		}
		return c.screen(s)
	}
	return fmt.Errorf("unknown command %q: expected one of %s, or a scenario file (.toml)", first, commandNames())
}

func (c *cli) screen(s *scenario.Scenario) error {
	if err := c.openScreen(s, c.stdout); err != nil {
		return failure{fmt.Errorf("%w; the headless commands work: headroom help", err)}
	}
	return nil
}

func fileExists(p string) bool {
	st, err := os.Stat(p)
	return err == nil && !st.IsDir()
}

func (c *cli) usage(w io.Writer) {
	fmt.Fprint(w, `headroom estimates battery runtime and the capacity a product wastes: cells,
an input-protection element and the load's floor voltage.

usage:
  headroom                      the interactive screen on the built-in demo (on a terminal)
  headroom FILE.toml            the interactive screen on a scenario file
  headroom COMMAND [arguments]  a headless command

commands:
`)
	for _, cmd := range commands {
		fmt.Fprintf(w, "  %-8s %s\n", cmd.name, cmd.short)
	}
	fmt.Fprint(w, `
"headroom COMMAND -h" shows a command's flags and examples. Flags may be written
-flag or --flag, before or after the file. Errors in what you give (flags,
arguments, files, values) exit with status 2; other failures with status 1.
"headroom --version" prints the version.
`)
}

func (cmd *command) printHelp(w io.Writer) {
	usage := strings.TrimSpace("headroom " + cmd.name + " " + cmd.args)
	fmt.Fprintf(w, "usage: %s\n\n%s", usage, strings.TrimLeft(cmd.help, "\n"))
}

var helpCmd = &command{
	name:  "help",
	args:  "[COMMAND]",
	short: "this list, or a command's flags and examples",
	help: `
Shows the command list, or one command's help.

examples:
  headroom help
  headroom help run
`,
}

func runHelp(c *cli, args []string) error {
	switch {
	case len(args) == 0:
		c.usage(c.stdout)
		return nil
	case len(args) == 1 && (args[0] == "-h" || args[0] == "--help" || args[0] == "-help"):
		return errHelp
	case len(args) > 1:
		return fmt.Errorf("help: one command at a time, got %d", len(args))
	}
	cmd := lookupCommand(args[0])
	if cmd == nil {
		return fmt.Errorf("help: unknown command %q: expected one of %s", args[0], commandNames())
	}
	cmd.printHelp(c.stdout)
	return nil
}

// newFlags makes a subcommand's flag set; it prints nothing itself.
func newFlags(name string) *flag.FlagSet {
	fs := flag.NewFlagSet("headroom "+name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.Usage = func() {}
	return fs
}

// parseArgs parses flags placed anywhere among the positional arguments
// (the flag package stops at the first one) and returns the positionals.
// After "--" everything is positional.
func parseArgs(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				return nil, errHelp
			}
			return nil, flagError(fs.Name(), err)
		}
		rest := fs.Args()
		used := len(args) - len(rest)
		if used > 0 && args[used-1] == "--" {
			return append(pos, rest...), nil
		}
		if len(rest) == 0 {
			return pos, nil
		}
		// "--floor 1.8 V": the shell made the unit an argument of its own.
		if units.IsUnit(rest[0]) && used >= 1 {
			prev := ""
			switch {
			case strings.HasPrefix(args[used-1], "-") && strings.Contains(args[used-1], "="):
				prev = args[used-1] // --floor=1.8
			case used >= 2 && strings.HasPrefix(args[used-2], "-") && !strings.Contains(args[used-2], "="):
				prev = args[used-2] + " " + args[used-1]
			}
			if prev != "" {
				return nil, fmt.Errorf("%s %s: a value and its unit go together: write %s%s, or quote them: \"%s %s\"",
					prev, rest[0], prev, rest[0], strings.TrimLeft(prev[strings.LastIndexAny(prev, " =")+1:], " "), rest[0])
			}
		}
		pos = append(pos, rest[0])
		args = rest[1:]
	}
}

// isUnit reports whether s is a unit symbol on its own, with or without an
// SI prefix ("A", "mA", "V", "ohm", "s", "%"), that is: what a number
// followed by it would parse as.
func isUnit(s string) bool {
	if s == "" || s[0] >= '0' && s[0] <= '9' || s[0] == '-' || s[0] == '.' {
		return false
	}
	for k := units.Voltage; k <= units.Money; k++ {
		if _, err := units.Parse("1"+s, k, false); err == nil {
			return true
		}
	}
	return false
}

// flagError rewrites the flag package's messages in our one-line style;
// cmd is the flag set's name ("headroom cells show"), so that the hint
// names the help that lists the flags.
func flagError(cmd string, err error) error {
	msg := err.Error()
	if name, ok := strings.CutPrefix(msg, "flag provided but not defined: "); ok {
		return fmt.Errorf("unknown flag %s (see %s -h for the flags)", dashes(strings.TrimLeft(name, "-")), cmd)
	}
	if name, ok := strings.CutPrefix(msg, "flag needs an argument: "); ok {
		return fmt.Errorf("%s: needs a value", dashes(strings.TrimLeft(name, "-")))
	}
	if strings.HasPrefix(msg, "invalid boolean value") {
		// invalid boolean value "x" for -force: parse error
		if i := strings.Index(msg, " for -"); i >= 0 {
			name, _, _ := strings.Cut(msg[i+len(" for -"):], ":")
			return fmt.Errorf("--%s: %s: expected true or false", name, strings.TrimPrefix(msg[:i], "invalid boolean value "))
		}
	}
	return errors.New(msg)
}

// dashes writes a flag name as its help does: -o, --series.
func dashes(name string) string {
	if len(name) == 1 {
		return "-" + name
	}
	return "--" + name
}

// wantArgs checks the number of positional arguments.
func wantArgs(name string, pos []string, lo, hi int, what string) error {
	switch {
	case len(pos) < lo:
		return fmt.Errorf("%s: missing %s (see headroom %s -h)", name, what, name)
	case len(pos) > hi:
		return fmt.Errorf("%s: unexpected argument %q (at most %d: %s)", name, pos[hi], hi, what)
	}
	return nil
}

// designScenario is the scenario named in pos (or the demo) with the design
// flags given on the command line set over it: what every command that
// evaluates one design starts from.
func designScenario(fs *flag.FlagSet, pos []string) (*scenario.Scenario, error) {
	s, err := loadScenario(pos)
	if err != nil {
		return nil, err
	}
	if err := applyDesignFlags(fs, s); err != nil {
		return nil, err
	}
	return s, nil
}

// loadScenario reads the scenario file named, or gives the built-in demo
// when none is.
func loadScenario(pos []string) (*scenario.Scenario, error) {
	if len(pos) == 0 {
		return scenario.Demo(), nil
	}
	return scenario.Load(pos[0])
}

// oneLine puts a message on one line fit for a terminal: a file name or a
// value quoted in it may hold control characters.
func oneLine(s string) string { return strings.Join(strings.Fields(guard.Clean(s)), " ") }

// writeOutput writes data to path for the flag that named it, atomically
// (scenario.WriteFile), never over an existing file unless force: the one
// rule every command that writes a file follows.
func writeOutput(flagName, path string, data []byte, force bool) error {
	if err := scenario.WriteFile(path, data, force); err != nil {
		if errors.Is(err, scenario.ErrExists) {
			return fmt.Errorf("%s: %s exists: add --force to replace it", flagName, path)
		}
		return fmt.Errorf("%s: %w", flagName, err)
	}
	return nil
}
