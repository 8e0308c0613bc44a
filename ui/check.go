package ui

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/vugu/vugu"

	"hdrisk/engine/plot"
	"hdrisk/engine/scenario"
	"hdrisk/protocol"
)

// Run states of a view (contract 4 hooks: data-run).
const (
	RunIdle      = "idle"
	RunRunning   = "running"
	RunDone      = "done"
	RunCancelled = "cancelled"
	RunError     = "error"
)

// Choices of the check's solver and orthogonal factors, with the page's labels.
var (
	CheckSolvers = []Kind{
		{Name: "cd", Label: "Coordinate descent"},
		{Name: "prox", Label: "Proximal gradient"},
		{Name: "vamp", Label: "Vector AMP"},
	}
	CheckFactors = []Kind{
		{Name: "fast", Label: "Fast transforms"},
		{Name: "haar-qr", Label: "Haar (QR)"},
		{Name: "haar-householder", Label: "Haar (reflections)"},
	}
)

// Limits of the check the page asks for: a finite-size check is a look at the prediction,
// not a production run, and must fit in the page's memory and patience.
const (
	maxCheckN      = 20000
	maxCheckTrials = 1000
	maxCheckPoints = 12
	curvePoints    = 60
	maxTrialDots   = 100 // more dots than a figure can show apart
)

// checkPoint is one check on the figure: the value of the swept number and the result.
type checkPoint struct {
	At     float64
	Result protocol.CheckResult
}

// checkStart prepares a check's inputs: defaults, or the settings the scenario carries in
// study.check. They are read again whenever a scenario was opened since (a link, a file, a
// pasted code), so that the inputs show what the opened scenario states.
func (c *CheckView) checkStart() {
	if c.nText != "" && (c.Model == nil || c.opened == c.Model.Opened()) {
		return
	}
	if c.nText == "" {
		c.Factors, c.run = "fast", RunIdle
	}
	c.nText, c.trialsText, c.seedText, c.Solver, c.trialsTyped = "500", "20", "1", "cd", false
	if c.Model == nil {
		return
	}
	c.opened = c.Model.Opened()
	if c.Model.Study != nil && c.Model.Study.Check != nil {
		k := c.Model.Study.Check
		c.nText, c.trialsText, c.seedText = strconv.Itoa(k.N), strconv.Itoa(k.Trials), strconv.FormatUint(k.Seed, 10)
		if k.Solver != "" {
			c.Solver = k.Solver
		}
	}
}

// Init implements vugu's initializer.
func (c *CheckView) Init(vugu.InitCtx) { c.checkStart() }

// Compute implements vugu's computer: the inputs follow a scenario opened since the last render.
func (c *CheckView) Compute(vugu.ComputeCtx) { c.checkStart() }

// Run is the data-run hook: idle, running, done, cancelled or error.
func (c *CheckView) Run() string { return c.run }

// matrixTrials is the trial count a check with the user's matrix starts from: enough for its
// verdict to have power (a few percent between the means is several standard errors at a
// few hundred unknowns).
const matrixTrials = "200"

// Matrix is the user's matrix the check holds fixed, beside random rotations of its
// spectrum: the design's own matrix (Model.MatrixDesign) unless the user turned it off.
func (c *CheckView) Matrix() *UserMatrix {
	if c.noMatrix {
		return nil
	}
	return c.Model.MatrixDesign()
}

// HasMatrix reports whether the design is the user's matrix, so that it can be checked.
func (c *CheckView) HasMatrix() bool { return c.Model.MatrixDesign() != nil }

// Settings texts, as the inputs show them. With the user's matrix, n is its column count and
// the trials start from matrixTrials.
func (c *CheckView) NText() string {
	if u := c.Matrix(); u != nil {
		return strconv.Itoa(u.Cols)
	}
	return c.nText
}

func (c *CheckView) TrialsText() string {
	if c.Matrix() != nil && !c.trialsTyped {
		return matrixTrials
	}
	return c.trialsText
}
func (c *CheckView) SeedText() string { return c.seedText }
func (c *CheckView) AtText() string   { return c.atText }

