package simulate

import (
	"context"
	"math"
	"math/rand/v2"

	"hdrisk/engine/penalty"
)

// ProxGradient minimizes 1/2 ||y - F x||^2 + sum_i f(x_i) for any penalty with a prox by
// accelerated proximal gradient (FISTA: Beck & Teboulle 2009, "A fast iterative
// shrinkage-thresholding algorithm for linear inverse problems", SIAM J. Imaging Sci. 2(1)),
// with the gradient restart of O'Donoghue & Candes 2015 ("Adaptive restart for accelerated
// gradient schemes", Found. Comput. Math. 15), which keeps the linear rate on the strongly convex
// pieces that sparse solutions leave. Each iteration costs one product with F and one with F^T.
// It stops on the relative KKT residual (CriterionKKT), checked every few iterations.
//
// lip is the largest eigenvalue of F^T F (the Lipschitz constant of the gradient); lip <= 0
// estimates it by power iteration. warm may be nil.
// Special cases are: F^T y = 0 with a prox that keeps 0 stops at x = 0 at once.
func ProxGradient(ctx context.Context, f Operator, y []float64, p penalty.Penalty, lip float64, warm []float64, o SolverOptions) (Solution, error) {
	m, n := f.Dims()
	if len(y) != m {
		return Solution{}, paramErr("y", "length %d, want %d rows", len(y), m)
	}
	if warm != nil && len(warm) != n {
		return Solution{}, paramErr("warm", "length %d, want %d columns", len(warm), n)
	}
	if p == nil {
		return Solution{}, paramErr("penalty", "missing")
	}
	o = o.withDefaults()
	if !(lip > 0) {
		lip = powerLipschitz(f)
	}
	if !(lip > 0) || math.IsInf(lip, 0) {
		return Solution{}, paramErr("design", "largest eigenvalue of F^T F is %g; need a finite positive value", lip)
	}
	sol := Solution{X: make([]float64, n), Criterion: CriterionKKT, Tol: o.Tol}
	x := sol.X
	if warm != nil {
		copy(x, warm)
	}
	fty := make([]float64, n)
	f.MulT(fty, y)
	scale := maxAbs(fty)
	z := append([]float64(nil), x...)
	xn := make([]float64, n)
	grad := make([]float64, n)
	res := make([]float64, m)
	gradient := func(at []float64) {
		f.Mul(res, at)
		f.MulT(grad, res)
		for i := range grad {
			grad[i] -= fty[i]
		}
	}
	// A piecewise-linear prox (l1, elastic net, box...) is built once for the step 1/lip
	// rather than once a coordinate.
	prox := p.Prox
	if lf, ok := p.(penalty.LinearForm); ok {
		if l, ok := lf.Linear(lip); ok {
			prox = func(r, _ float64) float64 { return l.Prox(r) }
		}
	}
	const every = 5
	t := 1.0
	for sol.Iterations < o.MaxIter {
		if sol.Iterations%every == 0 {
			if cancelled(ctx) {
				break
			}
			gradient(x)
			sol.Residual = kktResidual(x, grad, prox, lip, scale)
			if sol.Residual <= o.Tol {
				sol.Converged = true
				return sol, nil
			}
		}
		sol.Iterations++
		gradient(z)
		restart := 0.0
		for i := range xn {
			xn[i] = prox(z[i]-grad[i]/lip, lip)
			restart += (z[i] - xn[i]) * (xn[i] - x[i])
		}
		if restart > 0 {
			t = 1
		}
		tn := (1 + math.Sqrt(1+4*t*t)) / 2
		beta := (t - 1) / tn
		for i := range z {
			z[i] = xn[i] + beta*(xn[i]-x[i])
		}
		copy(x, xn)
		t = tn
	}
	gradient(x)
	sol.Residual = kktResidual(x, grad, prox, lip, scale)
	sol.Converged = sol.Residual <= o.Tol
	return sol, nil
}

// powerLipschitz estimates the largest eigenvalue of F^T F by power iteration from a fixed
// random start, enlarged by 2% so that the step 1/L stays safe.
func powerLipschitz(f Operator) float64 {
	m, n := f.Dims()
	v := normals(rand.New(rand.NewPCG(1, 1)), n)
	u := make([]float64, m)
	w := make([]float64, n)
	est := 0.0
	for k := 0; k < 100; k++ {
		nv := nrm2(v)
		if nv == 0 {
			return 0
		}
		for i := range v {
			v[i] /= nv
		}
		f.Mul(u, v)
		f.MulT(w, u)
		next := dot(v, w)
		v, w = w, v
		if math.Abs(next-est) <= 1e-6*next {
			est = next
			break
		}
		est = next
	}
	return 1.02 * est
}
