package job

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"

	"hdrisk/engine/scenario"
	"hdrisk/engine/simulate"
	"hdrisk/engine/study"
)

// CheckArgs are the arguments of the "check" kind: finite-size trials of one scenario
// (method.md section 8), optionally with one of its numbers set first, and optionally with
// the predicted curve over a range of that number for the figure the check is drawn on.
type CheckArgs struct {
	Scenario json.RawMessage `json:"scenario"`
	N        int             `json:"n"`
	Trials   int             `json:"trials"`
	Seed     uint64          `json:"seed"`
	Solver   string          `json:"solver"`  // cd | prox | vamp; "" is cd
	Factors  string          `json:"factors"` // fast | haar-qr | haar-householder; "" is fast
	// Over names a number of the scenario (a Scenario.Get path such as "l1" or "alpha");
	// when set, the check runs at Over = At.
	Over string  `json:"over,omitempty"`
	At   float64 `json:"at,omitempty"`
	// Curve, when set, asks for the prediction along an axis of the scenario as given (not
	// moved to At): the line the checks are drawn over.
	Curve *CurveSpec `json:"curve,omitempty"`
}

// CurveSpec is an axis of the predicted curve: Points values of Over from From to To,
// evenly spaced or, with Log, geometrically.
type CurveSpec struct {
	Over   string  `json:"over"`
	From   float64 `json:"from"`
	To     float64 `json:"to"`
	Points int     `json:"points"`
	Log    bool    `json:"log,omitempty"`
}

// Num is a float64 that encodes NaN and ±Inf as JSON null, so that a condition number of
// a singular matrix or an undefined ratio never makes a whole result unreadable.
type Num float64

// MarshalJSON implements json.Marshaler.
func (x Num) MarshalJSON() ([]byte, error) {
	f := float64(x)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return json.Marshal(f)
}

// CheckStat is an observable averaged over trials beside its prediction.
type CheckStat struct {
	Mean      Num `json:"mean"`
	StdErr    Num `json:"stderr"`
	Predicted Num `json:"predicted"`
}

// CheckTrial is one instance drawn and solved.
type CheckTrial struct {
	MSE        Num  `json:"mse"`
	Nonzero    Num  `json:"nonzero_fraction"`
	TPP        Num  `json:"tpp"`
	FDP        Num  `json:"fdp"`
	Iterations int  `json:"iterations"`
	Converged  bool `json:"converged"`
	Residual   Num  `json:"residual"`
	Seconds    Num  `json:"seconds"`
}

// CurvePoint is one point of the predicted curve; OK is false where the fixed point failed
// or did not converge (its MSE is then left out of the line).
type CurvePoint struct {
	X   Num  `json:"x"`
	MSE Num  `json:"mse"`
	OK  bool `json:"ok"`
}

// CheckResult is the result of the "check" kind. The names of mean_mse, stderr, trials, n
// and predicted_mse are those of `hdrisk check` (contract 3).
type CheckResult struct {
	MeanMSE             Num          `json:"mean_mse"`
	StdErr              Num          `json:"stderr"`
	Trials              int          `json:"trials"`
	N                   int          `json:"n"`
	M                   int          `json:"m"`
	PredictedMSE        Num          `json:"predicted_mse"`
	PredictionConverged bool         `json:"prediction_converged"`
	Nonzero             CheckStat    `json:"nonzero_fraction"`
	TPP                 CheckStat    `json:"tpp"`
	FDP                 CheckStat    `json:"fdp"`
	Seed                uint64       `json:"seed"`
	Solver              string       `json:"solver"`
	Factors             string       `json:"factors"`
	Criterion           string       `json:"stop_criterion"`
	Tol                 Num          `json:"tol"`
	MaxIter             int          `json:"max_iter"`
	Converged           bool         `json:"converged"` // every trial met its stopping rule
	NotConverged        int          `json:"not_converged"`
	Warnings            []string     `json:"warnings"`
	Seconds             Num          `json:"seconds"`
	PerTrial            []CheckTrial `json:"per_trial"`
	Over                string       `json:"over,omitempty"`
	At                  Num          `json:"at,omitempty"`
	Curve               []CurvePoint `json:"curve,omitempty"`
}

