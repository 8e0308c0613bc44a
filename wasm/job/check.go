package job

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strings"

	"hdrisk/engine/data"
	"hdrisk/engine/scenario"
	"hdrisk/engine/simulate"
	"hdrisk/engine/study"

	"hdrisk/protocol"
)

func init() { Serve(protocol.Check, Check) }

// Check runs simulate.Check for the scenario of a (moved to Over = At when Over is set) and,
// when a.Curve is set, the predicted curve along it; a generalized linear model (a readout or
// loss group) runs its own trials instead (checkGLM). progress gets (trials done, trials).
// Special cases are: a missing or invalid scenario, an unknown solver or factors, a path
// Over that the scenario lacks, and sizes past the simulation's caps are errors naming the
// field.
func Check(a protocol.CheckArgs, progress func(done, total int)) (protocol.CheckResult, error) {
	if len(a.Scenario) == 0 || string(a.Scenario) == "null" {
		return protocol.CheckResult{}, errors.New("scenario: missing")
	}
	s, err := scenario.Decode(a.Scenario)
	if err != nil {
		return protocol.CheckResult{}, err
	}
	solver := simulate.SolverCD
	if a.Solver != "" {
		if solver, err = simulate.ParseSolver(a.Solver); err != nil {
			return protocol.CheckResult{}, err
		}
	}
	factors := simulate.FactorsFast
	if a.Factors != "" {
		if factors, err = simulate.ParseFactors(a.Factors); err != nil {
			return protocol.CheckResult{}, err
		}
	}
	var curve []protocol.CurvePoint
	if a.Curve != nil {
		pts, err := study.Sweep(context.Background(), s, study.SweepSpec{Axis: study.Axis{
			Over: a.Curve.Over, From: a.Curve.From, To: a.Curve.To, Points: a.Curve.Points, Log: a.Curve.Log}}, nil)
		if err != nil {
			return protocol.CheckResult{}, err
		}
		for _, p := range pts {
			curve = append(curve, protocol.CurvePoint{X: protocol.Num(p.X), MSE: protocol.Num(p.Result.MSE), OK: p.OK()})
		}
	}
	at := s
	if a.Over != "" {
		if at, err = s.With(a.Over, a.At); err != nil {
			return protocol.CheckResult{}, err
		}
	}
	if c, err := at.Check(); err == nil {
		if g, ok := c.GLM(); ok {
			// A readout or loss group: the generalized model's own trials.
			return checkGLM(a, at, g, factors, curve, progress)
		}
	}
	p, err := at.Problem()
	if err != nil {
		return protocol.CheckResult{}, err
	}
	o := simulate.Options{N: a.N, Trials: a.Trials, Seed: a.Seed, Solver: solver, Factors: factors, First: a.First}
	if a.Matrix != "" {
		m, err := data.ReadMatrix(strings.NewReader(a.Matrix), data.Limits{MaxBytes: a.MaxBytes})
		if err != nil {
			return protocol.CheckResult{}, fmt.Errorf("matrix: %w", err)
		}
		o.Matrix = simulate.FromDense(m)
	}
	r, err := simulate.Check(context.Background(),
		simulate.Problem{Problem: p, GaussianEntries: at.Design.Shape == "gaussian"}, o, progress)
	if err != nil {
		return protocol.CheckResult{}, err
	}
	out := protocol.CheckResult{
		MeanMSE: protocol.Num(r.MeanMSE), StdErr: protocol.Num(r.StdErr), Trials: r.Trials, N: r.N, M: r.M,
		PredictedMSE: protocol.Num(r.Predicted.MSE), PredictionConverged: r.Predicted.Converged,
		Nonzero: protocol.CheckStat{Mean: protocol.Num(r.NonZero.Mean), StdErr: protocol.Num(r.NonZero.StdErr), Predicted: protocol.Num(r.Predicted.NonZero)},
		TPP:     protocol.CheckStat{Mean: protocol.Num(r.TPP.Mean), StdErr: protocol.Num(r.TPP.StdErr), Predicted: protocol.Num(r.Predicted.TPP)},
		FDP:     protocol.CheckStat{Mean: protocol.Num(r.FDP.Mean), StdErr: protocol.Num(r.FDP.StdErr), Predicted: protocol.Num(r.Predicted.FDP)},
		Seed:    r.Seed, Solver: r.Solver, SolverNote: r.SolverNote, Factors: r.Factors, Criterion: r.Criterion,
		Tol: protocol.Num(r.Tol), MaxIter: r.MaxIter, Converged: r.NotConverged == 0,
		NotConverged: r.NotConverged, Warnings: r.Warnings(), Seconds: protocol.Num(r.Seconds),
		Over: a.Over, At: protocol.Num(a.At), Curve: curve, First: r.First,
	}
	if out.Warnings == nil {
		out.Warnings = []string{}
	}
	out.PerTrial = checkTrials(r.PerTrial)
	if c := r.Comparison; c != nil {
		out.Comparison = &protocol.CheckComparison{MatrixMeanMSE: protocol.Num(c.Matrix.Mean), MatrixStdErr: protocol.Num(c.Matrix.StdErr),
			RotatedMeanMSE: protocol.Num(c.Rotated.Mean), RotatedStdErr: protocol.Num(c.Rotated.StdErr),
			RotatedFactors: c.RotatedFactors, RotatedSolver: c.RotatedSolver, RotatedSolverNote: c.RotatedSolverNote, RotatedNotConverged: c.RotatedNotConverged,
			Z: protocol.Num(c.Z), Agrees: c.Agrees, RotatedPerTrial: checkTrials(c.RotatedTrials)}
	}
	return out, nil
}

