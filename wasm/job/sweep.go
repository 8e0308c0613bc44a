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
// points is swept on its own (study.SweepBlock), at exactly the values the whole axis has
// there and starting cold at its first point like a row of a map: its numbers agree with the
// whole sweep's to the fixed point's tolerance (about 1e-11 relative), and exactly for a
// generalized model, whose points start cold anyway.
//
// Special cases are: an invalid scenario, axis or block is an error naming the field;
// points that fail or do not converge are returned marked, as study.Sweep marks them.
func Sweep(a protocol.SweepArgs, progress func(done, total int)) (protocol.SweepResult, error) {
	s, err := decodeScenario(a.Scenario)
	if err != nil {
		return protocol.SweepResult{}, err
	}
	c, err := s.Check()
	if err != nil {
		return protocol.SweepResult{}, err
	}
	from, to := 0, a.Axis.Points
	if a.PointTo > 0 {
		from, to = a.PointFrom, a.PointTo
	}
	pts, err := study.SweepBlock(context.Background(), c, study.SweepSpec{Axis: a.Axis}, from, to, progress)
	if err != nil {
		return protocol.SweepResult{}, err
	}
	return protocol.SweepResult{Points: pts}, nil
}
