package job

import (
	"context"

	"hdrisk/engine/study"
	"hdrisk/protocol"
)

func init() {
	Serve(protocol.Best, func(a protocol.BestArgs, _ func(int, int)) (study.BestResult, error) { return Best(a) })
	Serve(protocol.Plan, func(a protocol.PlanArgs, _ func(int, int)) (study.PlanResult, error) { return Plan(a) })
	Serve(protocol.Bayes, func(a protocol.BayesArgs, _ func(int, int)) (study.BayesResult, error) { return Bayes(a) })
}

// Best runs study.Best. Special cases are those of study.Best (an error when no point of
// its grid converges, for an unknown field or bounds that are not 0 < lo < hi).
func Best(a protocol.BestArgs) (study.BestResult, error) {
	s, err := decodeScenario(a.Scenario)
	if err != nil {
		return study.BestResult{}, err
	}
	return study.Best(context.Background(), s, study.BestSpec{Over: a.Over, Lo: a.Lo, Hi: a.Hi})
}

// Plan runs study.Plan. Special cases are those of study.Plan: a target not reached up to
// alpha_max is a result with Reached false and a Reason, not an error.
func Plan(a protocol.PlanArgs) (study.PlanResult, error) {
	s, err := decodeScenario(a.Scenario)
	if err != nil {
		return study.PlanResult{}, err
	}
	return study.Plan(context.Background(), s, study.PlanSpec{Target: a.Target, MSE: a.MSE,
		AlphaMin: a.AlphaMin, AlphaMax: a.AlphaMax, Best: study.BestSpec{Over: a.Over}})
}

// Bayes runs study.Bayes on the scenario's problem. Special cases are those of study.Bayes:
// a signal law without a closed-form posterior mean is an error.
func Bayes(a protocol.BayesArgs) (study.BayesResult, error) {
	s, err := decodeScenario(a.Scenario)
	if err != nil {
		return study.BayesResult{}, err
	}
	p, err := s.Problem()
	if err != nil {
		return study.BayesResult{}, err
	}
	return study.Bayes(p)
}
