package job

import (
	"encoding/json"
	"errors"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/scenario"
)

// EvalArgs are the arguments of the "eval" kind: one scenario file (contract 1).
type EvalArgs struct {
	Scenario json.RawMessage `json:"scenario"`
}

// Figures is the result of the "eval" kind, under the names `hdrisk eval` prints
// (contract 3).
type Figures struct {
	MSE             float64 `json:"mse"`
	NMSEdB          float64 `json:"nmse_db"`
	Susceptibility  float64 `json:"susceptibility"`
	NonzeroFraction float64 `json:"nonzero_fraction"`
	TPP             float64 `json:"tpp"`
	FDP             float64 `json:"fdp"`
	TrainError      float64 `json:"train_error"`
	Converged       bool    `json:"converged"`
	Iterations      int     `json:"iterations"`
	EstimateZero    bool    `json:"estimate_zero"`
}

func init() { Register("eval", runEval) }

// Eval solves the fixed point of one scenario (method.md section 3) and returns its
// headline figures. Special cases are: a missing or invalid scenario is an error naming the
// field (scenario.FieldError).
func Eval(args EvalArgs) (Figures, error) {
	if len(args.Scenario) == 0 {
		return Figures{}, errors.New("scenario: missing")
	}
	s, err := scenario.Decode(args.Scenario)
	if err != nil {
		return Figures{}, err
	}
	p, err := s.Problem()
	if err != nil {
		return Figures{}, err
	}
	r, err := fixedpoint.Solve(p, fixedpoint.Options{})
	if err != nil {
		return Figures{}, err
	}
	return Figures{
		MSE: r.MSE, NMSEdB: r.NMSEdB, Susceptibility: r.Susceptibility, NonzeroFraction: r.NonZero,
		TPP: r.TPP, FDP: r.FDP, TrainError: r.TrainError,
		Converged: r.Converged, Iterations: r.Iterations, EstimateZero: r.EstimateZero,
	}, nil
}

func runEval(raw json.RawMessage, _ func(done, total int)) (any, error) {
	var a EvalArgs
	if err := json.Unmarshal(raw, &a); err != nil {
		return nil, errors.New("eval arguments: " + err.Error())
	}
	return Eval(a)
}