func init() { Register("check", runCheck) }

// Check runs simulate.Check for the scenario of a (moved to Over = At when Over is set) and,
// when a.Curve is set, the predicted curve along it. progress gets (trials done, trials).
// Special cases are: a missing or invalid scenario, an unknown solver or factors, a path
// Over that the scenario lacks, and sizes past the simulation's caps are errors naming the
// field.
func Check(a CheckArgs, progress func(done, total int)) (CheckResult, error) {
	if len(a.Scenario) == 0 || string(a.Scenario) == "null" {
		return CheckResult{}, errors.New("scenario: missing")
	}
	s, err := scenario.Decode(a.Scenario)
	if err != nil {
		return CheckResult{}, err
	}
	solver := simulate.SolverCD
	if a.Solver != "" {
		if solver, err = simulate.ParseSolver(a.Solver); err != nil {
			return CheckResult{}, err
		}
	}
	factors := simulate.FactorsFast
	if a.Factors != "" {
		if factors, err = simulate.ParseFactors(a.Factors); err != nil {
			return CheckResult{}, err
		}
	}
	var curve []CurvePoint
	if a.Curve != nil {
		pts, err := study.Sweep(context.Background(), s, study.SweepSpec{Axis: study.Axis{
			Over: a.Curve.Over, From: a.Curve.From, To: a.Curve.To, Points: a.Curve.Points, Log: a.Curve.Log}}, nil)
		if err != nil {
			return CheckResult{}, err
		}
		for _, p := range pts {
			curve = append(curve, CurvePoint{X: Num(p.X), MSE: Num(p.Result.MSE), OK: p.OK()})
		}
	}
	at := s
	if a.Over != "" {
		if at, err = s.With(a.Over, a.At); err != nil {
			return CheckResult{}, err
		}
	}
	p, err := at.Problem()
	if err != nil {
		return CheckResult{}, err
	}
	o := simulate.Options{N: a.N, Trials: a.Trials, Seed: a.Seed, Solver: solver, Factors: factors}
	r, err := simulate.Check(context.Background(),
		simulate.Problem{Problem: p, GaussianEntries: at.Design.Shape == "gaussian"}, o, progress)
	if err != nil {
		return CheckResult{}, err
	}
	out := CheckResult{
		MeanMSE: Num(r.MeanMSE), StdErr: Num(r.StdErr), Trials: r.Trials, N: r.N, M: r.M,
		PredictedMSE: Num(r.Predicted.MSE), PredictionConverged: r.Predicted.Converged,
		Nonzero: CheckStat{Num(r.NonZero.Mean), Num(r.NonZero.StdErr), Num(r.Predicted.NonZero)},
		TPP:     CheckStat{Num(r.TPP.Mean), Num(r.TPP.StdErr), Num(r.Predicted.TPP)},
		FDP:     CheckStat{Num(r.FDP.Mean), Num(r.FDP.StdErr), Num(r.Predicted.FDP)},
		Seed:    r.Seed, Solver: r.Solver, Factors: r.Factors, Criterion: r.Criterion,
		Tol: Num(r.Tol), MaxIter: r.MaxIter, Converged: r.NotConverged == 0,
		NotConverged: r.NotConverged, Warnings: r.Warnings(), Seconds: Num(r.Seconds),
		Over: a.Over, At: Num(a.At), Curve: curve,
	}
	if out.Warnings == nil {
		out.Warnings = []string{}
	}
	for _, t := range r.PerTrial {
		out.PerTrial = append(out.PerTrial, CheckTrial{Num(t.MSE), Num(t.NonZero), Num(t.TPP), Num(t.FDP),
			t.Iterations, t.Converged, Num(t.Residual), Num(t.Seconds)})
	}
	return out, nil
}

func runCheck(raw json.RawMessage, progress func(done, total int)) (any, error) {
	var a CheckArgs
	if err := json.Unmarshal(raw, &a); err != nil {
		return nil, fmt.Errorf("check arguments: %w", err)
	}
	return Check(a, progress)
}
