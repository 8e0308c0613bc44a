package job

import (
	"context"
	"encoding/json"
	"errors"

	"hdrisk/engine/study"
)

// TunedArgs are the arguments of the "tuned" kind: a sweep (with its optional block of
// points, as SweepArgs) whose weight Best is re-tuned at every point ("l1", "l2", "l1+l2").
type TunedArgs struct {
	SweepArgs
	Best string `json:"best"`
}

// TunedResult is the best-tuned curve: its points in axis order and the best weight at each
// (null where the search failed).
type TunedResult struct {
	Points  []Cell  `json:"points"`
	Weights []Float `json:"weights"`
}

func init() { Register("tuned", runTuned) }

// Tuned runs study.Tuned on the axis or its block. Special cases are those of Sweep and of
// study.Tuned (re-tuning the swept weight is an error).
func Tuned(a TunedArgs, progress func(done, total int)) (TunedResult, error) {
	s, err := decodeScenario(a.Scenario)
	if err != nil {
		return TunedResult{}, err
	}
	ax := a.study()
	var xs []float64
	if a.PointTo > 0 {
		if xs, err = ax.Values(); err != nil {
			return TunedResult{}, err
		}
		if a.PointFrom < 0 || a.PointTo > len(xs) || a.PointFrom >= a.PointTo {
			return TunedResult{}, &study.SpecError{Field: "points", Reason: "the block needs 0 <= point_from < point_to <= points"}
		}
		xs = xs[a.PointFrom:a.PointTo]
		ax.From, ax.To, ax.Points = xs[0], xs[len(xs)-1], len(xs)
	}
	pts, err := study.Tuned(context.Background(), s, study.SweepSpec{Axis: ax}, study.BestSpec{Over: a.Best}, progress)
	if err != nil {
		return TunedResult{}, err
	}
	out := TunedResult{Points: make([]Cell, len(pts)), Weights: make([]Float, len(pts))}
	for i, p := range pts {
		if xs != nil {
			p.X = xs[i]
		}
		out.Points[i], out.Weights[i] = CellOf(p.Point), Float(p.Weight)
	}
	return out, nil
}

func runTuned(raw json.RawMessage, progress func(done, total int)) (any, error) {
	var a TunedArgs
	if err := json.Unmarshal(raw, &a); err != nil {
		return nil, errors.New("tuned arguments: " + err.Error())
	}
	return Tuned(a, progress)
}
