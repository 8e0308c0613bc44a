package job

import (
	"encoding/json"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
	"time"

	"hdrisk/protocol"
)

// BenchmarkSpectrumJob1500x3000 reads a 1500 x 3000 Gaussian matrix from about 60 MB of CSV
// and computes its singular values, as the page's worker does once the file has arrived, and
// reports the seconds of each step the page shows (read, gram, tridiagonal, eigenvalues);
// run it under GOOS=js GOARCH=wasm for the worker's figures (DEVELOPERS.md, "Benchmarks").
func BenchmarkSpectrumJob1500x3000(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 1500))
	var sb strings.Builder
	for range 1500 {
		for j := range 3000 {
			if j > 0 {
				sb.WriteByte(',')
			}
			sb.WriteString(strconv.FormatFloat(rng.NormFloat64(), 'g', 10, 64))
		}
		sb.WriteByte('\n')
	}
	raw, _ := json.Marshal(protocol.SpectrumArgs{Source: protocol.SourceMatrix, MaxBytes: 1 << 30})
	a, err := protocol.Spectrum.DecodeArgs(raw)
	if err != nil {
		b.Fatal(err)
	}
	a.SetBulk(sb.String())
	for b.Loop() {
		secs := map[string]float64{}
		last, step := time.Now(), protocol.StepReading
		if _, err := Spectrum(a, func(done, _ int) {
			if s := protocol.SpectrumStep(done); s != step {
				secs[step] += time.Since(last).Seconds()
				last, step = time.Now(), s
			}
		}); err != nil {
			b.Fatal(err)
		}
		for s, v := range secs {
			b.ReportMetric(v, s+"-s")
		}
	}
}
