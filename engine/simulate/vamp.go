package simulate

import (
	"context"
	"math"

	"hdrisk/engine/penalty"
)

// VAMPOptions set vector approximate message passing.
type VAMPOptions struct {
	SolverOptions
	// Gamma2 is the first precision of the linear step, > 0 (the fixed point's g2 is a good
	// start). Zero means 1.
	Gamma2 float64
	// Truth, when given (length n), makes the solver record (1/n)||x1 - Truth||^2 at every
	// iteration, to set beside the state-evolution prediction.
	Truth []float64
}

// VAMPResult is the estimate of VAMP with the per-iteration error of its denoiser output.
type VAMPResult struct {
	Solution
	// Errors[t] is (1/n)||x1_t - Truth||^2 after iteration t+1 (empty without Truth).
	Errors []float64
	// Gamma1[t] and Gamma2[t] are the precisions used by the denoiser and the linear step at
	// iteration t+1, for the state evolution.
	Gamma1, Gamma2 []float64
}

// kktEvery spaces the KKT checks of VAMP, which cost as much as an iteration.
const kktEvery = 4

// VAMP runs vector approximate message passing in its MAP form with the prox of the penalty as
// the denoiser and the design's singular value decomposition for the linear step (Rangan,
// Schniter & Fletcher 2019, "Vector approximate message passing", IEEE Trans. Inf. Theory 65,
// Algorithm 1 with the SVD form of section IV). Its fixed points are the minimizers of
// 1/2 ||y - F x||^2 + sum f(x_i); for a rotationally invariant F its per-iteration error follows
// the state evolution of docs/method.md section 3. It starts from r2 = 0 and precision Gamma2, and
// stops on the relative KKT residual of the denoiser output x1 (CriterionKKT), checked every
// kktEvery iterations. An iteration costs two products with V, and a check two more.
//
// Special cases are: when the denoiser's average derivative reaches 0 (every coordinate in the
// zero region) or 1 (no regularization), the message precisions degenerate; VAMP then stops
// and reports the KKT residual of the last x1, converged or not.
func VAMP(ctx context.Context, f *SVD, y []float64, p penalty.Penalty, o VAMPOptions) (VAMPResult, error) {
	m, n := f.Dims()
	if len(y) != m {
		return VAMPResult{}, paramErr("y", "length %d, want %d rows", len(y), m)
	}
	if o.Truth != nil && len(o.Truth) != n {
		return VAMPResult{}, paramErr("truth", "length %d, want %d columns", len(o.Truth), n)
	}
	if p == nil {
		return VAMPResult{}, paramErr("penalty", "missing")
	}
	o.SolverOptions = o.SolverOptions.withDefaults()
	g2 := o.Gamma2
	if g2 == 0 {
		g2 = 1
	}
	if !(g2 > 0) || math.IsInf(g2, 0) {
		return VAMPResult{}, paramErr("gamma2", "%g must be finite and positive", g2)
	}
	d := make([]float64, n) // eigenvalues of F^T F in V coordinates
	c := make([]float64, n) // S^T U^T y
	bm := make([]float64, m)
	f.U.MulT(bm, y)
	for i, s := range f.S {
		d[i] = s * s
		c[i] = s * bm[i]
	}
	lip := maxAbs(d)
	fty := make([]float64, n)
	f.V.Mul(fty, c)
	scale := maxAbs(fty)

	out := VAMPResult{Solution: Solution{X: make([]float64, n), Criterion: CriterionKKT, Tol: o.Tol}}
	x1 := out.X
	r1 := make([]float64, n)
	r2 := make([]float64, n)
	q := make([]float64, n)
	x2 := make([]float64, n)
	grad := make([]float64, n)
	kkt := func() float64 {
		if !(lip > 0) {
			return math.Inf(1)
		}
		f.V.MulT(q, x1)
		for i := range q {
			q[i] = d[i]*q[i] - c[i]
		}
		f.V.Mul(grad, q)
		return kktResidual(x1, grad, p.Prox, lip, scale)
	}
	nf := float64(n)
	for out.Iterations < o.MaxIter {
		if cancelled(ctx) {
			break
		}
		out.Iterations++
		// Linear step: x2 = (F^T F + g2)^-1 (F^T y + g2 r2); a2 = g2 E[1/(d + g2)].
		f.V.MulT(q, r2)
		s1, tt := 0.0, 0.0
		for i := range q {
			q[i] = (c[i] + g2*q[i]) / (d[i] + g2)
			s1 += 1 / (d[i] + g2)
			tt += d[i] / (d[i] + g2)
		}
		f.V.Mul(x2, q)
		a2 := g2 * s1 / nf
		oneMinusA2 := tt / nf
		g1 := tt / s1 // g2 (1 - a2) / a2 without the subtraction
		if !(oneMinusA2 > 0) || !(g1 > 0) {
			break
		}
		for i := range r1 {
			r1[i] = (x2[i] - a2*r2[i]) / oneMinusA2
		}
		// Denoiser: x1 = prox(r1; g1), a1 = E[prox'].
		a1 := 0.0
		for i, r := range r1 {
			x1[i] = p.Prox(r, g1)
			a1 += p.Deriv(r, g1)
		}
		a1 /= nf
		out.Gamma1 = append(out.Gamma1, g1)
		out.Gamma2 = append(out.Gamma2, g2)
		if o.Truth != nil {
			e := 0.0
			for i, v := range x1 {
				e += sq(v - o.Truth[i])
			}
			out.Errors = append(out.Errors, e/nf)
		}
		if out.Iterations%kktEvery == 0 {
			out.Residual = kkt()
			if out.Residual <= o.Tol {
				out.Converged = true
				return out, nil
			}
		}
		if !(a1 > 0) || !(a1 < 1) {
			break
		}
		g2 = g1 * (1 - a1) / a1
		for i := range r2 {
			r2[i] = (x1[i] - a1*r1[i]) / (1 - a1)
		}
	}
	out.Residual = kkt()
	out.Converged = out.Residual <= o.Tol
	return out, nil
}
