package simulate

import (
	"context"
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/penalty"
)

// Fast factors take the matrix-free solvers to large n (VAMP at n = 100000, accelerated proximal
// gradient, which needs more iterations, at n = 20000), where one trial sits within a few
// percent of the prediction (common practice: the finite-size spread shrinks like 1/sqrt(n)).
func TestLargeInstanceFastFactors(t *testing.T) {
	if testing.Short() {
		t.Skip("n = 100000 takes several seconds")
	}
	d, de := design.UniformSV(0.5, 0.5, 1.5, design.Rows)
	lasso, le := penalty.L1(0.05)
	p := problem(t, d, de, lasso, le, false)
	for _, c := range []struct {
		s Solver
		n int
	}{{SolverVAMP, 100000}, {SolverProx, 20000}} {
		s := c.s
		rep, err := Check(context.Background(), p, Options{N: c.n, Trials: 1, Seed: 9, Solver: s}, nil)
		if err != nil {
			t.Fatal(err)
		}
		tr := rep.PerTrial[0]
		t.Logf("%v: mse %.6f predicted %.6f, %d iterations, %.2fs", s, tr.MSE, rep.Predicted.MSE, tr.Iterations, tr.Seconds)
		if !tr.Converged || !within(tr.MSE, 0, rep.Predicted.MSE, 0.03, 0) {
			t.Errorf("%v: mse %.6f (converged %v), predicted %.6f", s, tr.MSE, tr.Converged, rep.Predicted.MSE)
		}
	}
}
