package job

import (
	"context"
	"encoding/json"
	"errors"

	"hdrisk/engine/study"
)

// PlanArgs are the arguments of the "plan" kind: a scenario file, the target (an NMSE in dB,
// or an MSE when MSE is set), the range of alpha to search (0: study.Plan's defaults) and
// the weight tuned at each alpha ("" lets study.Best choose).
type PlanArgs struct {
	Scenario json.RawMessage `json:"scenario"`
	Target   float64         `json:"target"`
	MSE      bool            `json:"mse,omitempty"`
	AlphaMin float64         `json:"alpha_min,omitempty"`
	AlphaMax float64         `json:"alpha_max,omitempty"`
	Over     string          `json:"over,omitempty"`
}

// PlanOut is the result of the "plan" kind.
type PlanOut struct {
	Alpha     Float   `json:"alpha"`
	Reached   bool    `json:"reached"`
	Reason    string  `json:"reason"`
	TargetMSE Float   `json:"target_mse"`
	Best      BestOut `json:"best"`
	Solves    int     `json:"solves"`
}

func init() { Register("plan", runPlan) }

// Plan runs study.Plan. Special cases are those of study.Plan: a target not reached up to
// alpha_max is a result with Reached false and a Reason, not an error.
func Plan(a PlanArgs) (PlanOut, error) {
	s, err := decodeScenario(a.Scenario)
	if err != nil {
		return PlanOut{}, err
	}
	r, err := study.Plan(context.Background(), s, study.PlanSpec{Target: a.Target, MSE: a.MSE,
		AlphaMin: a.AlphaMin, AlphaMax: a.AlphaMax, Best: study.BestSpec{Over: a.Over}})
	if err != nil {
		return PlanOut{}, err
	}
	return PlanOut{Alpha: Float(r.Alpha), Reached: r.Reached, Reason: r.Reason, TargetMSE: Float(r.TargetMSE),
		Best: BestOf(r.Best), Solves: r.Solves}, nil
}

func runPlan(raw json.RawMessage, _ func(done, total int)) (any, error) {
	var a PlanArgs
	if err := json.Unmarshal(raw, &a); err != nil {
		return nil, errors.New("plan arguments: " + err.Error())
	}
	return Plan(a)
}
