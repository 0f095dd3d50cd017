package main

import (
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"sort"
	"strings"
	"time"

	"whorl/internal/version"
)

// Exit codes. This table is the one documented in the package comment and
// in docs/cli.md; keep them in step.
const (
	exitOK       = 0 // success
	exitFailure  = 1 // unexpected failure (I/O, internal error)
	exitUsage    = 2 // bad command line: unknown command, flag or value
	exitData     = 3 // bad input data: malformed, truncated or impossible file or parameter
	exitCheck    = 4 // a check failed: record verification, calibration check, accuracy target
	exitRefused  = 5 // the record store refused the action for the declared role
	exitCanceled = 130
)

// env is everything a command may touch outside its arguments, so that
// tests can run commands in-process with their own streams, clock and
// environment.
type env struct {
	stdin  io.Reader
	stdout io.Writer
	stderr io.Writer
	now    func() time.Time
	getenv func(string) string
	// isTerminal reports whether stderr is an interactive terminal
	// (progress bars are drawn only then).
	isTerminal bool
}

// command is one `whorl` subcommand. Name may hold spaces for nested
// commands ("scan info"); the longest registered name matching the leading
// arguments is run.
type command struct {
	name     string
	synopsis string // one line for the command list
	usage    string // "whorl scan info [flags] FILE..."
	help     string // paragraphs shown by --help after the flags; include examples
	// setFlags defines the command's flags on fs; may be nil.
	setFlags func(fs *flag.FlagSet)
	run      func(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error
}

var registry = map[string]*command{}

// register adds a command at init time. It panics on a duplicate name: that
// is a programming error.
func register(c *command) {
	if _, dup := registry[c.name]; dup {
		panic("whorl: duplicate command " + c.name)
	}
	registry[c.name] = c
}

// usageError is a command-line mistake; it maps to exitUsage.
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

func usagef(format string, a ...any) error { return &usageError{fmt.Sprintf(format, a...)} }

// codedError carries an exit code chosen by the command.
type codedError struct {
	code int
	err  error
}

func (e *codedError) Error() string { return e.err.Error() }
func (e *codedError) Unwrap() error { return e.err }

// dataError marks err as a problem with the user's input data (exitData).
func dataError(err error) error {
	if err == nil {
		return nil
	}
	return &codedError{exitData, err}
}

// checkFailed marks err as a failed check (exitCheck).
func checkFailed(err error) error {
	if err == nil {
		return nil
	}
	return &codedError{exitCheck, err}
}

// refused marks err as an action refused for the declared role (exitRefused).
func refused(err error) error {
	if err == nil {
		return nil
	}
	return &codedError{exitRefused, err}
}

// exitCode maps an error returned by a command to the process exit code.
func exitCode(err error) int {
	var ue *usageError
	var ce *codedError
	switch {
	case err == nil:
		return exitOK
	case errors.As(err, &ue):
		return exitUsage
	case errors.As(err, &ce):
		return ce.code
	case errors.Is(err, context.Canceled):
		return exitCanceled
	}
	return exitFailure
}

// run executes the command line args (without the program name) and returns
// the exit code. main only calls run.
func run(ctx context.Context, e *env, args []string) int {
	if len(args) == 0 || args[0] == "-h" || args[0] == "--help" || args[0] == "help" {
		if len(args) > 1 && args[0] == "help" {
			return run(ctx, e, append(args[1:], "--help"))
		}
		printMain(e.stdout)
		if len(args) == 0 {
			return exitUsage
		}
		return exitOK
	}
	if args[0] == "--version" || args[0] == "version" {
		fmt.Fprintf(e.stdout, "whorl %s\n", version.String())
		return exitOK
	}
	c, rest := lookup(args)
	if c == nil {
		fmt.Fprintf(e.stderr, "whorl: unknown command %q\n", strings.Join(leadingWords(args), " "))
		if subs := subcommands(args[0]); len(subs) > 0 {
			fmt.Fprintf(e.stderr, "commands under %q: %s\n", args[0], strings.Join(subs, ", "))
		} else {
			fmt.Fprintln(e.stderr, "run 'whorl --help' for the list of commands")
		}
		return exitUsage
	}
	fs := flag.NewFlagSet("whorl "+c.name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	if c.setFlags != nil {
		c.setFlags(fs)
	}
	if err := fs.Parse(interleave(fs, rest)); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			printCommand(e.stdout, c, fs)
			return exitOK
		}
		fmt.Fprintf(e.stderr, "whorl %s: %v\nrun 'whorl %s --help' for usage\n", c.name, err, c.name)
		return exitUsage
	}
	err := c.run(ctx, e, fs, fs.Args())
	if err != nil {
		fmt.Fprintf(e.stderr, "whorl %s: %v\n", c.name, err)
		var ue *usageError
		if errors.As(err, &ue) {
			fmt.Fprintf(e.stderr, "run 'whorl %s --help' for usage\n", c.name)
		}
	}
	return exitCode(err)
}

