package fixedpoint

import (
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/loss"
	"hdrisk/engine/noise"
	"hdrisk/engine/penalty"
	"hdrisk/engine/readout"
	"hdrisk/engine/signal"
)

// BenchmarkSolveGLM times one cold fixed point of each of the three generalized models of
// issue 15 on the Gaussian and the orthogonal design (m/n = 2 for the classifier, 0.6 for the
// sparse recoveries).
func BenchmarkSolveGLM(b *testing.B) {
	models := []struct {
		name  string
		alpha float64
		glm   GLM
	}{
		{"sign-square-l1", 0.6, GLM{Signal: must(signal.BernoulliGauss(0.1, 1)), Penalty: must(penalty.L1(0.05)),
			Noise: must(noise.Gauss(0.01)), Readout: readout.Sign(), Loss: loss.Square()}},
		{"logistic-logistic-ridge", 2, GLM{Signal: must(signal.Gauss(1)), Penalty: must(penalty.Ridge(0.1)),
			Readout: readout.Logistic(), Loss: loss.Logistic()}},
		{"outliers-huber-l1", 0.6, GLM{Signal: must(signal.BernoulliGauss(0.1, 1)), Penalty: must(penalty.L1(0.05)),
			Noise: must(noise.Outliers(0.01, 0.1, 10)), Readout: readout.Linear(), Loss: must(loss.Huber(0.3))}},
	}
	for _, m := range models {
		for _, d := range []struct {
			name string
			law  design.Law
		}{{"gaussian", must(design.Gaussian(m.alpha, design.Columns))}, {"orthogonal", must(design.Orthogonal(m.alpha, design.Columns))}} {
			b.Run(m.name+"/"+d.name, func(b *testing.B) {
				p := m.glm
				p.Design = d.law
				iters := 0
				for b.Loop() {
					r, err := SolveGLM(p, Options{})
					if err != nil || !r.Converged {
						b.Fatalf("%v converged %v", err, r.Converged)
					}
					iters = r.Iterations
				}
				b.ReportMetric(float64(iters), "iterations")
			})
		}
	}
}
