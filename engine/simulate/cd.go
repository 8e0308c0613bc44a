package simulate

import (
	"context"
	"math"
)

// CoordinateDescent minimizes 1/2 ||y - F x||^2 + l1 ||x||_1 + (l2/2) ||x||^2 by cyclic
// coordinate descent with an active set and a warm start (Friedman, Hastie & Tibshirani 2010,
// "Regularization paths for generalized linear models via coordinate descent", J. Stat. Softw.
// 33(1)): after a sweep over all coordinates it sweeps the nonzero ones until they settle, then
// checks the duality gap, and goes back to a full sweep if the gap is still too large. It stops
// when the gap is at most Tol ||y||^2 (CriterionGap), the rule scikit-learn uses for the same
// problem. warm may be nil (start at zero); it is not modified.
//
// Domain: l1 >= 0, l2 >= 0, len(y) = F.Rows, len(warm) = F.Cols when warm is given.
// Special cases are: y = 0 returns x = 0 at once; a zero column keeps its coefficient at 0;
// l1 = l2 = 0 is least squares, whose only feasible dual point is 0, so the gap is
// 1/2 ||y - F x||^2 and converges only when y lies in the range of F (otherwise the solver
// reports that it reached MaxIter).
func CoordinateDescent(ctx context.Context, f *Matrix, y []float64, l1, l2 float64, warm []float64, o SolverOptions) (Solution, error) {
	m, n := f.Dims()
	if len(y) != m {
		return Solution{}, paramErr("y", "length %d, want %d rows", len(y), m)
	}
	if warm != nil && len(warm) != n {
		return Solution{}, paramErr("warm", "length %d, want %d columns", len(warm), n)
	}
	if !(l1 >= 0) || !(l2 >= 0) || math.IsInf(l1, 0) || math.IsInf(l2, 0) {
		return Solution{}, paramErr("penalty", "l1 = %g and l2 = %g must be finite and >= 0", l1, l2)
	}
	o = o.withDefaults()
	sol := Solution{X: make([]float64, n), Criterion: CriterionGap, Tol: o.Tol}
	x := sol.X
	if warm != nil {
		copy(x, warm)
	}
	yy := dot(y, y)
	if yy == 0 {
		clear(x)
		sol.Converged = true
		return sol, nil
	}
	norm := make([]float64, n)
	for j := range norm {
		c := f.Col(j)
		norm[j] = dot(c, c)
	}
	r := make([]float64, m)
	copy(r, y)
	for j, xj := range x {
		if xj != 0 {
			axpy(-xj, f.Col(j), r)
		}
	}
	tol := o.Tol * yy
	active := make([]int, 0, n)
	xtr := make([]float64, n)

	// update does one coordinate step and returns the decrease of the objective it made,
	// (norm_j + l2)/2 (x_new - x_old)^2 up to the l1 term; the sweeps stop when the whole sweep
	// decreases the objective by a small fraction of the tolerance.
	update := func(j int) float64 {
		nj := norm[j]
		if nj == 0 {
			x[j] = 0
			return 0
		}
		c := f.Col(j)
		old := x[j]
		rho := dot(c, r) + nj*old
		var nw float64
		switch {
		case rho > l1:
			nw = (rho - l1) / (nj + l2)
		case rho < -l1:
			nw = (rho + l1) / (nj + l2)
		}
		if nw == old {
			return 0
		}
		axpy(old-nw, c, r)
		x[j] = nw
		d := nw - old
		return 0.5 * (nj + l2) * d * d
	}

	inner := 0.1 * tol
	for sol.Iterations < o.MaxIter {
		if cancelled(ctx) {
			break
		}
		sol.Iterations++
		active = active[:0]
		for j := 0; j < n; j++ {
			update(j)
			if x[j] != 0 {
				active = append(active, j)
			}
		}
		for sol.Iterations < o.MaxIter {
			sol.Iterations++
			dec := 0.0
			for _, j := range active {
				dec += update(j)
			}
			if dec <= inner {
				break
			}
		}
		sol.Residual = enetGap(f, y, x, r, xtr, l1, l2) / yy
		if sol.Residual <= o.Tol {
			sol.Converged = true
			return sol, nil
		}
		inner *= 0.1
	}
	sol.Residual = enetGap(f, y, x, r, xtr, l1, l2) / yy
	sol.Converged = sol.Residual <= o.Tol
	return sol, nil
}

// enetGap returns the duality gap P(x) - D(theta) of the elastic net at x with residual
// r = y - F x. For l2 > 0 the dual point is theta = r and the conjugate of the penalty is
// sum soft(v, l1)^2 / (2 l2); for l2 = 0 theta = c r with c = min(1, l1 / ||F^T r||_inf),
// which is feasible (the form scikit-learn's coordinate descent uses).
func enetGap(f *Matrix, y, x, r, xtr []float64, l1, l2 float64) float64 {
	f.MulT(xtr, r)
	rr := dot(r, r)
	ry := dot(r, y)
	l1norm, xx := 0.0, 0.0
	for _, v := range x {
		l1norm += math.Abs(v)
		xx += v * v
	}
	primal := 0.5*rr + l1*l1norm + 0.5*l2*xx
	if l2 > 0 {
		conj := 0.0
		for _, v := range xtr {
			if a := math.Abs(v) - l1; a > 0 {
				conj += a * a
			}
		}
		return math.Max(0, primal-(ry-0.5*rr-conj/(2*l2)))
	}
	c := 1.0
	if d := maxAbs(xtr); d > l1 {
		c = l1 / d
	}
	return math.Max(0, primal-(c*ry-0.5*c*c*rr))
}