// SetSetting stores the text of one input of the check: "n", "trials", "seed", "solver",
// "factors", "over", "at" or "matrix" ("on" or "off": the check with the user's matrix).
// Special cases are: an unknown name is an error.
func (c *CheckView) SetSetting(name, text string) error {
	c.checkStart()
	switch name {
	case "n":
		c.nText = text
	case "trials":
		c.trialsText, c.trialsTyped = text, true
	case "matrix":
		c.noMatrix = text != "on"
	case "seed":
		c.seedText = text
	case "solver":
		c.Solver = text
	case "factors":
		c.Factors = text
	case "over":
		c.Over = text
	case "at":
		c.atText = text
	default:
		return fmt.Errorf("no setting %q", name)
	}
	return nil
}

func wholeNumber(field, text string, lo, hi int) (int, error) {
	t := strings.TrimSpace(text)
	v, err := strconv.Atoi(t)
	if err != nil {
		return 0, fmt.Errorf("%s: %q is not a whole number", field, t)
	}
	if v < lo || v > hi {
		return 0, fmt.Errorf("%s: must be between %d and %d, not %d", field, lo, hi, v)
	}
	return v, nil
}

// settings reads the inputs. Errors name the input.
func (c *CheckView) settings() (scenario.Check, []float64, error) {
	var k scenario.Check
	var err error
	minTrials := 1
	if c.Matrix() != nil {
		minTrials = 2 // the verdict needs standard errors
	}
	if k.N, err = wholeNumber("n", c.NText(), 2, maxCheckN); err != nil {
		return k, nil, err
	}
	if k.Trials, err = wholeNumber("trials", c.TrialsText(), minTrials, maxCheckTrials); err != nil {
		return k, nil, err
	}
	seed, err := strconv.ParseUint(strings.TrimSpace(c.seedText), 10, 64)
	if err != nil || seed > scenario.MaxSeed {
		return k, nil, fmt.Errorf("seed: must be a whole number from 0 to %d, not %q", uint64(scenario.MaxSeed), strings.TrimSpace(c.seedText))
	}
	k.Seed, k.Solver = seed, c.Solver
	if !slices.ContainsFunc(CheckSolvers, func(s Kind) bool { return s.Name == c.Solver }) {
		return k, nil, fmt.Errorf("solver: %q is not one of cd, prox, vamp", c.Solver)
	}
	if c.Over == "" {
		return k, nil, nil
	}
	words := strings.FieldsFunc(c.atText, func(r rune) bool { return r == ',' || r == ';' || r == ' ' || r == '\t' || r == '\n' })
	if len(words) == 0 {
		return k, nil, fmt.Errorf("at: list the values of %s to check at", c.Over)
	}
	if len(words) > maxCheckPoints {
		return k, nil, fmt.Errorf("at: %d values; the page checks at most %d at a time", len(words), maxCheckPoints)
	}
	xs := make([]float64, len(words))
	for i, w := range words {
		v, err := strconv.ParseFloat(w, 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return k, nil, fmt.Errorf("at: %q is not a number", w)
		}
		xs[i] = v
	}
	slices.Sort(xs)
	return k, slices.Compact(xs), nil
}

// Paths lists the numbers of the current scenario a check can be repeated over. They depend
// only on the chosen kinds, so they are kept until a menu changes: checking the whole
// scenario at every render would cost milliseconds each time.
func (c *CheckView) Paths() []scenario.PathInfo {
	if c.Model == nil {
		return nil
	}
	key := c.Model.Kind("design") + "|" + c.Model.Kind("signal") + "|" + c.Model.Kind("noise") + "|" + c.Model.Kind("penalty")
	if key == c.pathsKey {
		return c.paths
	}
	ch := c.Model.Check()
	if ch.Err != nil {
		return c.paths
	}
	c.paths, c.pathsKey = ch.Scenario.Paths(), key
	return c.paths
}

