package protocol

import (
	"encoding/json"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/study"
)

// EvalArgs are the arguments of Eval: one scenario file (contract 1).
type EvalArgs struct {
	Scenario json.RawMessage `json:"scenario"`
}

// Eval solves the fixed point of one scenario; its result is the engine's.
var Eval = Kind[EvalArgs, fixedpoint.Result]{Name: "eval"}

// SweepArgs are the arguments of Sweep: a scenario file and the axis to sweep. PointFrom and
// PointTo, when PointTo > 0, ask for the block of points PointFrom <= k < PointTo of the
// axis only, so that several workers can share a sweep.
type SweepArgs struct {
	Scenario  json.RawMessage `json:"scenario"`
	Axis      study.Axis      `json:"axis"`
	PointFrom int             `json:"point_from,omitempty"`
	PointTo   int             `json:"point_to,omitempty"`
}

// SweepResult is the result of Sweep: the points in axis order.
type SweepResult struct {
	Points Points `json:"points"`
}

// Sweep runs a sweep (or a block of one).
var Sweep = Kind[SweepArgs, SweepResult]{Name: "sweep"}

// CurvesArgs are the arguments of Curves: a sweep drawn once per value in At of the field
// Curves (study.CurvesSpec), optionally a block PointFrom <= k < PointTo of each curve's
// points (PointTo 0: all of them). The page shares one such study between workers by giving
// each job one value and a block of its points (study.SweepBlock: a generalized model's
// numbers do not depend on the split; a linear model's agree with the unsplit curve to the
// fixed point's tolerance).
type CurvesArgs struct {
	Scenario  json.RawMessage `json:"scenario"`
	Axis      study.Axis      `json:"axis"`
	Curves    string          `json:"curves"`
	At        []float64       `json:"curves_at"`
	PointFrom int             `json:"point_from,omitempty"`
	PointTo   int             `json:"point_to,omitempty"`
}

// Curves runs study.SweepCurves; its result is the engine's, each curve's points packed as
// Points packs them.
var Curves = Kind[CurvesArgs, study.Curves]{Name: "curves"}

// MapArgs are the arguments of MapRows: a scenario file, the two axes of the map (X along a
// row, Y from row to row) and the block of rows to compute, RowFrom <= j < RowTo.
type MapArgs struct {
	Scenario json.RawMessage `json:"scenario"`
	X        study.Axis      `json:"x"`
	Y        study.Axis      `json:"y"`
	RowFrom  int             `json:"row_from"`
	RowTo    int             `json:"row_to"`
}

// MapResult is the result of MapRows: the cells of the block, row after row (X fastest),
// and the block's place in the map.
type MapResult struct {
	RowFrom int    `json:"row_from"`
	RowTo   int    `json:"row_to"`
	Cells   Points `json:"cells"`
}

// MapRows computes a block of rows of a map.
var MapRows = Kind[MapArgs, MapResult]{Name: "map_rows"}

// BestArgs are the arguments of Best: a scenario file and the weight to vary ("l1", "l2",
// "l1+l2" or another positive field; "" lets study.Best choose), with optional search bounds
// (0: study.Best's defaults).
type BestArgs struct {
	Scenario json.RawMessage `json:"scenario"`
	Over     string          `json:"over,omitempty"`
	Lo       float64         `json:"lo,omitempty"`
	Hi       float64         `json:"hi,omitempty"`
}

// Best finds the best regularization; its result is the engine's (without the scenario).
var Best = Kind[BestArgs, study.BestResult]{Name: "best"}

// PlanArgs are the arguments of Plan: a scenario file, the target (an NMSE in dB, or an MSE
// when MSE is set), the range of alpha to search (0: study.Plan's defaults) and the weight
// tuned at each alpha ("" lets study.Best choose).
type PlanArgs struct {
	Scenario json.RawMessage `json:"scenario"`
	Target   float64         `json:"target"`
	MSE      bool            `json:"mse,omitempty"`
	AlphaMin float64         `json:"alpha_min,omitempty"`
	AlphaMax float64         `json:"alpha_max,omitempty"`
	Over     string          `json:"over,omitempty"`
}

// Plan finds the smallest alpha reaching a target; its result is the engine's.
var Plan = Kind[PlanArgs, study.PlanResult]{Name: "plan"}

// BayesArgs are the arguments of Bayes: a scenario file (its penalty is not used).
type BayesArgs struct {
	Scenario json.RawMessage `json:"scenario"`
}

// Bayes computes the Bayes-optimal reference; its result is the engine's.
var Bayes = Kind[BayesArgs, study.BayesResult]{Name: "bayes"}
