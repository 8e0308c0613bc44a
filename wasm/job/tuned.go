package job

import (
	"context"

	"hdrisk/engine/study"
	"hdrisk/protocol"
)

func init() { Serve(protocol.Tuned, Tuned) }

// Tuned runs study.Tuned on the axis or its block (see Sweep for blocks). Special cases are
// those of Sweep and of study.Tuned (re-tuning the swept weight is an error).
func Tuned(a protocol.TunedArgs, progress func(done, total int)) (protocol.TunedResult, error) {
	s, err := decodeScenario(a.Scenario)
	if err != nil {
		return protocol.TunedResult{}, err
	}
	ax := a.Axis
	var xs []float64
	if a.PointTo > 0 {
		if xs, err = ax.Values(); err != nil {
			return protocol.TunedResult{}, err
		}
		if a.PointFrom < 0 || a.PointTo > len(xs) || a.PointFrom >= a.PointTo {
			return protocol.TunedResult{}, &study.SpecError{Field: "points", Reason: "the block needs 0 <= point_from < point_to <= points"}
		}
		xs = xs[a.PointFrom:a.PointTo]
		ax.From, ax.To, ax.Points = xs[0], xs[len(xs)-1], len(xs)
	}
	pts, err := study.Tuned(context.Background(), s, study.SweepSpec{Axis: ax}, study.BestSpec{Over: a.Best}, progress)
	if err != nil {
		return protocol.TunedResult{}, err
	}
	out := protocol.TunedResult{Points: make(protocol.Points, len(pts)), Weights: make([]float64, len(pts))}
	for i, p := range pts {
		if xs != nil {
			p.X = xs[i]
		}
		out.Points[i], out.Weights[i] = p.Point, p.Weight
	}
	return out, nil
}