// Start runs the check: one job, or one per value of Over, one after the other. The
// settings go into the scenario's study.check so that they travel with it.
func (c *CheckView) Start() {
	c.checkStart()
	if c.cancel != nil {
		return
	}
	c.problem, c.points, c.figure, c.figErr = "", nil, nil, ""
	k, xs, err := c.settings()
	if err != nil {
		c.run, c.problem = RunError, err.Error()
		return
	}
	ch := c.Model.Check()
	if ch.Err != nil {
		c.run, c.problem = RunError, "the scenario is not valid: "+ch.Err.Error()
		return
	}
	st := scenario.Study{}
	if c.Model.Study != nil {
		st = *c.Model.Study
	}
	st.View, st.Check = "check", &k
	c.Model.Study = &st
	if c.Jobs == nil {
		c.run, c.problem = RunError, "the compute workers are still starting; press Run again in a moment"
		return
	}
	c.scen, c.xs, c.settingsUsed = ch.JSON, xs, k
	c.started = c.now()
	c.run = RunRunning
	c.next()
}

func (c *CheckView) now() time.Time {
	if c.Clock != nil {
		return c.Clock()
	}
	return time.Now()
}

// args returns the job arguments of the next point.
func (c *CheckView) args() protocol.CheckArgs {
	k := c.settingsUsed
	a := protocol.CheckArgs{Scenario: c.scen, N: k.N, Trials: k.Trials, Seed: k.Seed, Solver: k.Solver, Factors: c.Factors}
	if u := c.Matrix(); u != nil {
		a.Matrix, a.MaxBytes = u.Text, u.MaxBytes
	}
	if len(c.xs) > 0 {
		a.Over, a.At = c.Over, c.xs[len(c.points)]
		if len(c.points) == 0 {
			a.Curve = c.curveSpec()
		}
	}
	return a
}

// curveSpec spans the checked values, geometrically for numbers that span decades.
func (c *CheckView) curveSpec() *protocol.CurveSpec {
	lo, hi := c.xs[0], c.xs[len(c.xs)-1]
	log := lo > 0
	for _, p := range c.Paths() {
		if p.Name == c.Over || p.Path == c.Over {
			log = log && p.Log
		}
	}
	if lo == hi {
		if log {
			lo, hi = lo/2, hi*2
		} else {
			d := math.Max(math.Abs(lo)/2, 0.1)
			lo, hi = lo-d, hi+d
		}
	}
	return &protocol.CurveSpec{Over: c.Over, From: lo, To: hi, Points: curvePoints, Log: log}
}

// workers is the number of compute workers the check's trials are shared between: all of the
// page's, when the pool says how many it has.
func (c *CheckView) workers() int {
	if s, ok := c.Jobs.(interface{ Size() int }); ok {
		return max(1, s.Size())
	}
	return 1
}

// next runs the check of the next point, its trials shared between the page's workers (each
// part a job with its own first trial; protocol.MergeChecks joins them into the numbers of
// one job, whatever the number of parts).
func (c *CheckView) next() {
	c.trial, c.trials = 0, c.settingsUsed.Trials
	if len(c.points) == 0 {
		c.curve = nil
	}
	base := c.args()
	split := protocol.SplitTrials(0, base.Trials, c.workers())
	parts := make([]protocol.CheckResult, len(split))
	done := make([]int, len(split))
	cancels := make([]func(), len(split))
	left, over := len(split), false // over: failed or cancelled, no more callbacks count
	stopAll := func() {
		over = true
		for _, cancel := range cancels {
			if cancel != nil {
				cancel()
			}
		}
	}
	c.cancel = stopAll
	for i, sp := range split {
		a := base
		a.First, a.Trials = sp[0], sp[1]
		if i > 0 {
			a.Curve = nil
		}
		cancels[i] = start(c.Jobs, protocol.Check, a, func(d, _ int) {
			if over {
				return
			}
			done[i] = d
			c.trial = 0
			for _, v := range done {
				c.trial += v
			}
		}, func(r protocol.CheckResult, err error) {
			if over {
				return
			}
			cancels[i] = nil
			if err == nil {
				parts[i], done[i] = r, r.Trials
				if left--; left > 0 {
					return
				}
				var merged protocol.CheckResult
				if merged, err = protocol.MergeChecks(parts); err == nil {
					over, c.cancel = true, nil
					c.points = append(c.points, checkPoint{At: float64(merged.At), Result: merged})
					if merged.Curve != nil {
						c.curve = merged.Curve
					}
					if len(c.xs) > len(c.points) {
						c.next()
						return
					}
					c.run, c.elapsed = RunDone, c.now().Sub(c.started)
					c.draw()
					return
				}
			}
			stopAll()
			c.cancel = nil
			c.run, c.problem = RunError, err.Error()
			c.elapsed = c.now().Sub(c.started)
			c.draw()
		})
		if over {
			return
		}
	}
}

