package job

import (
	"context"
	"encoding/json"
	"errors"
	"math"
	"strconv"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
)

// Float is a float64 that travels as JSON null when it is not finite (JSON has no NaN or
// infinity). Finite values are written in the shortest form that reads back exactly.
type Float float64

// MarshalJSON writes null for NaN and infinities.
func (n Float) MarshalJSON() ([]byte, error) {
	f := float64(n)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, f, 'g', -1, 64), nil
}

// UnmarshalJSON reads null as NaN.
func (n *Float) UnmarshalJSON(b []byte) error {
	if string(b) == "null" {
		*n = Float(math.NaN())
		return nil
	}
	var f float64
	if err := json.Unmarshal(b, &f); err != nil {
		return err
	}
	*n = Float(f)
	return nil
}

// Cell is one point of a sweep or a map as it travels from a worker to the page: the
// coordinates and every number of the fixed point (study.Point), exactly.
type Cell struct {
	X              Float  `json:"x"`
	Y              Float  `json:"y,omitempty"`
	MSE            Float  `json:"mse"`
	NMSE           Float  `json:"nmse"`
	NMSEdB         Float  `json:"nmse_db"`
	Susceptibility Float  `json:"susceptibility"`
	G1             Float  `json:"g1"`
	T1             Float  `json:"t1"`
	G2             Float  `json:"g2"`
	NonZero        Float  `json:"nonzero_fraction"`
	TPP            Float  `json:"tpp"`
	FDP            Float  `json:"fdp"`
	TrainError     Float  `json:"train_error"`
	Iterations     int    `json:"iterations"`
	Converged      bool   `json:"converged"`
	Residual       Float  `json:"residual"`
	EstimateZero   bool   `json:"estimate_zero"`
	Failed         string `json:"failed,omitempty"`
}

// CellOf packs a study point.
func CellOf(p study.Point) Cell {
	r := p.Result
	return Cell{X: Float(p.X), Y: Float(p.Y), MSE: Float(r.MSE), NMSE: Float(r.NMSE), NMSEdB: Float(r.NMSEdB),
		Susceptibility: Float(r.Susceptibility), G1: Float(r.G1), T1: Float(r.T1), G2: Float(r.G2),
		NonZero: Float(r.NonZero), TPP: Float(r.TPP), FDP: Float(r.FDP), TrainError: Float(r.TrainError),
		Iterations: r.Iterations, Converged: r.Converged, Residual: Float(r.Residual),
		EstimateZero: r.EstimateZero, Failed: p.Failed}
}

// Point unpacks the cell into the study point it came from.
func (c Cell) Point() study.Point {
	return study.Point{X: float64(c.X), Y: float64(c.Y), Failed: c.Failed, Result: fixedpoint.Result{
		MSE: float64(c.MSE), NMSE: float64(c.NMSE), NMSEdB: float64(c.NMSEdB),
		Susceptibility: float64(c.Susceptibility), G1: float64(c.G1), T1: float64(c.T1), G2: float64(c.G2),
		NonZero: float64(c.NonZero), TPP: float64(c.TPP), FDP: float64(c.FDP), TrainError: float64(c.TrainError),
		Iterations: c.Iterations, Converged: c.Converged, Residual: float64(c.Residual), EstimateZero: c.EstimateZero}}
}

// Axis is a study.Axis with JSON names: the field (a scenario path), its ends, the number
// of points and the spacing.
type Axis struct {
	Over   string  `json:"over"`
	From   float64 `json:"from"`
	To     float64 `json:"to"`
	Points int     `json:"points"`
	Log    bool    `json:"log,omitempty"`
}

func (a Axis) study() study.Axis {
	return study.Axis{Over: a.Over, From: a.From, To: a.To, Points: a.Points, Log: a.Log}
}

// SweepArgs are the arguments of the "sweep" kind: a scenario file and the axis to sweep.
// PointFrom and PointTo, when PointTo > 0, ask for the block of points PointFrom <= k <
// PointTo of the axis only, so that several workers can share a sweep.
type SweepArgs struct {
	Scenario json.RawMessage `json:"scenario"`
	Axis
	PointFrom int `json:"point_from,omitempty"`
	PointTo   int `json:"point_to,omitempty"`
}

// SweepResult is the result of the "sweep" kind: the points in axis order.
type SweepResult struct {
	Points []Cell `json:"points"`
}

func init() { Register("sweep", runSweep) }

// decodeScenario reads the scenario argument of a job.
func decodeScenario(raw json.RawMessage) (scenario.Scenario, error) {
	if len(raw) == 0 {
		return scenario.Scenario{}, errors.New("scenario: missing")
	}
	return scenario.Decode(raw)
}

// Sweep runs study.Sweep (warm-started along the axis) and packs its points. progress may
// be nil. A block of points is swept on its own, starting cold at its first point like a
// row of a map: its numbers agree with the whole sweep's to the fixed point's tolerance
// (about 1e-11 relative), and its x values are exactly those of the whole axis.
//
// Special cases are: an invalid scenario, axis or block is an error naming the field;
// points that fail or do not converge are returned marked, as study.Sweep marks them.
func Sweep(a SweepArgs, progress func(done, total int)) (SweepResult, error) {
	s, err := decodeScenario(a.Scenario)
	if err != nil {
		return SweepResult{}, err
	}
	ax := a.study()
	var xs []float64
	if a.PointTo > 0 {
		if xs, err = ax.Values(); err != nil {
			return SweepResult{}, err
		}
		if a.PointFrom < 0 || a.PointTo > len(xs) || a.PointFrom >= a.PointTo {
			return SweepResult{}, &study.SpecError{Field: "points", Reason: "the block needs 0 <= point_from < point_to <= points"}
		}
		xs = xs[a.PointFrom:a.PointTo]
		ax.From, ax.To, ax.Points = xs[0], xs[len(xs)-1], len(xs)
	}
	pts, err := study.Sweep(context.Background(), s, study.SweepSpec{Axis: ax}, progress)
	if err != nil {
		return SweepResult{}, err
	}
	for i := range xs {
		pts[i].X = xs[i]
	}
	out := SweepResult{Points: make([]Cell, len(pts))}
	for i, p := range pts {
		out.Points[i] = CellOf(p)
	}
	return out, nil
}

func runSweep(raw json.RawMessage, progress func(done, total int)) (any, error) {
	var a SweepArgs
	if err := json.Unmarshal(raw, &a); err != nil {
		return nil, errors.New("sweep arguments: " + err.Error())
	}
	return Sweep(a, progress)
}
