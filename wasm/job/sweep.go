package job

import (
	"context"
	"encoding/json"
	"errors"

	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
	"hdrisk/protocol"
)

func init() { Serve(protocol.Sweep, Sweep) }

// decodeScenario reads the scenario argument of a job.
func decodeScenario(raw json.RawMessage) (scenario.Scenario, error) {
	if len(raw) == 0 || string(raw) == "null" {
		return scenario.Scenario{}, errors.New("scenario: missing")
	}
	return scenario.Decode(raw)
}

// Sweep runs study.Sweep (warm-started along the axis). progress may be nil. A block of
// points is swept on its own, starting cold at its first point like a row of a map: its
// numbers agree with the whole sweep's to the fixed point's tolerance (about 1e-11
// relative), and its x values are exactly those of the whole axis.
//
// Special cases are: an invalid scenario, axis or block is an error naming the field;
// points that fail or do not converge are returned marked, as study.Sweep marks them.
func Sweep(a protocol.SweepArgs, progress func(done, total int)) (protocol.SweepResult, error) {
	s, err := decodeScenario(a.Scenario)
	if err != nil {
		return protocol.SweepResult{}, err
	}
	ax := a.Axis
	var xs []float64
	if a.PointTo > 0 {
		if xs, err = ax.Values(); err != nil {
			return protocol.SweepResult{}, err
		}
		if a.PointFrom < 0 || a.PointTo > len(xs) || a.PointFrom >= a.PointTo {
			return protocol.SweepResult{}, &study.SpecError{Field: "points", Reason: "the block needs 0 <= point_from < point_to <= points"}
		}
		xs = xs[a.PointFrom:a.PointTo]
		ax.From, ax.To, ax.Points = xs[0], xs[len(xs)-1], len(xs)
	}
	pts, err := study.Sweep(context.Background(), s, study.SweepSpec{Axis: ax}, progress)
	if err != nil {
		return protocol.SweepResult{}, err
	}
	for i := range xs {
		pts[i].X = xs[i]
	}
	return protocol.SweepResult{Points: pts}, nil
}
