package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"

	"hdrisk/engine/study"
)

// runSweep solves the scenario along one field and prints a CSV: the field, every
// observable, and the convergence columns of each point. Settings not given on the command
// line come from the scenario's study.sweep, when it has one.
func runSweep(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("sweep", flag.ContinueOnError)
	over := fs.String("over", "", "the field to vary (alpha, l1, l2, noise, density, ...)")
	from := fs.Float64("from", 0, "first value")
	to := fs.Float64("to", 0, "last value")
	points := fs.Int("points", 100, "number of values, ends included")
	logAxis := fs.Bool("log", false, "space the values geometrically")
	solver := solverFlags(fs)
	progress := fs.Bool("progress", false, "report progress on stderr")
	name, err := onePositional(fs, args, "scenario file")
	if err != nil {
		return err
	}
	opts, err := solver()
	if err != nil {
		return err
	}
	s, err := readScenario(name, stdin)
	if err != nil {
		return err
	}
	set := flagsSet(fs)
	if st := s.Study; st != nil && st.Sweep != nil {
		sw := st.Sweep
		orDefault(set, "over", over, sw.Over)
		orDefault(set, "from", from, sw.From)
		orDefault(set, "to", to, sw.To)
		orDefault(set, "points", points, sw.Points)
		orDefault(set, "log", logAxis, sw.Log)
	} else if !set["over"] || !set["from"] || !set["to"] {
		return usagef("give --over, --from and --to (the scenario has no study.sweep)")
	}
	spec := study.SweepSpec{
		Axis:   study.Axis{Over: *over, From: *from, To: *to, Points: *points, Log: *logAxis},
		Solver: opts,
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	pts, err := study.Sweep(ctx, s, spec, progressTo(stderr, *progress))
	if err != nil {
		return err
	}
	if err := study.WriteCSV(stdout, []string{*over}, pts); err != nil {
		return err
	}
	warnUnconverged(stderr, pts)
	return nil
}

// flagsSet reports which flags were given on the command line.
func flagsSet(fs *flag.FlagSet) map[string]bool {
	set := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { set[f.Name] = true })
	return set
}

// orDefault sets *dst to v unless the flag name was given on the command line.
func orDefault[T any](set map[string]bool, name string, dst *T, v T) {
	if !set[name] {
		*dst = v
	}
}

// progressTo returns a progress callback that writes "done/total" lines to w, or nil.
func progressTo(w io.Writer, on bool) study.Progress {
	if !on {
		return nil
	}
	return func(done, total int) { fmt.Fprintf(w, "%d/%d\n", done, total) }
}

// warnUnconverged says on stderr how many points are marked as not converged or failed, so
// that a script reading only the numbers is told as well.
func warnUnconverged(w io.Writer, pts []study.Point) {
	bad := 0
	for _, p := range pts {
		if !p.OK() {
			bad++
		}
	}
	if bad > 0 {
		fmt.Fprintf(w, "warning: %d of %d points did not converge or failed; their observables are left empty (see the status column)\n", bad, len(pts))
	}
}
