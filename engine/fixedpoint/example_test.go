package fixedpoint_test

import (
	"fmt"

	"hdrisk/engine/design"
	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

// The LASSO on a sparse signal: half as many Gaussian measurements as unknowns, one entry
// in ten nonzero, noise variance 0.01. Solve returns the predicted error of the estimate
// in the limit of large n, with the fixed point it reached.
func ExampleSolve() {
	d, _ := design.Gaussian(0.5, design.Rows)
	x, _ := signal.BernoulliGauss(0.1, 1)
	l1, _ := penalty.L1(0.1)
	r, err := fixedpoint.Solve(fixedpoint.Problem{Design: d, Signal: x, Penalty: l1, Noise: 0.01}, fixedpoint.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("converged %v, NMSE %.2f dB\n", r.Converged, r.NMSEdB)
	fmt.Printf("nonzero %.3f, true positives %.3f, false discoveries %.3f\n", r.NonZero, r.TPP, r.FDP)
	// Output:
	// converged true, NMSE -8.91 dB
	// nonzero 0.192, true positives 0.751, false discoveries 0.608
}
