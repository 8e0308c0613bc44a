package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"

	"hdrisk/engine/data"
	"hdrisk/engine/scenario"
	"hdrisk/engine/simulate"
)

// checkStat is an observable averaged over trials, beside its prediction.
type checkStat struct {
	Mean      number `json:"mean"`
	StdErr    number `json:"stderr"`
	Predicted number `json:"predicted"`
}

type checkTrial struct {
	MSE        number `json:"mse"`
	Nonzero    number `json:"nonzero_fraction"`
	TPP        number `json:"tpp"`
	FDP        number `json:"fdp"`
	Iterations int    `json:"iterations"`
	Converged  bool   `json:"converged"`
	Residual   number `json:"residual"`
	Seconds    number `json:"seconds"`
}

type checkTrace struct {
	Iteration int    `json:"iteration"`
	MeanError number `json:"mean_error"`
	StdErr    number `json:"stderr"`
	Predicted number `json:"predicted"`
}

// checkResult is the output of check. mean_mse, stderr, trials, n and predicted_mse are
// contract 3; the rest states how the instances were drawn and solved.
type checkResult struct {
	MeanMSE             number       `json:"mean_mse"`
	StdErr              number       `json:"stderr"`
	Trials              int          `json:"trials"`
	N                   int          `json:"n"`
	M                   int          `json:"m"`
	PredictedMSE        number       `json:"predicted_mse"`
	PredictionConverged bool         `json:"prediction_converged"`
	Nonzero             checkStat    `json:"nonzero_fraction"`
	TPP                 checkStat    `json:"tpp"`
	FDP                 checkStat    `json:"fdp"`
	Seed                uint64       `json:"seed"`
	Solver              string       `json:"solver"`
	SolverNote          string       `json:"solver_note,omitempty"`
	Factors             string       `json:"factors"`
	Spectrum            string       `json:"spectrum"`
	Criterion           string       `json:"stop_criterion"`
	Tol                 number       `json:"tol"`
	MaxIter             int          `json:"max_iter"`
	Converged           bool         `json:"converged"`
	NotConverged        int          `json:"not_converged"`
	Warnings            []string     `json:"warnings"`
	Seconds             number       `json:"seconds"`
	PerTrial            []checkTrial `json:"per_trial"`
	Trace               []checkTrace `json:"vamp_trace,omitempty"`
	*matrixVerdict
}

// matrixVerdict is what check --matrix adds: the trials with the matrix itself (mean_mse and
// per_trial are those too) beside trials with random rotations of its spectrum, and the
// verdict z = (matrix - rotated) / sqrt(se_matrix^2 + se_rotated^2), agrees = |z| <= 3.
type matrixVerdict struct {
	Matrix              string       `json:"matrix"`
	MatrixMeanMSE       number       `json:"matrix_mean_mse"`
	MatrixStdErr        number       `json:"matrix_stderr"`
	RotatedMeanMSE      number       `json:"rotated_mean_mse"`
	RotatedStdErr       number       `json:"rotated_stderr"`
	RotatedFactors      string       `json:"rotated_factors"`
	RotatedNotConverged int          `json:"rotated_not_converged"`
	RotatedSolver       string       `json:"rotated_solver,omitempty"`
	RotatedSolverNote   string       `json:"rotated_solver_note,omitempty"`
	Z                   number       `json:"z"`
	Agrees              bool         `json:"agrees"`
	Verdict             string       `json:"verdict"`
	RotatedPerTrial     []checkTrial `json:"rotated_per_trial"`
}

// matrixTrials is the default trial count of check --matrix: enough for the verdict to have
// power (a 5% difference of the means is about 3 standard errors at a few hundred unknowns).
const matrixTrials = 200

// VerdictText says in words what a comparison found.
func verdictText(c *simulate.Comparison) string {
	if c.Agrees {
		return fmt.Sprintf("agrees: the matrix and random rotations of its spectrum give the same mean error within %d standard errors (z = %.2f); the prediction from its singular values applies to it", simulate.AgreeZ, c.Z)
	}
	return fmt.Sprintf("disagrees: z = %.2f, beyond %d standard errors; the matrix's singular vectors are not generic for this signal and penalty, and the prediction from its singular values should not be trusted for it", c.Z, simulate.AgreeZ)
}

