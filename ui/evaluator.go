package ui

import "hdrisk/engine/fixedpoint"

// Figures are the headline results of one scenario, named as `hdrisk eval` prints them
// (architecture.md, contract 3). The JSON tags are those names.
type Figures struct {
	MSE             float64 `json:"mse"`              // mean squared error per coordinate
	NMSEdB          float64 `json:"nmse_db"`          // 10 log10(MSE / E[x0^2])
	Susceptibility  float64 `json:"susceptibility"`   // V = E[prox'] / g1
	NonzeroFraction float64 `json:"nonzero_fraction"` // share of coordinates the estimate keeps
	TPP             float64 `json:"tpp"`              // P(estimate != 0 | x0 != 0); 0 when undefined
	FDP             float64 `json:"fdp"`              // P(x0 = 0 | estimate != 0); 0 when undefined
	TrainError      float64 `json:"train_error"`      // (1/m) ||y - F xhat||^2
	Converged       bool    `json:"converged"`
	Iterations      int     `json:"iterations"`
	EstimateZero    bool    `json:"estimate_zero"` // the penalty sets the whole estimate to zero
	// The generalized model's figures (docs/method.md section 10), when GLM is set.
	GLM       bool    `json:"glm,omitempty"`
	Labels    bool    `json:"labels,omitempty"` // the readout gives labels: TestError applies
	Cosine    float64 `json:"cosine,omitempty"`
	TestError float64 `json:"test_error,omitempty"`
}

// FiguresOf names the engine's figures as `hdrisk eval` prints them.
func FiguresOf(r fixedpoint.Result) Figures {
	return Figures{MSE: r.MSE, NMSEdB: r.NMSEdB, Susceptibility: r.Susceptibility, NonzeroFraction: r.NonZero,
		TPP: r.TPP, FDP: r.FDP, TrainError: r.TrainError, Converged: r.Converged, Iterations: r.Iterations,
		EstimateZero: r.EstimateZero, GLM: r.GLM, Labels: r.Labels, Cosine: r.Cosine, TestError: r.TestError}
}

// Evaluator computes the figures of a checked scenario in the page, from the laws the check
// built. done is called exactly once unless cancel is called first, and always with the page's
// render lock held, so it may change component state directly. After cancel, done is never
// called. A scenario the engine refuses comes back as an error naming the field.
type Evaluator interface {
	Evaluate(chk Checked, done func(Figures, error)) (cancel func())
}