// Cancel stops a running check; the points already finished stay on show.
func (c *CheckView) Cancel() {
	if c.cancel == nil {
		return
	}
	c.cancel()
	c.cancel = nil
	c.run, c.elapsed = RunCancelled, c.now().Sub(c.started)
	c.draw()
}

// Status is the progress line, e.g. "Value 2 of 4 (l1 = 0.05): trial 7 of 20".
func (c *CheckView) Status() string {
	switch c.run {
	case RunRunning:
		s := fmt.Sprintf("Trial %d of %d", c.trial, c.trials)
		if c.trial == 0 {
			s = fmt.Sprintf("Drawing the first of %d trials", c.trials)
		}
		if len(c.xs) > 0 {
			s = fmt.Sprintf("Value %d of %d (%s = %s): %s", len(c.points)+1, len(c.xs), c.Over, fmtNum(c.xs[len(c.points)]), strings.ToLower(s[:1])+s[1:])
		}
		return s + "…"
	case RunDone:
		return fmt.Sprintf("Finished in %.2f s.", c.elapsed.Seconds())
	case RunCancelled:
		return fmt.Sprintf("Cancelled after %.2f s; %d of %d values finished.", c.elapsed.Seconds(), len(c.points), max(len(c.xs), 1))
	}
	return ""
}

// Problem says why the check failed or cannot start; "" when there is no problem.
func (c *CheckView) Problem() string { return c.problem }

// Latest is the most recent finished check, shown in full.
func (c *CheckView) Latest() (protocol.CheckResult, bool) {
	if len(c.points) == 0 {
		return protocol.CheckResult{}, false
	}
	return c.points[len(c.points)-1].Result, true
}

// checkRow is one line of the results: the observed mean beside the prediction.
type checkRow struct {
	Label, Name, Value, Shown, PredName, PredValue, PredShown string
}

func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', 4, 64) }

func fullNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// Rows are the headline numbers of the latest check, each with its data-figure hooks.
func (c *CheckView) Rows() []checkRow {
	r, ok := c.Latest()
	if !ok {
		return nil
	}
	stat := func(label, name string, s protocol.CheckStat) checkRow {
		return checkRow{Label: label, Name: "check_" + name, Value: fullNum(float64(s.Mean)),
			Shown:    fmtNum(float64(s.Mean)) + " ± " + fmtNum(float64(s.StdErr)),
			PredName: "check_predicted_" + name, PredValue: fullNum(float64(s.Predicted)), PredShown: fmtNum(float64(s.Predicted))}
	}
	mse := checkRow{Label: "Mean squared error", Name: "check_mean_mse", Value: fullNum(float64(r.MeanMSE)),
		Shown:    fmtNum(float64(r.MeanMSE)) + " ± " + fmtNum(float64(r.StdErr)),
		PredName: "check_predicted_mse", PredValue: fullNum(float64(r.PredictedMSE)), PredShown: fmtNum(float64(r.PredictedMSE))}
	if r.GLM {
		// A generalized model: the observables that apply to its readout (docs/method.md
		// section 10.4); the support statistics of the LASSO do not.
		rows := []checkRow{mse}
		for _, g := range []struct {
			label, name string
			st          *protocol.CheckStat
		}{{"Cosine of the estimate and the signal", "cosine", r.Cosine}, {"Norm ratio |xhat| / |x0|", "norm_ratio", r.NormRatio},
			{"Test error (fresh rows and labels)", "test_error", r.TestError}} {
			if g.st != nil {
				rows = append(rows, stat(g.label, g.name, *g.st))
			}
		}
		return rows
	}
	return []checkRow{
		mse,
		stat("Fraction nonzero", "nonzero_fraction", r.Nonzero),
		stat("True positive proportion", "tpp", r.TPP),
		stat("False discovery proportion", "fdp", r.FDP),
	}
}

