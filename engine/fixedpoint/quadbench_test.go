package fixedpoint

import (
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

// BenchmarkSolveQuadrature times one fixed point, from a cold start, on the laws and the
// penalty off the closed-form path: go test ./engine/fixedpoint -run XXX -bench SolveQuadrature
func BenchmarkSolveQuadrature(b *testing.B) {
	d := must(design.Gaussian(0.5, design.Rows))
	cases := []struct {
		name string
		sig  signal.Law
		pen  penalty.Penalty
	}{
		{"laplace/l1", must(signal.Laplace(1)), must(penalty.L1(0.5))},
		{"student-t/l1", must(signal.StudentT(5, 1)), must(penalty.L1(0.5))},
		{"bernoulli-gauss/power-1.5", must(signal.BernoulliGauss(0.2, 1)), must(penalty.Power(0.3, 1.5))},
		{"laplace/power-1.5", must(signal.Laplace(1)), must(penalty.Power(0.3, 1.5))},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			benchmarkSolve(b, Problem{Design: d, Signal: c.sig, Penalty: c.pen, Noise: 0.01})
		})
	}
}
