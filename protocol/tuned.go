package protocol

// TunedArgs are the arguments of Tuned: a sweep (with its optional block of points, as
// SweepArgs) whose weight is re-tuned at every point ("l1", "l2" or "l1+l2").
type TunedArgs struct {
	SweepArgs
	Best string `json:"best"`
}

// TunedResult is the best-tuned curve: its points in axis order and the best weight at
// each (NaN where the search failed).
type TunedResult struct {
	Points  Points    `json:"points"`
	Weights []float64 `json:"weights"`
}

// Tuned computes a best-tuned curve (or a block of one).
var Tuned = Kind[TunedArgs, TunedResult]{Name: "tuned"}