// Facts are the lines that say how the latest check was run, as name, data-value and text.
func (c *CheckView) Facts() [][3]string {
	r, ok := c.Latest()
	if !ok {
		return nil
	}
	conv := "every trial met its stopping rule"
	if !r.Converged {
		conv = fmt.Sprintf("%d of %d trials stopped at the iteration limit (%d) before meeting the rule; their estimates are not solutions and are included in the means", r.NotConverged, r.Trials, r.MaxIter)
	}
	out := [][3]string{
		{"check_stderr", fullNum(float64(r.StdErr)), "Standard error of the mean: " + fmtNum(float64(r.StdErr))},
		{"check_size", fmt.Sprint(r.N), fmt.Sprintf("%d trials of n = %d unknowns, m = %d measurements, seed %d, %s factors", r.Trials, r.N, r.M, r.Seed, r.Factors)},
		{"check_rule", r.Criterion, fmt.Sprintf("Solver %s stops when its %s is at most %g (at most %d iterations)", r.Solver, r.Criterion, float64(r.Tol), r.MaxIter)},
		{"check_converged", strconv.FormatBool(r.Converged), "Convergence: " + conv},
		{"check_seconds", fullNum(float64(r.Seconds)), fmt.Sprintf("Time in the worker: %.2f s", float64(r.Seconds))},
	}
	if !r.PredictionConverged {
		out = append(out, [3]string{"check_prediction_converged", "false", "The prediction's fixed point did not converge; treat it as rough"})
	}
	if len(c.points) > 1 || c.Over != "" {
		out = append(out, [3]string{"check_at", fullNum(float64(r.At)), fmt.Sprintf("At %s = %s", r.Over, fmtNum(float64(r.At)))})
	}
	return out
}

// maxCheckWarnings is how many of a check's warnings its notes show one by one; the rest are
// counted (each trial's own line, under "Each trial", says whether it converged).
const maxCheckWarnings = 5

// Notes are what the latest check's result says beside its numbers, as name (data-note) and
// text: why another solver ran than the one chosen (SolverNote: cd solved matrix-free by
// prox, or the solver menu that a generalized model does not use), the same for the random
// rotations beside the user's matrix, then its warnings (a trial at its iteration limit, a
// prediction that did not converge), the first maxCheckWarnings of them in full.
func (c *CheckView) Notes() [][2]string {
	r, ok := c.Latest()
	if !ok {
		return nil
	}
	var out [][2]string
	if r.SolverNote != "" {
		out = append(out, [2]string{"solver", "Solver: " + r.SolverNote + "."})
	}
	if k := r.Comparison; k != nil && k.RotatedSolverNote != "" {
		out = append(out, [2]string{"rotated_solver", "Solver of the random rotations: " + k.RotatedSolverNote + "."})
	}
	for i, w := range r.Warnings {
		if i == maxCheckWarnings {
			out = append(out, [2]string{"warning", fmt.Sprintf("Warning: %d more like these; each trial's line below says whether it converged.", len(r.Warnings)-i)})
			break
		}
		out = append(out, [2]string{"warning", "Warning: " + w + "."})
	}
	return out
}

