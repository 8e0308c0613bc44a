package job

import (
	"context"
	"encoding/json"
	"fmt"
	"strings"
	"time"

	"hdrisk/engine/data"

	"hdrisk/protocol"
)

func init() { Register("spectrum", runSpectrum) }

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
	progress(protocol.StepRead, protocol.SpectrumSteps)
	switch a.Source {
	case protocol.SourceMatrix:
		mat, err := data.ReadMatrix(strings.NewReader(a.Text), data.Limits{MaxBytes: a.MaxBytes})
		if err != nil {
			return protocol.SpectrumResult{}, err
		}
		readSecs = time.Since(t0).Seconds()
		m, n = mat.Dims()
		progress(protocol.StepSVD, protocol.SpectrumSteps)
		t1 := time.Now()
		if sv, err = data.SingularValues(context.Background(), mat, nil); err != nil {
			return protocol.SpectrumResult{}, err
		}
		svdSeconds = time.Since(t1).Seconds()
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
	progress(protocol.StepSummary, protocol.SpectrumSteps)
	s, err := data.Summarize(sv, m, n, a.Bins)
	if err != nil {
		return protocol.SpectrumResult{}, err
	}
	progress(protocol.SpectrumSteps, protocol.SpectrumSteps)
	return protocol.SpectrumResult{
		Source: a.Source, SingularValues: sv, Rows: m, Cols: n, Alpha: protocol.Num(s.Alpha),
		Min: protocol.Num(s.Min), Max: protocol.Num(s.Max), Condition: protocol.Num(s.Condition), Rank: s.Rank,
		Tolerance:   protocol.Num(s.Tolerance),
		Histogram:   protocol.HistogramOut{Edges: s.Histogram.Edges, Counts: s.Histogram.Counts, Density: s.Histogram.Density},
		ReadSeconds: protocol.Num(readSecs), SVDSeconds: protocol.Num(svdSeconds),
	}, nil
}

func runSpectrum(raw json.RawMessage, progress func(done, total int)) (any, error) {
	var a protocol.SpectrumArgs
	if err := json.Unmarshal(raw, &a); err != nil {
		return nil, fmt.Errorf("spectrum arguments: %w", err)
	}
	return Spectrum(a, progress)
}
