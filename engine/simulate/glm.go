package simulate

import (
	"context"
	"math"
	"math/rand/v2"
	"time"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/loss"
	"hdrisk/engine/noise"
	"hdrisk/engine/penalty"
	"hdrisk/engine/readout"
	"hdrisk/engine/signal"
)

// DrawGLM draws an instance of a generalized linear model (docs/method.md section 10): x0 and F as
// Draw draws them, then y_mu = readout((F x0)_mu, w_mu) with w from the noise law (nil: no
// noise) and the logistic readout's labels from rng.
func DrawGLM(rng *rand.Rand, d DesignDraw, sig signal.Law, w noise.Law, rd readout.Readout, n int) (*Instance, error) {
	if rd == nil {
		return nil, paramErr("readout", "missing")
	}
	inst, err := Draw(rng, d, sig, 0, n)
	if err != nil {
		return nil, err
	}
	ws := make([]float64, inst.M)
	if w != nil {
		ws = w.Sample(rng, inst.M)
	}
	inst.Y = readout.Draw(rd, inst.Y, ws, rng)
	return inst, nil
}

// PrimalDual minimizes sum_mu L(y_mu, (F x)_mu) + sum_i f(x_i) for any loss and penalty with
// a prox, by the primal-dual proximal splitting of Chambolle & Pock 2011 ("A first-order
// primal-dual algorithm for convex problems with applications to imaging", J. Math. Imaging
// Vis. 40), which needs only products with F and F^T, the penalty's prox and the loss's (the
// dual step is prox of sigma L*, by Moreau's identity v - sigma zhat(y, v/sigma; sigma)):
//
//	u   <- prox_{sigma L*}(u + sigma F xbar)
//	x+  <- prox_{tau f}(x - tau F^T u),   xbar = 2 x+ - x,   sigma tau ||F||^2 = 0.98.
//
// It stops when the relative change of (x, u) per iteration, scaled by the steps, falls below
// Tol, checked every few iterations. lip is the largest eigenvalue of F^T F (<= 0: estimated
// by power iteration); warm may be nil.
func PrimalDual(ctx context.Context, f Operator, y []float64, ls loss.Loss, p penalty.Penalty, lip float64, warm []float64, o SolverOptions) (Solution, error) {
	m, n := f.Dims()
	if len(y) != m {
		return Solution{}, paramErr("y", "length %d, want %d rows", len(y), m)
	}
	if warm != nil && len(warm) != n {
		return Solution{}, paramErr("warm", "length %d, want %d columns", len(warm), n)
	}
	if p == nil || ls == nil {
		return Solution{}, paramErr("penalty", "missing penalty or loss")
	}
	o = o.withDefaults()
	if !(lip > 0) {
		lip = powerLipschitz(f)
	}
	if !(lip > 0) || math.IsInf(lip, 0) {
		return Solution{}, paramErr("design", "largest eigenvalue of F^T F is %g; need a finite positive value", lip)
	}
	step := math.Sqrt(0.98 / lip)
	sigma, tau := step, step
	sol := Solution{X: make([]float64, n), Criterion: "primal-dual change", Tol: o.Tol}
	x := sol.X
	if warm != nil {
		copy(x, warm)
	}
	xbar := append([]float64(nil), x...)
	u := make([]float64, m)
	fx := make([]float64, m)
	ftu := make([]float64, n)
	xn := make([]float64, n)
	for sol.Iterations < o.MaxIter {
		if sol.Iterations%10 == 0 && cancelled(ctx) {
			break
		}
		sol.Iterations++
		f.Mul(fx, xbar)
		du, un := 0.0, 0.0
		for i := range u {
			v := u[i] + sigma*fx[i]
			zh, _ := ls.Prox(y[i], v/sigma, sigma)
			nu := v - sigma*zh
			du += (nu - u[i]) * (nu - u[i])
			un += nu * nu
			u[i] = nu
		}
		f.MulT(ftu, u)
		dx, xx := 0.0, 0.0
		for i := range x {
			xn[i] = p.Prox(x[i]-tau*ftu[i], 1/tau)
			d := xn[i] - x[i]
			dx += d * d
			xx += xn[i] * xn[i]
			xbar[i] = xn[i] + d
			x[i] = xn[i]
		}
		sol.Residual = math.Sqrt(dx/tau/tau+du/sigma/sigma) / math.Max(math.Sqrt(xx/tau/tau+un/sigma/sigma), 1e-300)
		if sol.Residual <= o.Tol {
			sol.Converged = true
			return sol, nil
		}
	}
	return sol, nil
}