func checkTrials(ts []simulate.Trial) []protocol.CheckTrial {
	out := make([]protocol.CheckTrial, 0, len(ts))
	for _, t := range ts {
		nan := protocol.Num(math.NaN())
		out = append(out, protocol.CheckTrial{MSE: protocol.Num(t.MSE), Nonzero: protocol.Num(t.NonZero), Cosine: nan, NormRatio: nan, TestError: nan,
			TPP: protocol.Num(t.TPP), FDP: protocol.Num(t.FDP), Iterations: t.Iterations, Converged: t.Converged,
			Residual: protocol.Num(t.Residual), Seconds: protocol.Num(t.Seconds)})
	}
	return out
}

// warmScenarios are the scenarios of WarmCheck: the LASSO on an orthogonal design (cd asked,
// solved matrix-free on fast factors) and on a Gaussian design (coordinate descent on F).
var warmScenarios = []string{
	`{"kind":"hdrisk.scenario","version":1,"title":"warm-up","design":{"shape":"orthogonal","alpha":0.4,"scale":"rows"},` +
		`"signal":{"law":"bernoulli-gauss","density":0.05,"variance":1},"noise":{"variance":0.01},"penalty":{"kind":"l1","l1":0.05}}`,
	`{"kind":"hdrisk.scenario","version":1,"title":"warm-up","design":{"shape":"gaussian","alpha":0.4,"scale":"rows"},` +
		`"signal":{"law":"bernoulli-gauss","density":0.05,"variance":1},"noise":{"variance":0.01},"penalty":{"kind":"l1","l1":0.05}}`,
}

// WarmCheck runs small throw-away checks, so that the first check someone waits for does not
// pay for the first runs of the prediction, the draws and the solvers: in WebAssembly the
// first trial of a worker took 0.37 s where the next took 0.05 s (n = 500, LASSO, fast
// factors, under Node), about half the page's time on a check of 20 trials over 2 workers.
// Errors are dropped: a failed warm-up only leaves the first check slower.
// One trial each at n = 200 is enough to make the solvers' loops hot, and short enough that a
// job arriving meanwhile waits little.
func WarmCheck() {
	for _, s := range warmScenarios {
		_, _ = Check(warmArgs(s), nil)
	}
}

// warmArgs are the arguments of WarmCheck's check of scenario s.
func warmArgs(s string) protocol.CheckArgs {
	return protocol.CheckArgs{Scenario: json.RawMessage(s), N: 200, Trials: 1, Seed: 1, Solver: "cd", Factors: "fast"}
}
