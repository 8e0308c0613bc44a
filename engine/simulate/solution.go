package simulate

import (
	"context"
	"math"
)

// SolverOptions set the stopping rule of a solver.
type SolverOptions struct {
	// Tol is the tolerance of the stated criterion (duality gap / ||y||^2 for coordinate
	// descent, the relative KKT residual for the others). Zero means DefaultTol.
	Tol float64
	// MaxIter caps the iterations (sweeps for coordinate descent). Zero means DefaultMaxIter.
	MaxIter int
}

// DefaultTol and DefaultMaxIter are the stopping rule when SolverOptions leaves them zero.
const (
	DefaultTol     = 1e-8
	DefaultMaxIter = 10000
)

func (o SolverOptions) withDefaults() SolverOptions {
	if !(o.Tol > 0) {
		o.Tol = DefaultTol
	}
	if o.MaxIter <= 0 {
		o.MaxIter = DefaultMaxIter
	}
	return o
}

// Criteria stated in a Solution.
const (
	// CriterionGap: the duality gap of the elastic net (Friedman, Hastie & Tibshirani 2010),
	// divided by ||y||^2, is at most Tol.
	CriterionGap = "duality gap / ||y||^2"
	// CriterionKKT: max_i |L (x_i - prox(x_i - grad_i / L; L))| / max_i |(F^T y)_i| is at most Tol,
	// with grad = F^T (F x - y) and L the largest eigenvalue of F^T F: the scaled gradient mapping,
	// zero exactly at a minimizer (Beck & Teboulle 2009).
	CriterionKKT = "relative KKT residual"
)

// Solution is the result of a solver, with the stopping rule it met or failed to meet.
type Solution struct {
	X          []float64
	Iterations int
	// Converged is false when the solver stopped at MaxIter (or was cancelled) before its
	// criterion fell below Tol; X is then the last iterate and must not be taken as the estimate.
	Converged bool
	Criterion string
	Residual  float64 // the criterion's value at X
	Tol       float64
}

// kktResidual returns the relative KKT residual of x (see CriterionKKT), given grad = F^T(Fx - y)
// and scale = max |F^T y|.
func kktResidual(x, grad []float64, prox func(r, g float64) float64, lip, scale float64) float64 {
	worst := 0.0
	for i, xi := range x {
		step := lip * (xi - prox(xi-grad[i]/lip, lip))
		worst = math.Max(worst, math.Abs(step))
	}
	if !(scale > 0) {
		scale = 1
	}
	return worst / scale
}

func cancelled(ctx context.Context) bool {
	if ctx == nil {
		return false
	}
	select {
	case <-ctx.Done():
		return true
	default:
		return false
	}
}

func maxAbs(x []float64) float64 {
	m := 0.0
	for _, v := range x {
		m = math.Max(m, math.Abs(v))
	}
	return m
}