// MatrixFacts are the lines of the verdict of a check with the user's matrix, as name,
// data-value and text; nil for a check with random rotations only.
func (c *CheckView) MatrixFacts() [][3]string {
	r, ok := c.Latest()
	if !ok || r.Comparison == nil {
		return nil
	}
	k := r.Comparison
	rot := k.RotatedFactors + " factors"
	if k.RotatedSolver != "" {
		rot += ", solved by " + k.RotatedSolver
	}
	verdict := fmt.Sprintf("Agrees: your matrix and random rotations of its spectrum give the same mean error within %d standard errors. The prediction from its singular values applies to it.", 3)
	if !k.Agrees {
		verdict = fmt.Sprintf("Does not agree: the two means differ by more than %d standard errors. Your matrix's singular vectors are not generic for this signal and penalty, and the prediction from its singular values should not be trusted for it.", 3)
	}
	return [][3]string{
		{"check_matrix_mean_mse", fullNum(float64(k.MatrixMeanMSE)), "Your matrix held fixed: MSE " + fmtNum(float64(k.MatrixMeanMSE)) + " ± " + fmtNum(float64(k.MatrixStdErr))},
		{"check_rotated_mean_mse", fullNum(float64(k.RotatedMeanMSE)), "Random rotations of its spectrum, same x0 and noise (" + rot + "): MSE " + fmtNum(float64(k.RotatedMeanMSE)) + " ± " + fmtNum(float64(k.RotatedStdErr))},
		{"check_matrix_predicted_mse", fullNum(float64(r.PredictedMSE)), "Prediction from its singular values (the limit of many unknowns): MSE " + fmtNum(float64(r.PredictedMSE))},
		{"check_z", fullNum(float64(k.Z)), "z = (matrix − rotations) / combined standard error = " + fmtNum(float64(k.Z))},
		{"check_agrees", strconv.FormatBool(k.Agrees), verdict},
	}
}

// PerTrial are the latest check's trials as text lines.
func (c *CheckView) PerTrial() []string {
	r, ok := c.Latest()
	if !ok {
		return nil
	}
	var out []string
	for i, t := range r.PerTrial {
		s := fmt.Sprintf("Trial %d: MSE %s, nonzero %s, TPP %s, FDP %s, %d iterations", i+1,
			fmtNum(float64(t.MSE)), fmtNum(float64(t.Nonzero)), fmtNum(float64(t.TPP)), fmtNum(float64(t.FDP)), t.Iterations)
		if r.GLM {
			s = fmt.Sprintf("Trial %d: MSE %s, cosine %s", i+1, fmtNum(float64(t.MSE)), fmtNum(float64(t.Cosine)))
			if r.TestError != nil {
				s += ", test error " + fmtNum(float64(t.TestError))
			}
			s += fmt.Sprintf(", %d iterations", t.Iterations)
		}
		if !t.Converged {
			s += " — stopped at the iteration limit, not converged"
		}
		out = append(out, s)
	}
	return out
}

// PointRows are the finished checks of a run over several values: value, mean ± s.e.,
// prediction.
func (c *CheckView) PointRows() [][3]string {
	if len(c.xs) == 0 {
		return nil
	}
	var out [][3]string
	for _, p := range c.points {
		r := p.Result
		out = append(out, [3]string{fmtNum(p.At), fmtNum(float64(r.MeanMSE)) + " ± " + fmtNum(float64(r.StdErr)), fmtNum(float64(r.PredictedMSE))})
	}
	return out
}

