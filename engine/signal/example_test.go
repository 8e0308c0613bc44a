package signal_test

import (
	"fmt"

	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

// The scalar channel r = x0 + sqrt(t) z of the fixed point, estimated by the soft threshold
// of the LASSO: Expect gives the error and the mean slope of the estimate, in closed form
// for a Gaussian-mixture signal and a piecewise-linear prox.
func ExampleExpect() {
	x, _ := signal.BernoulliGauss(0.1, 1)
	l1, _ := penalty.L1(0.5)
	m := signal.Expect(x, l1, 1, 0.04) // precision g = 1, channel variance t = 0.04
	// By hand, nonzero = 0.9 * 2 Phi(-0.5/0.2) + 0.1 * 2 Phi(-0.5/sqrt(1.04)) = 0.0736, and
	// the soft threshold's slope is 1 wherever it is nonzero.
	fmt.Printf("MSE %.5f, mean slope %.5f, nonzero %.5f\n", m.MSE, m.A, m.NonZero)
	// Output:
	// MSE 0.01971, mean slope 0.07357, nonzero 0.07357
}
