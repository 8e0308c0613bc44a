package job

import (
	"encoding/json"
	"errors"

	"hdrisk/engine/study"
)

// BayesArgs are the arguments of the "bayes" kind: a scenario file (its penalty is not used).
type BayesArgs struct {
	Scenario json.RawMessage `json:"scenario"`
}

// BayesPoint is one fixed point of the Bayes-optimal state evolution (study.BayesPoint).
type BayesPoint struct {
	MSE        Float `json:"mse"`
	NMSE       Float `json:"nmse"`
	NMSEdB     Float `json:"nmse_db"`
	Iterations int   `json:"iterations"`
	Converged  bool  `json:"converged"`
	Exact      bool  `json:"exact"`
}

// BayesOut is the result of the "bayes" kind.
type BayesOut struct {
	Uninformed BayesPoint `json:"uninformed"`
	Informed   BayesPoint `json:"informed"`
	Differ     bool       `json:"differ"`
}

func init() { Register("bayes", runBayes) }

func bayesPoint(p study.BayesPoint) BayesPoint {
	return BayesPoint{MSE: Float(p.MSE), NMSE: Float(p.NMSE), NMSEdB: Float(p.NMSEdB), Iterations: p.Iterations,
		Converged: p.Converged, Exact: p.Exact}
}

// Bayes runs study.Bayes on the scenario's problem. Special cases are those of study.Bayes:
// a signal law without a closed-form posterior mean (Laplace, Student t) is an error.
func Bayes(a BayesArgs) (BayesOut, error) {
	s, err := decodeScenario(a.Scenario)
	if err != nil {
		return BayesOut{}, err
	}
	p, err := s.Problem()
	if err != nil {
		return BayesOut{}, err
	}
	r, err := study.Bayes(p)
	if err != nil {
		return BayesOut{}, err
	}
	return BayesOut{Uninformed: bayesPoint(r.Uninformed), Informed: bayesPoint(r.Informed), Differ: r.Differ}, nil
}

func runBayes(raw json.RawMessage, _ func(done, total int)) (any, error) {
	var a BayesArgs
	if err := json.Unmarshal(raw, &a); err != nil {
		return nil, errors.New("bayes arguments: " + err.Error())
	}
	return Bayes(a)
}
