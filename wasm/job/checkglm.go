package job

import (
	"context"
	"errors"
	"fmt"
	"math"
	"time"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/scenario"
	"hdrisk/engine/simulate"
	"hdrisk/protocol"
)

// glmSolver names the solver of a generalized model's trials: primal-dual splitting with the
// loss's prox (simulate.PrimalDual), whatever the check asked for the linear model.
const glmSolver = "primal-dual"

// checkGLM runs the finite-size check of a generalized linear model (a scenario with a readout
// or loss group): trial t of the job draws from PCG(Seed, First+t), as `hdrisk check` draws
// trial t, so that parts of one check shared between workers merge (protocol.MergeChecks)
// into the numbers of one job and of the command line. Each trial is solved by
// simulate.TrialGLM; the mean MSE, cosine, norm ratio and, for a readout with labels, test
// error stand beside SolveGLM's predictions.
//
// Special cases are: a held matrix is refused (its comparison is for the linear model), and
// sizes past the simulation's caps are errors naming the field.
func checkGLM(a protocol.CheckArgs, at scenario.Scenario, g fixedpoint.GLM, factors simulate.Factors, curve []protocol.CurvePoint,
	progress func(done, total int)) (protocol.CheckResult, error) {
	if a.Matrix != "" {
		return protocol.CheckResult{}, errors.New("matrix: the check of a held matrix is for the linear readout with the square loss")
	}
	if a.Trials < 1 || a.Trials > simulate.MaxTrials {
		return protocol.CheckResult{}, &simulate.ParamError{Field: "trials", Reason: fmt.Sprintf("%d is outside 1..%d (the cap)", a.Trials, simulate.MaxTrials)}
	}
	if a.First < 0 || a.First > simulate.MaxTrials {
		return protocol.CheckResult{}, &simulate.ParamError{Field: "first", Reason: fmt.Sprintf("%d is outside 0..%d", a.First, simulate.MaxTrials)}
	}
	if a.N < 2 {
		return protocol.CheckResult{}, &simulate.ParamError{Field: "n", Reason: fmt.Sprintf("%d: need at least 2 unknowns", a.N)}
	}
	pred, err := fixedpoint.SolveGLM(g, fixedpoint.Options{})
	if err != nil {
		return protocol.CheckResult{}, fmt.Errorf("prediction: %w", err)
	}
	d := simulate.DesignDraw{Law: g.Design, GaussianEntries: at.Design.Shape == "gaussian", Factors: factors}
	start := time.Now()
	nan := protocol.Num(math.NaN())
	out := protocol.CheckResult{Trials: a.Trials, N: a.N, M: simulate.Rows(g.Design.Alpha(), a.N), Seed: a.Seed, First: a.First,
		PredictedMSE: protocol.Num(pred.MSE), PredictionConverged: pred.Converged,
		Nonzero: protocol.CheckStat{Mean: nan, StdErr: nan, Predicted: nan}, TPP: protocol.CheckStat{Mean: nan, StdErr: nan, Predicted: nan},
		FDP:    protocol.CheckStat{Mean: nan, StdErr: nan, Predicted: nan},
		Solver: glmSolver, Factors: factors.String(), Criterion: "relative change of (x, u)",
		Tol: protocol.Num(simulate.DefaultTol), MaxIter: simulate.DefaultMaxIter,
		Over: a.Over, At: protocol.Num(a.At), Curve: curve, GLM: true, Warnings: []string{},
		Cosine: &protocol.CheckStat{Predicted: protocol.Num(pred.Cosine)}, NormRatio: &protocol.CheckStat{Predicted: protocol.Num(pred.NormRatio)}}
	if d.Entries(a.N) {
		out.Factors = "entries"
	}
	if a.Solver != "" && a.Solver != glmSolver {
		out.SolverNote = a.Solver + " was asked; the solver menu is for the linear readout with the square loss. A generalized model's trials are solved by " +
			"primal-dual splitting with the loss's prox, whatever is chosen"
	}
	if pred.Labels {
		out.TestError = &protocol.CheckStat{Predicted: protocol.Num(pred.TestError)}
	}
	trials, err := simulate.TrialsGLM(context.Background(), d, g, a.N, a.First, a.Trials, a.Seed, simulate.SolverOptions{}, progress)
	if err != nil {
		return protocol.CheckResult{}, err
	}
	var mse, cos, norm, te []float64
	for t, tr := range trials {
		if !tr.Converged {
			// One sentence per trial, as the linear check words it, so that the parts of a
			// check shared between workers merge into the warnings of one job.
			out.NotConverged++
			out.Warnings = append(out.Warnings, fmt.Sprintf("trial %d: solver %s reached its iteration limit (%d) with %s = %.3g > tol %.3g; its estimate is not a solution",
				a.First+t, glmSolver, out.MaxIter, out.Criterion, tr.Residual, float64(out.Tol)))
		}
		out.PerTrial = append(out.PerTrial, protocol.CheckTrial{MSE: protocol.Num(tr.MSE), Nonzero: nan, TPP: nan, FDP: nan,
			Cosine: protocol.Num(tr.Cosine), NormRatio: protocol.Num(tr.NormRatio), TestError: protocol.Num(tr.TestError),
			Iterations: tr.Iterations, Converged: tr.Converged, Residual: protocol.Num(tr.Residual), Seconds: protocol.Num(tr.Seconds)})
		mse, cos, norm, te = append(mse, tr.MSE), append(cos, tr.Cosine), append(norm, tr.NormRatio), append(te, tr.TestError)
	}
	m := simulate.Mean(mse)
	out.MeanMSE, out.StdErr = protocol.Num(m.Mean), protocol.Num(m.StdErr)
	for _, s := range []struct {
		st *protocol.CheckStat
		x  []float64
	}{{out.Cosine, cos}, {out.NormRatio, norm}, {out.TestError, te}} {
		if s.st != nil {
			v := simulate.Mean(s.x)
			s.st.Mean, s.st.StdErr = protocol.Num(v.Mean), protocol.Num(v.StdErr)
		}
	}
	out.Converged = out.NotConverged == 0
	if !pred.Converged {
		out.Warnings = append(out.Warnings, "the prediction did not converge: "+pred.Note)
	}
	out.Seconds = protocol.Num(time.Since(start).Seconds())
	return out, nil
}
