package protocol

// Sources of the "spectrum" kind.
const (
	SourceMatrix      = "matrix"          // a measurement matrix: its singular values are computed
	SourceSingular    = "singular-values" // a list of singular values of F
	SourceEigenvalues = "eigenvalues"     // a list of eigenvalues of F^T F (or F F^T)
)

// MaxListValues is the longest list of singular values, eigenvalues or samples the page
// takes: the length its editor accepts for a list.
const MaxListValues = 10000

// SpectrumArgs are the arguments of the "spectrum" kind: the text of a file or of pasted
// numbers, and what it holds. Rows and Cols give the shape of the matrix a list belongs to
// (both 0: square, one row per value); they are ignored for a matrix, whose shape is read.
type SpectrumArgs struct {
	Source string `json:"source"`
	Text   string `json:"text"`
	Rows   int    `json:"rows,omitempty"`
	Cols   int    `json:"cols,omitempty"`
	Bins   int    `json:"bins,omitempty"` // 0: automatic
	// MaxBytes caps the text (0: engine/data's default); the page passes the cap it used
	// when it read the file, so that pasted text is held to the same.
	MaxBytes int64 `json:"max_bytes,omitempty"`
}

// HistogramOut is data.Histogram for JSON.
type HistogramOut struct {
	Edges   []float64 `json:"edges"`
	Counts  []int     `json:"counts"`
	Density []float64 `json:"density"`
}

// SpectrumResult is the result of the "spectrum" kind: what the theory takes from a user's
// matrix (its singular values and alpha = rows/cols, docs/method.md sections 1 and 5) and a summary.
type SpectrumResult struct {
	Source         string       `json:"source"`
	SingularValues []float64    `json:"singular_values"` // min(rows, cols) values, decreasing
	Rows           int          `json:"rows"`
	Cols           int          `json:"cols"`
	Alpha          Num          `json:"alpha"`
	Min            Num          `json:"min"`
	Max            Num          `json:"max"`
	Condition      Num          `json:"condition"` // null when the smallest value is 0
	Rank           int          `json:"rank"`
	Tolerance      Num          `json:"tolerance"`
	Histogram      HistogramOut `json:"histogram"`
	ReadSeconds    Num          `json:"read_seconds"`
	SVDSeconds     Num          `json:"svd_seconds"` // 0 for a list
}

// Progress of the "spectrum" kind, in thousandths of the work (done of SpectrumTotal): the
// reading of the text up to SpectrumReadEnd, by the bytes read; then the steps of the
// singular values (engine/data): the Gram product up to SpectrumGramEnd, the tridiagonal
// reduction up to SpectrumReduceEnd, the eigenvalues up to SpectrumEigenEnd; then the
// summary. The shares are rough measures of each step's time on a 1500 x 3000 matrix.
const (
	SpectrumReadEnd   = 250
	SpectrumGramEnd   = 650
	SpectrumReduceEnd = 950
	SpectrumEigenEnd  = 990
	SpectrumTotal     = 1000
)

// Spectrum steps, named by SpectrumStep.
const (
	StepReading     = "reading"
	StepGram        = "gram"
	StepReduction   = "tridiagonal"
	StepEigenvalues = "eigenvalues"
	StepSummary     = "summary"
)

// SpectrumStep names the step a progress report of the "spectrum" kind falls in.
func SpectrumStep(done int) string {
	switch {
	case done < SpectrumReadEnd:
		return StepReading
	case done < SpectrumGramEnd:
		return StepGram
	case done < SpectrumReduceEnd:
		return StepReduction
	case done < SpectrumEigenEnd:
		return StepEigenvalues
	}
	return StepSummary
}

// Spectrum reads a matrix or a list and summarizes its singular values.
var Spectrum = Kind[SpectrumArgs, SpectrumResult]{Name: "spectrum"}
