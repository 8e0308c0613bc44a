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

// Progress of the "spectrum" kind, in thousandths of the work (done of SpectrumTotal): the
// reading of the text up to SpectrumReadEnd, by the bytes read; then the steps of
// data.SingularValues: the Gram product up to SpectrumGramEnd, the tridiagonal reduction up to
// SpectrumReduceEnd, the eigenvalues up to SpectrumEigenEnd; then the summary. The shares are
// rough measures of each step's time on a 1500 x 3000 matrix.
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

// countingReader reports the share of a text of known length read so far.
type countingReader struct {
	r         *strings.Reader
	total     int
	report    func(frac float64)
	lastShown int
}

func (c *countingReader) Read(p []byte) (int, error) {
	k, err := c.r.Read(p)
	if c.total > 0 {
		done := c.total - c.r.Len()
		if done-c.lastShown >= 1<<20 || err != nil {
			c.lastShown = done
			c.report(float64(done) / float64(c.total))
		}
	}
	return k, err
}

func span(lo, hi int, frac float64) int { return lo + int(float64(hi-lo)*min(1, max(0, frac))) }

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
	progress(0, SpectrumTotal)
	summarize := data.Summarize
	switch a.Source {
	case SourceMatrix:
		in := &countingReader{r: strings.NewReader(a.Text), total: len(a.Text),
			report: func(f float64) { progress(span(0, SpectrumReadEnd, f), SpectrumTotal) }}
		mat, err := data.ReadMatrix(in, data.Limits{MaxBytes: a.MaxBytes})
		if err != nil {
			return SpectrumResult{}, err
		}
		readSecs = time.Since(t0).Seconds()
		m, n = mat.Dims()
		progress(SpectrumReadEnd, SpectrumTotal)
		t1 := time.Now()
		steps := map[data.Step][2]int{data.StepGram: {SpectrumReadEnd, SpectrumGramEnd},
			data.StepTridiagonal: {SpectrumGramEnd, SpectrumReduceEnd}, data.StepEigenvalues: {SpectrumReduceEnd, SpectrumEigenEnd}}
		if sv, err = data.SingularValues(context.Background(), mat, func(s data.Step, f float64) {
			r := steps[s]
			progress(span(r[0], r[1], f), SpectrumTotal)
		}); err != nil {
			return SpectrumResult{}, err
		}
		svdSeconds = time.Since(t1).Seconds()
		summarize = data.SummarizeComputed
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
	progress(SpectrumEigenEnd, SpectrumTotal)
	s, err := summarize(sv, m, n, a.Bins)
	if err != nil {
		return SpectrumResult{}, err
	}
	progress(SpectrumTotal, SpectrumTotal)
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