// runCheck draws and solves finite instances of a scenario and prints their mean error beside
// the prediction. Ctrl-C cancels between and inside solves.
func runCheck(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("check", flag.ContinueOnError)
	n := fs.Int("n", 500, "unknowns per instance (m = round(alpha n))")
	trials := fs.Int("trials", 10, "independent instances")
	seed := fs.Uint64("seed", 1, "seed: trial t draws from PCG(seed, t), reproducible on every platform")
	solverName := fs.String("solver", "cd", "cd (l1, ridge, elastic net; with fast factors on a well-conditioned design prox runs instead, matrix-free, and solver_note says so), prox (any penalty) or vamp (any penalty)")
	factorsName := fs.String("factors", "fast", "orthogonal factors: fast (O(n log n) transforms), haar-qr or haar-householder")
	draws := fs.Bool("draw-spectrum", false, "draw the singular values i.i.d. from the law instead of taking its quantiles")
	tol := fs.Float64("tol", 0, "solver tolerance (0: the default, 1e-8)")
	maxIter := fs.Int("max-iter", 0, "solver iteration cap (0: the default, 10000)")
	progress := fs.Bool("progress", false, "report each finished trial on stderr")
	matrixFile := fs.String("matrix", "", "a matrix file (Matrix Market, CSV, TSV, text) held fixed as the design: the check with the matrix itself, beside random rotations of its spectrum (n is its column count; trials default to 200)")
	name, err := onePositional(fs, args, "scenario file")
	if err != nil {
		return err
	}
	if *tol < 0 || *maxIter < 0 {
		return usagef("--tol and --max-iter must not be negative")
	}
	solver, err := simulate.ParseSolver(*solverName)
	if err != nil {
		return usagef("--solver: %q is not one of cd, prox, vamp", clip(*solverName))
	}
	factors, err := simulate.ParseFactors(*factorsName)
	if err != nil {
		return usagef("--factors: %q is not one of fast, haar-qr, haar-householder", clip(*factorsName))
	}
	s, err := readScenario(name, stdin)
	if err != nil {
		return err
	}
	set := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { set[f.Name] = true })
	var fixed *simulate.Matrix
	if *matrixFile != "" {
		if fixed, err = readDesignMatrix(*matrixFile, stdin, &s); err != nil {
			return err
		}
		if set["n"] && *n != fixed.Cols {
			return usagef("--n %d: with --matrix, n is the matrix's column count, %d", *n, fixed.Cols)
		}
		if !set["trials"] {
			*trials = matrixTrials
		}
		if *trials < 2 {
			return usagef("--trials %d: the verdict of --matrix needs at least 2 trials, for its standard errors", *trials)
		}
	}
	p, err := s.Problem()
	if err != nil {
		return err
	}
	o := simulate.Options{N: *n, Trials: *trials, Seed: *seed, Solver: solver, Tol: *tol,
		MaxIter: *maxIter, Factors: factors, Matrix: fixed}
	if *draws {
		o.Spectrum = simulate.Draws
	}
	var report func(done, total int)
	if *progress {
		report = func(done, total int) { fmt.Fprintf(stderr, "hdrisk check: trial %d of %d done\n", done, total) }
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	r, err := simulate.Check(ctx, simulate.Problem{Problem: p, GaussianEntries: s.Design.Shape == "gaussian"}, o, report)
	if err != nil {
		return err
	}
	for _, w := range r.Warnings() {
		fmt.Fprintf(stderr, "hdrisk check: warning: %s\n", w)
	}
	out := checkResult{
		MeanMSE: number(r.MeanMSE), StdErr: number(r.StdErr), Trials: r.Trials, N: r.N, M: r.M,
		PredictedMSE: number(r.Predicted.MSE), PredictionConverged: r.Predicted.Converged,
		Nonzero: checkStat{number(r.NonZero.Mean), number(r.NonZero.StdErr), number(r.Predicted.NonZero)},
		TPP:     checkStat{number(r.TPP.Mean), number(r.TPP.StdErr), number(r.Predicted.TPP)},
		FDP:     checkStat{number(r.FDP.Mean), number(r.FDP.StdErr), number(r.Predicted.FDP)},
		Seed:    r.Seed, Solver: r.Solver, SolverNote: r.SolverNote, Factors: r.Factors, Spectrum: r.Spectrum,
		Criterion: r.Criterion, Tol: number(r.Tol), MaxIter: r.MaxIter,
		Converged: r.NotConverged == 0, NotConverged: r.NotConverged, Warnings: r.Warnings(),
		Seconds: number(r.Seconds),
	}
	if out.Warnings == nil {
		out.Warnings = []string{}
	}
	for _, t := range r.PerTrial {
		out.PerTrial = append(out.PerTrial, checkTrial{number(t.MSE), number(t.NonZero), number(t.TPP),
			number(t.FDP), t.Iterations, t.Converged, number(t.Residual), number(t.Seconds)})
	}
	for _, t := range r.Trace {
		out.Trace = append(out.Trace, checkTrace{t.Iteration, number(t.MeanError), number(t.StdErr), number(t.Predicted)})
	}
	if c := r.Comparison; c != nil {
		v := &matrixVerdict{Matrix: displayName(*matrixFile), MatrixMeanMSE: number(c.Matrix.Mean), MatrixStdErr: number(c.Matrix.StdErr),
			RotatedMeanMSE: number(c.Rotated.Mean), RotatedStdErr: number(c.Rotated.StdErr), RotatedFactors: c.RotatedFactors,
			RotatedNotConverged: c.RotatedNotConverged, RotatedSolver: c.RotatedSolver, RotatedSolverNote: c.RotatedSolverNote, Z: number(c.Z), Agrees: c.Agrees, Verdict: verdictText(c)}
		for _, t := range c.RotatedTrials {
			v.RotatedPerTrial = append(v.RotatedPerTrial, checkTrial{number(t.MSE), number(t.NonZero), number(t.TPP),
				number(t.FDP), t.Iterations, t.Converged, number(t.Residual), number(t.Seconds)})
		}
		out.matrixVerdict = v
	}
	return writeJSON(stdout, out)
}

// readDesignMatrix reads the matrix of check --matrix and makes the scenario's design its
// spectrum: an empirical-sv law of its singular values with m/n its shape, at the scale the
// scenario states (docs/method.md section 5).
func readDesignMatrix(name string, stdin io.Reader, s *scenario.Scenario) (*simulate.Matrix, error) {
	a, err := readMatrixFile(name, stdin)
	if err != nil {
		return nil, err
	}
	sv, err := data.SingularValues(context.Background(), a, nil)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", displayName(name), err)
	}
	m, n := a.Dims()
	s.Design = scenario.Design{Shape: "empirical-sv", Alpha: float64(m) / float64(n), Scale: s.Design.Scale,
		Lists: map[string][]float64{"values": sv}}
	if err := s.Validate(); err != nil {
		return nil, fmt.Errorf("%s as the design: %w", displayName(name), err)
	}
	return simulate.FromDense(a), nil
}
