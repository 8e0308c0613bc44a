package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"

	"hdrisk/engine/plot"
	"hdrisk/engine/study"
)

// runMap solves the scenario over a grid of two fields and prints a CSV with one line per
// cell (X varying fastest): both fields, every observable, and the convergence columns.
// Settings not given on the command line come from the scenario's study.map, when it has one.
// With --figure the heat figure of the page's map view is drawn as well.
func runMap(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("map", flag.ContinueOnError)
	x := fs.String("x", "", "the field along each row (alpha, l1, noise, ...)")
	xFrom := fs.Float64("x-from", 0, "first value of x")
	xTo := fs.Float64("x-to", 0, "last value of x")
	xPoints := fs.Int("x-points", 50, "number of values of x")
	xLog := fs.Bool("x-log", false, "space x geometrically")
	y := fs.String("y", "", "the field from row to row")
	yFrom := fs.Float64("y-from", 0, "first value of y")
	yTo := fs.Float64("y-to", 0, "last value of y")
	yPoints := fs.Int("y-points", 50, "number of values of y")
	yLog := fs.Bool("y-log", false, "space y geometrically")
	workers := fs.Int("workers", 0, "goroutines (0: one per CPU); the output does not depend on it")
	solver := solverFlags(fs)
	progress := fs.Bool("progress", false, "report progress on stderr")
	fig := addFigureFlags(fs)
	name, err := onePositional(fs, args, "scenario file")
	if err != nil {
		return err
	}
	if err := fig.check(); err != nil {
		return err
	}
	opts, err := solver()
	if err != nil {
		return err
	}
	if *workers < 0 {
		return usagef("--workers must not be negative")
	}
	s, err := readScenario(name, stdin)
	if err != nil {
		return err
	}
	set := flagsSet(fs)
	if st := s.Study; st != nil && st.Map != nil {
		m := st.Map
		orDefault(set, "x", x, m.X)
		orDefault(set, "x-from", xFrom, m.XFrom)
		orDefault(set, "x-to", xTo, m.XTo)
		orDefault(set, "x-points", xPoints, m.XPoints)
		orDefault(set, "x-log", xLog, m.XLog)
		orDefault(set, "y", y, m.Y)
		orDefault(set, "y-from", yFrom, m.YFrom)
		orDefault(set, "y-to", yTo, m.YTo)
		orDefault(set, "y-points", yPoints, m.YPoints)
		orDefault(set, "y-log", yLog, m.YLog)
	} else {
		for _, f := range []string{"x", "x-from", "x-to", "y", "y-from", "y-to"} {
			if !set[f] {
				return usagef("give --x, --x-from, --x-to, --y, --y-from and --y-to (the scenario has no study.map)")
			}
		}
	}
	spec := study.MapSpec{
		X:      study.Axis{Over: *x, From: *xFrom, To: *xTo, Points: *xPoints, Log: *xLog},
		Y:      study.Axis{Over: *y, From: *yFrom, To: *yTo, Points: *yPoints, Log: *yLog},
		Solver: opts,
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	g, err := study.Map(ctx, s, spec, *workers, progressTo(stderr, *progress))
	if err != nil {
		return err
	}
	if *fig.path != "" {
		mf := plot.MapFigure{Scenario: s, X: spec.X, Y: spec.Y, Quantity: *fig.quantity, Cells: g.Cells, Width: *fig.width, Height: *fig.height}
		f, err := mf.Heat().Build()
		if err != nil {
			return fmt.Errorf("--figure: %w", err)
		}
		if err := fig.write(f); err != nil {
			return err
		}
	}
	if err := study.WriteCSV(stdout, []string{*x, *y}, g.Cells); err != nil {
		return err
	}
	warnUnconverged(stderr, g.Cells)
	return nil
}
