package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"strconv"
	"strings"

	"hdrisk/engine/plot"
	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
)

// runSweep solves the scenario along one field and prints a CSV: the field, every
// observable, and the convergence columns of each point. With --curves FIELD=V1,V2,... it
// draws one curve per value of a second field instead, the CSV led by a column holding
// each row's value of that field, and the figure with one line per value and a legend. Settings not given on the command
// line come from the scenario's study.sweep, when it has one. With --best the CSV is the
// best-tuned curve instead (the weight re-tuned at every point, its value in a last
// column); with --figure the curve figure of the page's curve view is drawn as well, with
// the best value of a swept weight and the Bayes-optimal error when the page draws them.
func runSweep(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("sweep", flag.ContinueOnError)
	over := fs.String("over", "", "the field to vary (alpha, l1, l2, noise, density, ...)")
	from := fs.Float64("from", 0, "first value")
	to := fs.Float64("to", 0, "last value")
	points := fs.Int("points", 100, "number of values, ends included")
	logAxis := fs.Bool("log", false, "space the values geometrically")
	solver := solverFlags(fs)
	progress := fs.Bool("progress", false, "report progress on stderr")
	best := fs.String("best", "", "re-tune this weight at every point: l1, l2 or l1+l2")
	logY := fs.Bool("log-y", false, "draw the figure's vertical axis on a log scale (positive quantities only)")
	curves := fs.String("curves", "", "one curve per value of a second field, as FIELD=V1,V2,... (bits=1,2,3,4; at most 8 values)")
	fig := addFigureFlags(fs)
	name, err := onePositional(fs, args, "scenario file")
	if err != nil {
		return err
	}
	if err := fig.check(); err != nil {
		return err
	}
	if *logY && !plot.LogAllowed(*fig.quantity) {
		return usagef("--log-y: %s can be zero or negative; a log axis needs a positive quantity", *fig.quantity)
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
		if !set["curves"] && sw.Curves != "" {
			*curves = curvesText(sw.Curves, sw.CurvesAt)
		}
	} else if !set["over"] || !set["from"] || !set["to"] {
		return usagef("give --over, --from and --to (the scenario has no study.sweep)")
	}
	field, at, err := parseCurves(*curves)
	if err != nil {
		return err
	}
	if field != "" && *best != "" {
		return usagef("--curves and --best: give one of them (the best-tuned curve is drawn for one curve)")
	}
	spec := study.SweepSpec{
		Axis:   study.Axis{Over: *over, From: *from, To: *to, Points: *points, Log: *logAxis},
		Solver: opts,
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	if field != "" {
		return sweepCurves(ctx, s, study.CurvesSpec{SweepSpec: spec, Curves: field, At: at}, *logY, fig, stdout, stderr, *progress)
	}
	var tuned []study.TunedPoint
	if *best != "" {
		if tuned, err = study.Tuned(ctx, s, spec, study.BestSpec{Over: *best}, progressTo(stderr, *progress)); err != nil {
			return err
		}
	}
	var pts []study.Point
	if *best == "" || *fig.path != "" {
		if pts, err = study.Sweep(ctx, s, spec, progressTo(stderr, *progress && *best == "")); err != nil {
			return err
		}
	}
	if *fig.path != "" {
		if err := drawSweep(ctx, s, spec.Axis, pts, *best, tuned, *logY, fig); err != nil {
			return err
		}
	}
	if *best != "" {
		if err := writeTunedCSV(stdout, *over, *best, tuned); err != nil {
			return err
		}
		ps := make([]study.Point, len(tuned))
		for i, p := range tuned {
			ps[i] = p.Point
		}
		warnUnconverged(stderr, ps)
		return nil
	}
	if err := study.WriteCSV(stdout, []string{*over}, pts); err != nil {
		return err
	}
	warnUnconverged(stderr, pts)
	return nil
}

// parseCurves reads --curves FIELD=V1,V2,...; "" gives no field.
func parseCurves(text string) (string, []float64, error) {
	if strings.TrimSpace(text) == "" {
		return "", nil, nil
	}
	field, list, ok := strings.Cut(text, "=")
	field = strings.TrimSpace(field)
	if !ok || field == "" || strings.TrimSpace(list) == "" {
		return "", nil, usagef("--curves %q: give FIELD=V1,V2,... (bits=1,2,3,4)", text)
	}
	var at []float64
	for _, f := range strings.Split(list, ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
		if err != nil {
			return "", nil, usagef("--curves: %q is not a number", strings.TrimSpace(f))
		}
		at = append(at, v)
	}
	return field, at, nil
}

// curvesText writes the curves of a scenario's study.sweep as --curves reads them.
func curvesText(field string, at []float64) string {
	parts := make([]string, len(at))
	for i, v := range at {
		parts[i] = strconv.FormatFloat(v, 'g', -1, 64)
	}
	return field + "=" + strings.Join(parts, ",")
}

// sweepCurves runs a curves-per-value sweep and writes its CSV (study.WriteCurvesCSV) and,
// with --figure, its figure: one line per value, named in the legend.
func sweepCurves(ctx context.Context, s scenario.Scenario, spec study.CurvesSpec, logY bool, fig figureFlags, stdout, stderr io.Writer, progress bool) error {
	c, err := s.Check()
	if err != nil {
		return err
	}
	cs, err := study.SweepCurves(ctx, c, spec, progressTo(stderr, progress))
	if err != nil {
		return err
	}
	if *fig.path != "" {
		sf := plot.SweepFigure{Scenario: s, Axis: spec.Axis, Quantity: *fig.quantity, YLog: logY, Width: *fig.width, Height: *fig.height,
			Curves: plot.ValueCurves(s, cs)}
		if err := writeSweepFigure(sf, fig); err != nil {
			return err
		}
	}
	if err := study.WriteCurvesCSV(stdout, cs); err != nil {
		return err
	}
	var all []study.Point
	for _, cv := range cs.Curves {
		all = append(all, cv.Points...)
	}
	warnUnconverged(stderr, all)
	return nil
}

// drawSweep draws the curve figure of the page's curve view for the sweep: the scenario's
// curve, the best-tuned one when there is one, the best value of a swept weight and the
// Bayes-optimal error where the curve view draws them (a reference that cannot be computed
// is left out, as the page leaves it out).
func drawSweep(ctx context.Context, s scenario.Scenario, ax study.Axis, pts []study.Point, best string, tuned []study.TunedPoint, logY bool, fig figureFlags) error {
	sf := plot.SweepFigure{Scenario: s, Axis: ax, Quantity: *fig.quantity, YLog: logY, Width: *fig.width, Height: *fig.height,
		Curves: []plot.Curve{{Points: pts}}}
	if best != "" {
		sf.Curves[0].Label = plot.FixedLabel(s, best)
		sf.Curves = append(sf.Curves, plot.TunedCurve(best, tuned))
	}
	if plot.WantsBest(s, ax.Over) {
		if b, err := study.Best(ctx, s, study.BestSpec{Over: ax.Over}); err == nil && b.AtBound == "" {
			sf.Best = &plot.BestMark{Over: b.Over, Value: b.Value}
		}
	}
	if plot.WantsBayes(s, ax.Over) {
		if p, err := s.Problem(); err == nil {
			if b, err := study.Bayes(p); err == nil {
				sf.Bayes = &b.Optimal
			}
		}
	}
	return writeSweepFigure(sf, fig)
}

// writeSweepFigure lays out and writes the curve figure sf where fig says.
func writeSweepFigure(sf plot.SweepFigure, fig figureFlags) error {
	l, ok := sf.Line()
	if !ok {
		return fmt.Errorf("--figure: the sweep has no point to draw")
	}
	f, err := l.Build()
	if err != nil {
		return fmt.Errorf("--figure: %w", err)
	}
	return fig.write(f)
}

// writeTunedCSV writes a best-tuned curve as study.WriteCSV writes a sweep, with the best
// weight at each point in a last column, best_WEIGHT (empty where the search failed).
func writeTunedCSV(w io.Writer, over, best string, pts []study.TunedPoint) error {
	ps := make([]study.Point, len(pts))
	for i, p := range pts {
		ps[i] = p.Point
	}
	var b bytes.Buffer
	if err := study.WriteCSV(&b, []string{over}, ps); err != nil {
		return err
	}
	rows, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		return err
	}
	rows[0] = append(rows[0], "best_"+best)
	for i, p := range pts {
		v := ""
		if !math.IsNaN(p.Weight) {
			v = strconv.FormatFloat(p.Weight, 'g', -1, 64)
		}
		rows[i+1] = append(rows[i+1], v)
	}
	cw := csv.NewWriter(w)
	if err := cw.WriteAll(rows); err != nil {
		return err
	}
	return cw.Error()
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
