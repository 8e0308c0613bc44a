package job

import (
	"context"
	"encoding/json"
	"errors"

	"hdrisk/engine/study"
)

// BestArgs are the arguments of the "best" kind: a scenario file and the weight to vary
// ("l1", "l2", "l1+l2" or another positive field; "" lets study.Best choose), with optional
// search bounds (0: study.Best's defaults).
type BestArgs struct {
	Scenario json.RawMessage `json:"scenario"`
	Over     string          `json:"over,omitempty"`
	Lo       float64         `json:"lo,omitempty"`
	Hi       float64         `json:"hi,omitempty"`
}

// BestOut is the result of the "best" kind (study.BestResult without the scenario).
type BestOut struct {
	Over    string `json:"over"`
	Value   Float  `json:"value"`
	MSE     Float  `json:"mse"`
	NMSEdB  Float  `json:"nmse_db"`
	AtBound string `json:"at_bound,omitempty"`
	Note    string `json:"note,omitempty"`
	Lo      Float  `json:"lo"`
	Hi      Float  `json:"hi"`
	Solves  int    `json:"solves"`
	Point   Cell   `json:"point"`
}

// BestOf packs a study.BestResult.
func BestOf(b study.BestResult) BestOut {
	return BestOut{Over: b.Over, Value: Float(b.Value), MSE: Float(b.MSE), NMSEdB: Float(b.Result.NMSEdB),
		AtBound: b.AtBound, Note: b.Note, Lo: Float(b.Lo), Hi: Float(b.Hi), Solves: b.Solves,
		Point: CellOf(study.Point{X: b.Value, Result: b.Result})}
}

func init() { Register("best", runBest) }

// Best runs study.Best. Special cases are those of study.Best (an error when no point of
// its grid converges, for an unknown field or bounds that are not 0 < lo < hi).
func Best(a BestArgs) (BestOut, error) {
	s, err := decodeScenario(a.Scenario)
	if err != nil {
		return BestOut{}, err
	}
	b, err := study.Best(context.Background(), s, study.BestSpec{Over: a.Over, Lo: a.Lo, Hi: a.Hi})
	if err != nil {
		return BestOut{}, err
	}
	return BestOf(b), nil
}

func runBest(raw json.RawMessage, _ func(done, total int)) (any, error) {
	var a BestArgs
	if err := json.Unmarshal(raw, &a); err != nil {
		return nil, errors.New("best arguments: " + err.Error())
	}
	return Best(a)
}
