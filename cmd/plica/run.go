package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"

	"plica/problems"
)

// Exit statuses.
const (
	exitOK        = 0   // success (a budget stop included)
	exitFail      = 1   // the run failed, or a check did not pass
	exitUsage     = 2   // usage error or bad input file
	exitInterrupt = 130 // interrupted by Ctrl-C or SIGTERM
)

// command is one verb: its usage line, a one-line summary, and how to run it.
type command struct {
	name  string
	usage string // after "plica NAME "
	short string
	long  string
	// run parses its own flags from args and does the work.
	run func(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error
}

var commands = map[string]*command{}

func register(c *command) { commands[c.name] = c }

// usageError is a mistake on the command line (exit status 2): it
// matches problems.ErrInput.
type usageError struct{ msg string }

func (e *usageError) Error() string        { return e.msg }
func (e *usageError) Is(target error) bool { return target == problems.ErrInput }

func usagef(format string, args ...any) error { return &usageError{fmt.Sprintf(format, args...)} }

// failure is a result that did not pass (exit status 1) but is not an error
// in the usual sense; the verb has already printed its findings.
type failure struct{ msg string }

func (e *failure) Error() string { return e.msg }

// reported is an error the verb has already told the user about in its own
// words (an interrupted search's checkpoint message): run prints nothing
// more, and the exit status is the wrapped error's.
type reported struct{ err error }

func (e *reported) Error() string { return e.err.Error() }
func (e *reported) Unwrap() error { return e.err }

// run executes one invocation and returns the exit status; tests call it
// directly.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		printHelp(stderr)
		return exitUsage
	}
	name := args[0]
	if name == "help" || name == "-h" || name == "--help" || name == "-help" {
		if len(args) > 1 {
			if c, ok := commands[args[1]]; ok {
				// Each verb binds its flags when it runs: ask it for -h.
				fs := newFlagSet(c, stdout)
				err := c.run(ctx, fs, []string{"-h"}, stdout, stderr)
				if errors.Is(err, flag.ErrHelp) {
					printCommandHelp(stdout, c, fs)
				}
				if err != nil && !errors.Is(err, flag.ErrHelp) {
					fmt.Fprintf(stderr, "plica: %v\n", err)
					return exitCode(err)
				}
				return exitOK
			}
			fmt.Fprintf(stderr, "plica: unknown verb %q (expected one of: %s)\n", args[1], verbList())
			return exitUsage
		}
		printHelp(stdout)
		return exitOK
	}
	c, ok := commands[name]
	if !ok {
		fmt.Fprintf(stderr, "plica: unknown verb %q (expected one of: %s)\n", name, verbList())
		return exitUsage
	}
	if ctx.Err() != nil {
		// Interrupted before the verb began: nothing is read or written.
		fmt.Fprintf(stderr, "plica: %s interrupted before it started, nothing written\n", name)
		return exitInterrupt
	}
	fs := newFlagSet(c, stderr)
	err := c.run(ctx, fs, args[1:], stdout, stderr)
	if errors.Is(err, flag.ErrHelp) {
		printCommandHelp(stderr, c, fs)
		return exitOK
	}
	var told *reported
	if err != nil && !errors.As(err, &told) {
		var f *failure
		if !errors.As(err, &f) || f.msg != "" {
			for _, line := range strings.Split(err.Error(), "\n") {
				fmt.Fprintf(stderr, "plica: %s\n", line)
			}
		}
	}
	return exitCode(err)
}

// exitCode maps an error to the exit status: every input error (files,
// arguments, runs given) matches problems.ErrInput.
func exitCode(err error) int {
	var f *failure
	switch {
	case err == nil:
		return exitOK
	case errors.Is(err, problems.ErrInput):
		return exitUsage
	case errors.Is(err, context.Canceled):
		return exitInterrupt
	case errors.As(err, &f):
		return exitFail
	}
	return exitFail
}

// newFlagSet makes a verb's flag set. The flag package prints nothing
// itself: -h returns flag.ErrHelp and Run prints the verb's help; a bad flag
// returns a usage error that parseArgs words in two lines (the error, then
// where the flags are listed). out is where the help goes.
func newFlagSet(c *command, out io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet("plica "+c.name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.Usage = func() {}
	return fs
}

// parseArgs parses flags that may come before or after positional
// arguments, and returns the positional ones.
func parseArgs(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				return nil, err
			}
			return nil, &usageError{fmt.Sprintf("%v\nrun \"plica help %s\" for its flags", err, strings.TrimPrefix(fs.Name(), "plica "))}
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, nil
		}
		if strings.TrimSpace(args[0]) == "" {
			return nil, usagef("%s: argument %d is an empty name (expected a path)", strings.TrimPrefix(fs.Name(), "plica "), len(pos)+1)
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}

func printCommandHelp(w io.Writer, c *command, fs *flag.FlagSet) {
	fmt.Fprintf(w, "usage: plica %s %s\n\n%s\n", c.name, c.usage, c.short)
	if c.long != "" {
		fmt.Fprintf(w, "\n%s\n", strings.TrimSpace(c.long))
	}
	hasFlags := false
	fs.VisitAll(func(*flag.Flag) { hasFlags = true })
	if hasFlags {
		fmt.Fprintf(w, "\nflags:\n")
		fs.SetOutput(w)
		fs.PrintDefaults()
	}
}

func verbList() string {
	names := make([]string, 0, len(commands))
	for n := range commands {
		names = append(names, n)
	}
	sort.Strings(names)
	return strings.Join(names, "|")
}

func printHelp(w io.Writer) {
	fmt.Fprintf(w, "plica designs manipulators made of nested, pre-curved bellows.\n\nusage: plica VERB [arguments]\n\nverbs:\n")
	names := strings.Split(verbList(), "|")
	for _, n := range names {
		fmt.Fprintf(w, "  %-10s %s\n", n, commands[n].short)
	}
	fmt.Fprintf(w, "\nRun \"plica help VERB\" or \"plica VERB -h\" for a verb's arguments.\n")
	fmt.Fprintf(w, "\nexit status: 0 success, 1 failed or a check did not pass, 2 usage or input-file error, 130 interrupted\n")
	fmt.Fprintf(w, "\nplica's numbers are model estimates: verify every design on a prototype before relying on it.\n")
}

// floatList parses "a,b,c" into numbers.
func floatList(flagName, s string) ([]float64, error) {
	if strings.TrimSpace(s) == "" {
		return nil, nil
	}
	parts := strings.Split(s, ",")
	out := make([]float64, len(parts))
	for i, p := range parts {
		v, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if errors.Is(err, strconv.ErrRange) {
			return nil, usagef("-%s: %q is out of the finite range (expected finite numbers in a comma-separated list such as 0,180)", flagName, strings.TrimSpace(p))
		}
		if err == nil && (math.IsInf(v, 0) || math.IsNaN(v)) {
			return nil, usagef("-%s: %q is not a finite number (expected finite numbers in a comma-separated list such as 0,180)", flagName, strings.TrimSpace(p))
		}
		if err != nil {
			return nil, usagef("-%s: %q is not a number (expected a comma-separated list such as 0,180)", flagName, p)
		}
		out[i] = v
	}
	return out, nil
}
