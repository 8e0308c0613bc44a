package job

import (
	"context"
	"encoding/json"
	"fmt"
	"strings"
	"time"

	"hdrisk/engine/data"
)

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
// matrix (its singular values and alpha = rows/cols, method.md M1 and M5) and a summary.
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

// Spectrum steps, as reported to progress (done of SpectrumSteps).
const (
	StepRead      = 0 // reading the text
	StepSVD       = 1 // computing the singular values
	StepSummary   = 2 // summarizing
	SpectrumSteps = 3
)

func init() { Register("spectrum", runSpectrum) }

// Spectrum reads a matrix or a list of singular values or eigenvalues and summarizes the
// singular values. Special cases are: an unknown source and a list whose Rows and Cols do
// not match its length are errors naming the argument; problems with the text are
// *data.LineError values naming the line.
func Spectrum(a SpectrumArgs, progress func(done, total int)) (SpectrumResult, error) {
	if progress == nil {
		progress = func(int, int) {}
	}
	var (
		sv         []float64
		m, n       int
		t0         = time.Now()
		readSecs   float64
		svdSeconds float64
	)
	progress(StepRead, SpectrumSteps)
	switch a.Source {
	case SourceMatrix:
		mat, err := data.ReadMatrix(strings.NewReader(a.Text), data.Limits{MaxBytes: a.MaxBytes})
		if err != nil {
			return SpectrumResult{}, err
		}
		readSecs = time.Since(t0).Seconds()
		m, n = mat.Dims()
		progress(StepSVD, SpectrumSteps)
		t1 := time.Now()
		if sv, err = data.SingularValues(context.Background(), mat, nil); err != nil {
			return SpectrumResult{}, err
		}
		svdSeconds = time.Since(t1).Seconds()
	case SourceSingular, SourceEigenvalues:
		var err error
		sv, err = data.ReadSpectrum(strings.NewReader(a.Text), a.Source == SourceEigenvalues,
			data.Limits{MaxEntries: MaxListValues, MaxBytes: a.MaxBytes})
		if err != nil {
			return SpectrumResult{}, err
		}
		readSecs = time.Since(t0).Seconds()
		m, n = a.Rows, a.Cols
		if m == 0 && n == 0 {
			m, n = len(sv), len(sv)
		}
		if min(m, n) != len(sv) {
			return SpectrumResult{}, fmt.Errorf("rows, cols: a %d x %d matrix has %d singular values, the list has %d", m, n, min(m, n), len(sv))
		}
	default:
		return SpectrumResult{}, fmt.Errorf("source: %q is not one of %s, %s, %s", a.Source, SourceMatrix, SourceSingular, SourceEigenvalues)
	}
	progress(StepSummary, SpectrumSteps)
	s, err := data.Summarize(sv, m, n, a.Bins)
	if err != nil {
		return SpectrumResult{}, err
	}
	progress(SpectrumSteps, SpectrumSteps)
	return SpectrumResult{
		Source: a.Source, SingularValues: sv, Rows: m, Cols: n, Alpha: Num(s.Alpha),
		Min: Num(s.Min), Max: Num(s.Max), Condition: Num(s.Condition), Rank: s.Rank,
		Tolerance:   Num(s.Tolerance),
		Histogram:   HistogramOut{Edges: s.Histogram.Edges, Counts: s.Histogram.Counts, Density: s.Histogram.Density},
		ReadSeconds: Num(readSecs), SVDSeconds: Num(svdSeconds),
	}, nil
}

func runSpectrum(raw json.RawMessage, progress func(done, total int)) (any, error) {
	var a SpectrumArgs
	if err := json.Unmarshal(raw, &a); err != nil {
		return nil, fmt.Errorf("spectrum arguments: %w", err)
	}
	return Spectrum(a, progress)
}