// figureSpec is the figure of the finished points: over Over, the predicted curve with the
// checks' means and error bars (±1 standard error); without Over, each trial's error beside
// the predicted level.
func (c *CheckView) figureSpec() (plot.Line, bool) {
	if len(c.points) == 0 {
		return plot.Line{}, false
	}
	if len(c.xs) == 0 {
		r := c.points[0].Result
		var x, y []float64
		for i, t := range r.PerTrial[:min(len(r.PerTrial), maxTrialDots)] {
			x, y = append(x, float64(i+1)), append(y, float64(t.MSE))
		}
		title := "Error of each trial beside the prediction"
		if len(r.PerTrial) > maxTrialDots {
			title = fmt.Sprintf("Error of the first %d of %d trials beside the prediction", maxTrialDots, len(r.PerTrial))
		}
		ends := []float64{0.5, float64(len(x)) + 0.5}
		level := func(v float64) []float64 { return []float64{v, v} }
		return plot.Line{Title: title, XLabel: "trial", YLabel: "MSE",
			Series: []plot.Series{
				{Name: "one trial", X: x, Y: y, Marks: true, NoLine: true},
				{Name: "predicted", X: ends, Y: level(float64(r.PredictedMSE))},
				{Name: "mean of the trials", X: ends, Y: level(float64(r.MeanMSE)), Dashed: true},
			}}, true
	}
	var cx, cy, mx, my, me []float64
	for _, p := range c.curve {
		cx, cy = append(cx, float64(p.X)), append(cy, float64(p.MSE))
		if !p.OK {
			cy[len(cy)-1] = math.NaN()
		}
	}
	for _, p := range c.points {
		mx, my, me = append(mx, p.At), append(my, float64(p.Result.MeanMSE)), append(me, float64(p.Result.StdErr))
	}
	cs := c.curveSpec()
	return plot.Line{Title: "Predicted error and finite-size checks", XLabel: c.Over, YLabel: "MSE", XLog: cs.Log,
		Series: []plot.Series{
			{Name: "predicted", X: cx, Y: cy},
			{Name: fmt.Sprintf("mean of %d trials ± 1 s.e.", c.settingsUsed.Trials), X: mx, Y: my, Err: me, Marks: true, NoLine: true},
		}}, true
}

// draw builds the figure of the finished points, releasing the one shown before.
func (c *CheckView) draw() {
	dropImage(c.Browser, c.figURL)
	c.figure, c.figErr, c.figURL = nil, "", ""
	spec, ok := c.figureSpec()
	if !ok {
		return
	}
	f, err := spec.Build()
	var svg []byte
	if err == nil {
		svg, err = f.SVG()
	}
	if err != nil {
		c.figErr = "the figure could not be drawn: " + err.Error()
		return
	}
	c.figure = f
	if c.figURL, err = imageURL(c.Browser, "image/svg+xml", svg); err != nil {
		c.figErr = "the figure cannot be shown (" + err.Error() + "); save it as SVG or PNG"
	}
}

// Caption explains the figure's marks.
func (c *CheckView) Caption() string {
	if len(c.xs) == 0 {
		return "Each dot is one trial; the lines are the prediction and the trials' mean."
	}
	return "Error bars: ±1 standard error of the mean over the trials."
}

// FigureURL is the figure's URL for <img src> (see imageURL); "" when there is none.
func (c *CheckView) FigureURL() string { return c.figURL }

// FigureProblem says why there is no figure after a check.
func (c *CheckView) FigureProblem() string { return c.figErr }

// CSV is the per-trial table of every finished check.
func (c *CheckView) CSV() []byte {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	head := []string{"over", "at", "trial", "mse", "nonzero_fraction", "tpp", "fdp", "iterations", "converged", "residual", "seconds",
		"mean_mse", "stderr", "predicted_mse", "n", "m", "seed", "solver", "factors", "stop_criterion", "tol",
		"rotated_mse", "rotated_mean_mse", "rotated_stderr", "z", "agrees"}
	// The last two columns are what the result says beside its numbers (Notes): the solver
	// note on every row of its check, and its warnings, joined by " | ", on the check's first
	// row only (a check of many trials at their limit has one warning per trial).
	glm := slices.ContainsFunc(c.points, func(p checkPoint) bool { return p.Result.GLM })
	if glm {
		// A generalized model's check adds its own observables, each trial's beside the
		// mean, its standard error and the prediction (empty where they do not apply).
		for _, n := range glmCheckColumns {
			head = append(head, n, "mean_"+n, n+"_stderr", "predicted_"+n)
		}
	}
	head = append(head, "solver_note", "warnings")
	_ = w.Write(head)
	for _, p := range c.points {
		r := p.Result
		at := ""
		if r.Over != "" {
			at = fullNum(p.At)
		}
		for i, t := range r.PerTrial {
			// A check with the user's matrix adds, trial by trial, the error with random
			// rotations of its spectrum (same x0 and noise) and the verdict.
			rot := []string{"", "", "", "", ""}
			if k := r.Comparison; k != nil && i < len(k.RotatedPerTrial) {
				rot = []string{fullNum(float64(k.RotatedPerTrial[i].MSE)), fullNum(float64(k.RotatedMeanMSE)),
					fullNum(float64(k.RotatedStdErr)), fullNum(float64(k.Z)), strconv.FormatBool(k.Agrees)}
			}
			_ = w.Write(append([]string{r.Over, at, strconv.Itoa(i + 1), fullNum(float64(t.MSE)), fullNum(float64(t.Nonzero)),
				fullNum(float64(t.TPP)), fullNum(float64(t.FDP)), strconv.Itoa(t.Iterations), strconv.FormatBool(t.Converged),
				fullNum(float64(t.Residual)), fullNum(float64(t.Seconds)), fullNum(float64(r.MeanMSE)), fullNum(float64(r.StdErr)),
				fullNum(float64(r.PredictedMSE)), strconv.Itoa(r.N), strconv.Itoa(r.M), strconv.FormatUint(r.Seed, 10),
				r.Solver, r.Factors, r.Criterion, fullNum(float64(r.Tol))}, slices.Concat(rot, glmCheckCells(glm, r, t), checkNoteCells(r, i))...))
		}
	}
	w.Flush()
	return b.Bytes()
}

