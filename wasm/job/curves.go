package job

import (
	"context"

	"hdrisk/engine/study"
	"hdrisk/protocol"
)

func init() { Serve(protocol.Curves, Curves) }

// Curves runs study.SweepCurves: the sweep along a.Axis once per value in a.At of the field
// a.Curves, each curve warm-started along its own axis, or only the block of points
// a.PointFrom <= k < a.PointTo of each (when a.PointTo > 0). progress may be nil.
//
// Special cases are: an invalid scenario, axis, field or value is an error naming it;
// points that fail or do not converge are returned marked, as study.Sweep marks them.
func Curves(a protocol.CurvesArgs, progress func(done, total int)) (study.Curves, error) {
	s, err := decodeScenario(a.Scenario)
	if err != nil {
		return study.Curves{}, err
	}
	c, err := s.Check()
	if err != nil {
		return study.Curves{}, err
	}
	return study.SweepCurves(context.Background(), c, study.CurvesSpec{SweepSpec: study.SweepSpec{Axis: a.Axis}, Curves: a.Curves, At: a.At,
		PointFrom: a.PointFrom, PointTo: a.PointTo}, progress)
}
