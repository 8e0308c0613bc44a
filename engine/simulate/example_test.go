package simulate_test

import (
	"context"
	"fmt"
	"math"

	"hdrisk/engine/design"
	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
	"hdrisk/engine/simulate"
)

// An invented scenario: a sparse signal measured through a design with orthonormal rows at half
// as many measurements as unknowns, recovered by the LASSO.
func ExampleCheck() {
	d, _ := design.Orthogonal(0.5, design.Rows)
	x, _ := signal.BernoulliGauss(0.1, 1)
	l1, _ := penalty.L1(0.05)
	p := simulate.Problem{Problem: fixedpoint.Problem{Design: d, Signal: x, Penalty: l1, Noise: 0.01}}
	r, err := simulate.Check(context.Background(), p, simulate.Options{N: 500, Trials: 8, Seed: 1}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d trials of %d x %d, solver %s, stopped on %s <= %g\n", r.Trials, r.M, r.N, r.Solver, r.Criterion, r.Tol)
	fmt.Println("all converged:", r.NotConverged == 0)
	fmt.Println("within 3 standard errors plus 5% of the prediction:",
		math.Abs(r.MeanMSE-r.Predicted.MSE) <= 3*r.StdErr+0.05*r.Predicted.MSE)
	// Output:
	// 8 trials of 250 x 500, solver prox, stopped on relative KKT residual <= 1e-08
	// all converged: true
	// within 3 standard errors plus 5% of the prediction: true
}