// Export offers the check's results (csv) or its figure (svg, png, pdf) as a file.
func (c *CheckView) Export(what string) {
	if c.Browser == nil {
		c.problem = "exporting needs the browser"
		return
	}
	var (
		data []byte
		err  error
		name = "hdrisk-check." + what
		mime string
	)
	switch what {
	case "csv":
		data, mime = c.CSV(), "text/csv"
	case "pdf":
		if c.figure == nil {
			return
		}
		data, err = c.figure.PDF()
		mime = "application/pdf"
	case "svg", "png":
		if c.figure == nil {
			return
		}
		data, err = c.figure.SVG()
		mime = "image/svg+xml"
		if err == nil && what == "png" {
			savePNG(c.Browser, name, data, func(err error) { c.problem = "export: " + err.Error() }, nil)
			return
		}
	default:
		return
	}
	if err == nil {
		err = c.Browser.Download(name, mime, data)
	}
	if err != nil {
		c.problem = "export: " + err.Error()
	}
}

// Running reports whether a check is under way.
func (c *CheckView) Running() bool { return c.cancel != nil }

func (c *CheckView) typed(e vugu.DOMEvent, name string) {
	_ = c.SetSetting(name, e.PropString("target", "value"))
}

func (c *CheckView) toggleMatrix(e vugu.DOMEvent) {
	on := "off"
	if e.PropBool("target", "checked") {
		on = "on"
	}
	_ = c.SetSetting("matrix", on)
}

// glmCheckColumns are the observables of a generalized model's check in its CSV.
var glmCheckColumns = []string{"cosine", "norm_ratio", "test_error"}

// glmCheckCells are the CSV cells of glmCheckColumns for trial t of check r ("" where one
// does not apply); none when the CSV has no such columns.
func glmCheckCells(glm bool, r protocol.CheckResult, t protocol.CheckTrial) []string {
	if !glm {
		return nil
	}
	var out []string
	for _, c := range []struct {
		st *protocol.CheckStat
		v  protocol.Num
	}{{r.Cosine, t.Cosine}, {r.NormRatio, t.NormRatio}, {r.TestError, t.TestError}} {
		if c.st == nil {
			out = append(out, "", "", "", "")
			continue
		}
		out = append(out, fullNum(float64(c.v)), fullNum(float64(c.st.Mean)), fullNum(float64(c.st.StdErr)), fullNum(float64(c.st.Predicted)))
	}
	return out
}

// checkNoteCells are the CSV cells solver_note and warnings of row i of check r.
func checkNoteCells(r protocol.CheckResult, i int) []string {
	note := r.SolverNote
	if k := r.Comparison; k != nil && k.RotatedSolverNote != "" {
		note = strings.TrimPrefix(note+"; random rotations: "+k.RotatedSolverNote, "; ")
	}
	warn := ""
	if i == 0 {
		warn = strings.Join(r.Warnings, " | ")
	}
	return []string{note, warn}
}
