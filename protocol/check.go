package protocol

import "encoding/json"

// CheckArgs are the arguments of the "check" kind: finite-size trials of one scenario
// (docs/method.md section 8), optionally with one of its numbers set first, and optionally with
// the predicted curve over a range of that number for the figure the check is drawn on.
type CheckArgs struct {
	Scenario json.RawMessage `json:"scenario"`
	N        int             `json:"n"`
	Trials   int             `json:"trials"`
	Seed     uint64          `json:"seed"`
	Solver   string          `json:"solver"`  // cd | prox | vamp; "" is cd
	Factors  string          `json:"factors"` // fast | haar-qr | haar-householder; "" is fast
	// Over names a number of the scenario (a Scenario.Get path such as "l1" or "alpha");
	// when set, the check runs at Over = At.
	Over string  `json:"over,omitempty"`
	At   float64 `json:"at,omitempty"`
	// Curve, when set, asks for the prediction along an axis of the scenario as given (not
	// moved to At): the line the checks are drawn over.
	Curve *CurveSpec `json:"curve,omitempty"`
	// First is the index of the first trial: trial t of this job draws from PCG(Seed,
	// First+t), so that the trials of one check can be shared between workers and merged
	// by MergeChecks into the numbers of one job.
	First int `json:"first,omitempty"`
	// Matrix, when set, is the text of the user's own matrix (as the data tab read it),
	// held fixed as the design in every trial beside random rotations of its spectrum; the
	// scenario's design must be its spectrum (the same m/n). MaxBytes caps it.
	Matrix   string `json:"matrix,omitempty"`
	MaxBytes int64  `json:"max_bytes,omitempty"`
}

// CheckComparison is the verdict of a check with the user's own matrix: the trials with the
// matrix beside trials with random rotations of its spectrum (same x0 and w), and
// z = (matrix - rotated) / sqrt(se_matrix^2 + se_rotated^2); Agrees is |z| <= 3.
type CheckComparison struct {
	MatrixMeanMSE       Num          `json:"matrix_mean_mse"`
	MatrixStdErr        Num          `json:"matrix_stderr"`
	RotatedMeanMSE      Num          `json:"rotated_mean_mse"`
	RotatedStdErr       Num          `json:"rotated_stderr"`
	RotatedFactors      string       `json:"rotated_factors"`
	RotatedSolver       string       `json:"rotated_solver,omitempty"`
	RotatedSolverNote   string       `json:"rotated_solver_note,omitempty"` // why it is not the one asked for
	RotatedNotConverged int          `json:"rotated_not_converged"`
	Z                   Num          `json:"z"`
	Agrees              bool         `json:"agrees"`
	RotatedPerTrial     []CheckTrial `json:"rotated_per_trial"`
}

// CurveSpec is an axis of the predicted curve: Points values of Over from From to To,
// evenly spaced or, with Log, geometrically.
type CurveSpec struct {
	Over   string  `json:"over"`
	From   float64 `json:"from"`
	To     float64 `json:"to"`
	Points int     `json:"points"`
	Log    bool    `json:"log,omitempty"`
}

// CheckStat is an observable averaged over trials beside its prediction.
type CheckStat struct {
	Mean      Num `json:"mean"`
	StdErr    Num `json:"stderr"`
	Predicted Num `json:"predicted"`
}

// CheckTrial is one instance drawn and solved. Cosine, NormRatio and TestError are those
// of a generalized linear model's trial (TestError for a readout with labels); null (NaN)
// where they do not apply, as Nonzero, TPP and FDP are for a generalized model.
type CheckTrial struct {
	MSE        Num  `json:"mse"`
	Nonzero    Num  `json:"nonzero_fraction"`
	TPP        Num  `json:"tpp"`
	FDP        Num  `json:"fdp"`
	Cosine     Num  `json:"cosine"`
	NormRatio  Num  `json:"norm_ratio"`
	TestError  Num  `json:"test_error"`
	Iterations int  `json:"iterations"`
	Converged  bool `json:"converged"`
	Residual   Num  `json:"residual"`
	Seconds    Num  `json:"seconds"`
}

// CurvePoint is one point of the predicted curve; OK is false where the fixed point failed
// or did not converge (its MSE is then left out of the line).
type CurvePoint struct {
	X   Num  `json:"x"`
	MSE Num  `json:"mse"`
	OK  bool `json:"ok"`
}

// CheckResult is the result of the "check" kind. The names of mean_mse, stderr, trials, n
// and predicted_mse are those of `hdrisk check` (contract 3).
type CheckResult struct {
	MeanMSE             Num              `json:"mean_mse"`
	StdErr              Num              `json:"stderr"`
	Trials              int              `json:"trials"`
	N                   int              `json:"n"`
	M                   int              `json:"m"`
	PredictedMSE        Num              `json:"predicted_mse"`
	PredictionConverged bool             `json:"prediction_converged"`
	Nonzero             CheckStat        `json:"nonzero_fraction"`
	TPP                 CheckStat        `json:"tpp"`
	FDP                 CheckStat        `json:"fdp"`
	Seed                uint64           `json:"seed"`
	Solver              string           `json:"solver"`
	SolverNote          string           `json:"solver_note,omitempty"`
	Factors             string           `json:"factors"`
	Criterion           string           `json:"stop_criterion"`
	Tol                 Num              `json:"tol"`
	MaxIter             int              `json:"max_iter"`
	Converged           bool             `json:"converged"` // every trial met its stopping rule
	NotConverged        int              `json:"not_converged"`
	Warnings            []string         `json:"warnings"`
	Seconds             Num              `json:"seconds"`
	PerTrial            []CheckTrial     `json:"per_trial"`
	Over                string           `json:"over,omitempty"`
	At                  Num              `json:"at,omitempty"`
	Curve               []CurvePoint     `json:"curve,omitempty"`
	First               int              `json:"first,omitempty"`
	Comparison          *CheckComparison `json:"comparison,omitempty"`
	// GLM is set for a generalized linear model (a readout or loss group, docs/method.md
	// section 10): its trials are solved by the primal-dual method with the loss's prox, and
	// Cosine and NormRatio (and TestError for a readout with labels) stand beside their
	// predictions; Nonzero, TPP and FDP are then NaN.
	GLM       bool       `json:"glm,omitempty"`
	Cosine    *CheckStat `json:"cosine,omitempty"`
	NormRatio *CheckStat `json:"norm_ratio,omitempty"`
	TestError *CheckStat `json:"test_error,omitempty"`
}

// Check runs finite-size trials of a scenario.
var Check = Kind[CheckArgs, CheckResult]{Name: "check"}