// GLMTrial is the outcome of one finite instance of a generalized linear model. TestError is
// measured on fresh rows (see TestErrorGLM) for a readout that gives labels, NaN otherwise.
type GLMTrial struct {
	MSE, Cosine, NormRatio float64
	TestError              float64
	Converged              bool
	Iterations             int
	Residual               float64 // the primal-dual stopping criterion at the solution
	Seconds                float64 // the time the trial took, drawing included (set by TrialsGLM)
}

// TrialsGLM runs trials first, ..., first+count-1 of the finite-size check of the generalized
// model g with n unknowns: trial t draws from PCG(seed, t), so that a check shared out in parts
// gives the trials of one run, and is solved by TrialGLM. progress, when not nil, is called
// with (trials done, count) after each.
func TrialsGLM(ctx context.Context, d DesignDraw, g fixedpoint.GLM, n, first, count int, seed uint64, o SolverOptions, progress func(done, total int)) ([]GLMTrial, error) {
	out := make([]GLMTrial, 0, count)
	for t := range count {
		rng := rand.New(rand.NewPCG(seed, uint64(first+t)))
		t0 := time.Now()
		tr, err := TrialGLM(ctx, rng, d, g.Signal, g.Noise, g.Readout, g.Loss, g.Penalty, n, o)
		if err != nil {
			return nil, err
		}
		tr.Seconds = time.Since(t0).Seconds()
		out = append(out, tr)
		if progress != nil {
			progress(t+1, count)
		}
	}
	return out, nil
}

// TrialGLM draws one instance with n unknowns and solves it with PrimalDual.
func TrialGLM(ctx context.Context, rng *rand.Rand, d DesignDraw, sig signal.Law, w noise.Law, rd readout.Readout, ls loss.Loss, p penalty.Penalty, n int, o SolverOptions) (GLMTrial, error) {
	inst, err := DrawGLM(rng, d, sig, w, rd, n)
	if err != nil {
		return GLMTrial{}, err
	}
	var f Operator = inst.SVD
	if inst.Dense != nil {
		f = inst.Dense
	}
	sol, err := PrimalDual(ctx, f, inst.Y, ls, p, 0, nil, o)
	if err != nil {
		return GLMTrial{}, err
	}
	var e, xx, x0x0, xx0 float64
	for i, xh := range sol.X {
		d := xh - inst.X0[i]
		e += d * d
		xx += xh * xh
		x0x0 += inst.X0[i] * inst.X0[i]
		xx0 += xh * inst.X0[i]
	}
	t := GLMTrial{MSE: e / float64(n), Converged: sol.Converged, TestError: math.NaN(), Iterations: sol.Iterations, Residual: sol.Residual}
	if xx > 0 && x0x0 > 0 {
		t.Cosine = xx0 / math.Sqrt(xx*x0x0)
		t.NormRatio = math.Sqrt(xx / x0x0)
	}
	if rd.Labels() {
		// Drawn after the solve, so that the instance and its solution are those of a trial
		// without the test rows.
		if t.TestError, err = TestErrorGLM(rng, d, sig, w, rd, inst.X0, sol.X); err != nil {
			return GLMTrial{}, err
		}
	}
	return t, nil
}

// TestErrorGLM is the test error of the estimate xhat of x0 measured on fresh rows: the m
// rows of a fresh design drawn as the instance's was (docs/method.md sections 8 and 10.4), each with its
// fresh noise and label y = readout(a . x0 + w), counted wrong when the sign of a . xhat differs
// from the label's (a tie, a . xhat = 0, counts one half). This is the finite-size version of
// the observable test_error.
func TestErrorGLM(rng *rand.Rand, d DesignDraw, sig signal.Law, w noise.Law, rd readout.Readout, x0, xhat []float64) (float64, error) {
	fresh, err := Draw(rng, d, sig, 0, len(x0))
	if err != nil {
		return 0, err
	}
	var f Operator = fresh.SVD
	if fresh.Dense != nil {
		f = fresh.Dense
	}
	z, zh := make([]float64, fresh.M), make([]float64, fresh.M)
	f.Mul(z, x0)
	f.Mul(zh, xhat)
	ws := make([]float64, fresh.M)
	if w != nil {
		ws = w.Sample(rng, fresh.M)
	}
	y := readout.Draw(rd, z, ws, rng)
	wrong := 0.0
	for i := range y {
		switch {
		case zh[i] == 0:
			wrong += 0.5
		case (zh[i] > 0) != (y[i] > 0):
			wrong++
		}
	}
	return wrong / float64(len(y)), nil
}