// interleave moves flags that follow positional arguments to the front, so
// that "whorl scan info a.csv --json" works as well as "--json a.csv".
// Everything after "--" stays positional.
func interleave(fs *flag.FlagSet, args []string) []string {
	var flags, pos []string
	for i := 0; i < len(args); i++ {
		a := args[i]
		if a == "--" {
			pos = append(pos, args[i+1:]...)
			break
		}
		if len(a) > 1 && a[0] == '-' {
			flags = append(flags, a)
			name := strings.TrimLeft(a, "-")
			if strings.Contains(name, "=") {
				continue
			}
			if f := fs.Lookup(name); f != nil {
				if bf, ok := f.Value.(interface{ IsBoolFlag() bool }); ok && bf.IsBoolFlag() {
					continue
				}
				if i+1 < len(args) {
					flags = append(flags, args[i+1])
					i++
				}
			}
			continue
		}
		pos = append(pos, a)
	}
	return append(flags, pos...)
}

func leadingWords(args []string) []string {
	var w []string
	for _, a := range args {
		if strings.HasPrefix(a, "-") {
			break
		}
		w = append(w, a)
		if len(w) == 2 {
			break
		}
	}
	return w
}

func lookup(args []string) (*command, []string) {
	for n := min(3, len(args)); n >= 1; n-- {
		if c, ok := registry[strings.Join(args[:n], " ")]; ok {
			return c, args[n:]
		}
	}
	return nil, nil
}

func subcommands(first string) []string {
	var out []string
	for name := range registry {
		if strings.HasPrefix(name, first+" ") {
			out = append(out, name)
		}
	}
	sort.Strings(out)
	return out
}

func printMain(w io.Writer) {
	fmt.Fprintf(w, "whorl %s: eddy-current signal analysis for tube and surface inspection\n\n", version.String())
	fmt.Fprintln(w, "Usage: whorl COMMAND [flags] [args]")
	fmt.Fprintln(w, "\nCommands:")
	names := make([]string, 0, len(registry))
	for n := range registry {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		fmt.Fprintf(w, "  %-22s %s\n", n, registry[n].synopsis)
	}
	fmt.Fprint(w, `
Run 'whorl COMMAND --help' for a command's flags and examples.
Values with units accept suffixes (mm, um, in; Hz, kHz, MHz; S/m, MS/m, %IACS);
a bare number is SI. Most commands take --json for machine-readable output.

Exit codes: 0 success, 1 failure, 2 usage error, 3 bad input data,
4 a check failed, 5 refused for the declared role, 130 interrupted.

Environment:
  WHORL_USER   name of the person at this workstation (records and audit trail)
  WHORL_ROLE   their role: level1, level2, level3 or qa
  WHORL_CERT_EXPIRY  last day their certificate is valid (YYYY-MM-DD), for
               commands that record work (whorl inspect)

`+caution+"\n")
}

// caution is printed wherever results are shown to a person.
const caution = `Caution: results inform decisions on pressure equipment and aircraft. They must
be reviewed by qualified, certified personnel under a written procedure; the
governing code, local regulations and licensed practice take precedence.`

func printCommand(w io.Writer, c *command, fs *flag.FlagSet) {
	fmt.Fprintf(w, "%s\n\nUsage: %s\n", c.synopsis, c.usage)
	hasFlags := false
	fs.VisitAll(func(*flag.Flag) { hasFlags = true })
	if hasFlags {
		fmt.Fprintln(w, "\nFlags:")
		fs.SetOutput(w)
		fs.PrintDefaults()
		fs.SetOutput(io.Discard)
	}
	if c.help != "" {
		fmt.Fprintf(w, "\n%s\n", strings.TrimSpace(c.help))
	}
}

// writeJSON writes v as indented JSON followed by a newline.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

func main() {
	ctx, stop := signalContext()
	defer stop()
	e := &env{
		stdin:      os.Stdin,
		stdout:     os.Stdout,
		stderr:     os.Stderr,
		now:        time.Now,
		getenv:     os.Getenv,
		isTerminal: isTerminal(os.Stderr),
	}
	code := run(ctx, e, os.Args[1:])
	stop()
	os.Exit(code)
}
