package job

import (
	"context"
	"fmt"
	"strings"
	"time"

	"hdrisk/engine/data"

	"hdrisk/protocol"
)

func init() { Serve(protocol.Spectrum, Spectrum) }

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

// Len is what is left of the text, so that the reader can bound its work by the data.
func (c *countingReader) Len() int { return c.r.Len() }

func span(lo, hi int, frac float64) int { return lo + int(float64(hi-lo)*min(1, max(0, frac))) }

// Spectrum reads a matrix or a list of singular values or eigenvalues and summarizes the
// singular values. Special cases are: an unknown source and a list whose Rows and Cols do
// not match its length are errors naming the argument; problems with the text are
// *data.LineError values naming the line.
func Spectrum(a protocol.SpectrumArgs, progress func(done, total int)) (protocol.SpectrumResult, error) {
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
	progress(0, protocol.SpectrumTotal)
	summarize := data.Summarize
	switch a.Source {
	case protocol.SourceMatrix:
		in := &countingReader{r: strings.NewReader(a.Text), total: len(a.Text),
			report: func(f float64) { progress(span(0, protocol.SpectrumReadEnd, f), protocol.SpectrumTotal) }}
		mat, err := data.ReadMatrix(in, data.Limits{MaxBytes: a.MaxBytes})
		if err != nil {
			return protocol.SpectrumResult{}, err
		}
		readSecs = time.Since(t0).Seconds()
		m, n = mat.Dims()
		progress(protocol.SpectrumReadEnd, protocol.SpectrumTotal)
		t1 := time.Now()
		steps := map[data.Step][2]int{data.StepGram: {protocol.SpectrumReadEnd, protocol.SpectrumGramEnd},
			data.StepTridiagonal: {protocol.SpectrumGramEnd, protocol.SpectrumReduceEnd},
			data.StepEigenvalues: {protocol.SpectrumReduceEnd, protocol.SpectrumEigenEnd}}
		if sv, err = data.SingularValues(context.Background(), mat, func(s data.Step, f float64) {
			r := steps[s]
			progress(span(r[0], r[1], f), protocol.SpectrumTotal)
		}); err != nil {
			return protocol.SpectrumResult{}, err
		}
		svdSeconds = time.Since(t1).Seconds()
		summarize = data.SummarizeComputed
	case protocol.SourceSingular, protocol.SourceEigenvalues:
		var err error
		sv, err = data.ReadSpectrum(strings.NewReader(a.Text), a.Source == protocol.SourceEigenvalues,
			data.Limits{MaxEntries: protocol.MaxListValues, MaxBytes: a.MaxBytes})
		if err != nil {
			return protocol.SpectrumResult{}, err
		}
		readSecs = time.Since(t0).Seconds()
		m, n = a.Rows, a.Cols
		if m == 0 && n == 0 {
			m, n = len(sv), len(sv)
		}
		if min(m, n) != len(sv) {
			return protocol.SpectrumResult{}, fmt.Errorf("rows, cols: a %d x %d matrix has %d singular values, the list has %d", m, n, min(m, n), len(sv))
		}
	default:
		return protocol.SpectrumResult{}, fmt.Errorf("source: %q is not one of %s, %s, %s", a.Source, protocol.SourceMatrix, protocol.SourceSingular, protocol.SourceEigenvalues)
	}
	progress(protocol.SpectrumEigenEnd, protocol.SpectrumTotal)
	s, err := summarize(sv, m, n, a.Bins)
	if err != nil {
		return protocol.SpectrumResult{}, err
	}
	progress(protocol.SpectrumTotal, protocol.SpectrumTotal)
	return protocol.SpectrumResult{
		Source: a.Source, SingularValues: sv, Rows: m, Cols: n, Alpha: protocol.Num(s.Alpha),
		Min: protocol.Num(s.Min), Max: protocol.Num(s.Max), Condition: protocol.Num(s.Condition), Rank: s.Rank,
		Tolerance:   protocol.Num(s.Tolerance),
		Histogram:   protocol.HistogramOut{Edges: s.Histogram.Edges, Counts: s.Histogram.Counts, Density: s.Histogram.Density},
		ReadSeconds: protocol.Num(readSecs), SVDSeconds: protocol.Num(svdSeconds),
	}, nil
}
