// Command hdrisk answers the questions of a scenario file from the command line: the
// predicted error of one fixed point, share links, and (as commands are added) sweeps,
// maps, the best regularization, measurement planning and finite-size checks.
//
// Usage:
//
//	hdrisk COMMAND [ARGUMENTS]
//	hdrisk help
//
// Results go to stdout (JSON or CSV) only when the command succeeds; messages go to stderr,
// and a failure exits with status 1 (2 for a usage mistake) leaving stdout empty.
package main

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strings"

	"hdrisk/engine/fixedpoint"
)

// command is one subcommand. Adding a command is one file holding its run function and one
// line in the commands table.
type command struct {
	name    string
	args    string // synopsis of the arguments
	summary string // one line
	run     func(args []string, stdin io.Reader, stdout, stderr io.Writer) error
}

var commands = []command{
	{"eval", "FILE|-", "one fixed point of the scenario, as JSON", runEval},
	{"sweep", "FILE --over P --from A --to B [--log] [--curves Q=V1,V2,...]", "the observables along one field (one curve per value of Q), as CSV", runSweep},
	{"map", "FILE --x P --x-from A ... --y Q ...", "the observables over a grid of two fields, as CSV", runMap},
	{"best", "FILE [--over STRENGTH|l1+l2]", "the regularization with the lowest MSE, as JSON", runBest},
	{"plan", "FILE --target-db D", "the smallest alpha reaching D dB at its best regularization, as JSON", runPlan},
	{"check", "FILE --n N --trials T --seed S [--solver cd|prox|vamp] [--matrix M.mtx|M.csv]", "finite-size trials beside the prediction (with --matrix: the user's matrix held fixed, beside random rotations of its spectrum, and the verdict), as JSON", runCheck},
	{"spectrum", "MATRIX|-", "singular values of a matrix file (Matrix Market, CSV, TSV, text), as JSON", runSpectrum},
	{"link", "FILE|-", "the share code (s1.…) of the scenario", runLink},
	{"open", "LINK|-", "the scenario held by a share link or code, as JSON", runOpen},
	{"kinds", "", "the design shapes, signal laws and penalties a scenario may hold, with their parameters", runKinds},
}

func main() {
	os.Exit(run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr))
}

// usageError is a mistake in the command line itself (exit status 2).
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

// helpError is a request for a command's help; it carries the command's flags.
type helpError struct{ flags string }

func (e *helpError) Error() string        { return flag.ErrHelp.Error() }
func (e *helpError) Is(target error) bool { return target == flag.ErrHelp }

func usagef(format string, args ...any) error { return &usageError{fmt.Sprintf(format, args...)} }

// run dispatches to a command and returns the exit status. The command writes into a
// buffer that reaches stdout only on success, so a failure never leaves half a result.
func run(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		usage(stderr)
		return 2
	}
	name := args[0]
	if name == "help" || name == "-h" || name == "--help" || name == "-help" {
		usage(stdout)
		return 0
	}
	for _, c := range commands {
		if c.name != name {
			continue
		}
		var out bytes.Buffer
		err := c.run(args[1:], stdin, &out, stderr)
		switch {
		case errors.Is(err, flag.ErrHelp):
			fmt.Fprintf(stdout, "usage: hdrisk %s\n%s\n", strings.TrimSpace(c.name+" "+c.args), c.summary)
			var he *helpError
			if errors.As(err, &he) && he.flags != "" {
				fmt.Fprintf(stdout, "\nflags:\n%s", he.flags)
			}
			return 0
		case err != nil:
			fmt.Fprintf(stderr, "hdrisk %s: %v\n", c.name, err)
			var ue *usageError
			if errors.As(err, &ue) {
				fmt.Fprintf(stderr, "usage: hdrisk %s %s\n", c.name, c.args)
				return 2
			}
			return 1
		}
		if _, err := stdout.Write(out.Bytes()); err != nil {
			fmt.Fprintf(stderr, "hdrisk %s: %v\n", c.name, err)
			return 1
		}
		return 0
	}
	fmt.Fprintf(stderr, "hdrisk: unknown command %q\n", clip(name))
	usage(stderr)
	return 2
}

func usage(w io.Writer) {
	var b strings.Builder
	b.WriteString("usage: hdrisk COMMAND [ARGUMENTS]\n\ncommands:\n")
	for _, c := range commands {
		fmt.Fprintf(&b, "  %s\n      %s\n", strings.TrimSpace(c.name+" "+c.args), c.summary)
	}
	b.WriteString("\nFILE is a scenario file (JSON); - reads it from standard input.\n")
	b.WriteString("hdrisk COMMAND --help lists the flags of one command.\n")
	io.WriteString(w, b.String())
}

func clip(s string) string {
	if r := []rune(s); len(r) > 40 {
		return string(r[:40]) + "…"
	}
	return s
}

// parseArgs parses flags that may come before, between or after the positional arguments
// ("hdrisk sweep FILE --over l1" as well as "hdrisk sweep --over l1 FILE") and returns the
// positional ones. "-" is a positional argument (standard input).
func parseArgs(fs *flag.FlagSet, args []string) ([]string, error) {
	fs.SetOutput(io.Discard)
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				var b strings.Builder
				fs.SetOutput(&b)
				fs.PrintDefaults()
				return nil, &helpError{flags: b.String()}
			}
			return nil, &usageError{err.Error()}
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, nil
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}

// onePositional parses args and requires exactly one positional argument, named what.
func onePositional(fs *flag.FlagSet, args []string, what string) (string, error) {
	pos, err := parseArgs(fs, args)
	if err != nil {
		return "", err
	}
	switch len(pos) {
	case 0:
		return "", usagef("missing %s", what)
	case 1:
		return pos[0], nil
	}
	return "", usagef("expected one %s, got %d arguments", what, len(pos))
}

// solverFlags declares --tol and --max-iter, the fixed-point solver's settings shared by the
// commands that solve fixed points; the returned function reads them once the flags are
// parsed, refusing negative values.
func solverFlags(fs *flag.FlagSet) func() (fixedpoint.Options, error) {
	tol := fs.Float64("tol", 0, "relative change of (g1, t1) that counts as converged (0: the solver's default)")
	maxIter := fs.Int("max-iter", 0, "fixed-point iteration cap (0: the solver's default)")
	return func() (fixedpoint.Options, error) {
		if *tol < 0 || *maxIter < 0 {
			return fixedpoint.Options{}, usagef("--tol and --max-iter must not be negative")
		}
		return fixedpoint.Options{Tol: *tol, MaxIter: *maxIter}, nil
	}
}
