package study

import (
	"context"
	"encoding/json"
	"math"
	"testing"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

func mmseOf(t *testing.T, comps []signal.Component, tv float64) float64 {
	t.Helper()
	m, err := newMixtureMMSE(comps)
	if err != nil {
		t.Fatal(err)
	}
	e, gain := m.at(tv)
	if d := math.Abs(gain - (1 - e/tv)); d > 1e-12 {
		t.Errorf("t = %v: 1 - mmse/t is %.15g by the cancellation-free form, %.15g directly", tv, gain, 1-e/tv)
	}
	return e
}

// simpson integrates f over [a, b] with n (even) intervals.
func simpson(f func(float64) float64, a, b float64, n int) float64 {
	h := (b - a) / float64(n)
	s := f(a) + f(b)
	for i := 1; i < n; i++ {
		w := 2.0
		if i%2 == 1 {
			w = 4
		}
		s += w * f(a+float64(i)*h)
	}
	return s * h / 3
}

// The minimum mean-square error of a Gaussian prior N(m, s2) in noise of variance t is
// s2 t/(s2 + t) (common practice); a mixture of identical components is the same law.
func TestMixtureMMSEGaussian(t *testing.T) {
	for _, tv := range []float64{1e-6, 0.1, 1, 30} {
		want := 2 * tv / (2 + tv)
		if got := mmseOf(t, []signal.Component{{Weight: 1, Mean: 0.3, Var: 2}}, tv); relDiff(got, want) > 1e-14 {
			t.Errorf("t = %v: %v, want %v", tv, got, want)
		}
		split := []signal.Component{{Weight: 0.4, Mean: 0.3, Var: 2}, {Weight: 0.6, Mean: 0.3, Var: 2}}
		if got := mmseOf(t, split, tv); relDiff(got, want) > 1e-12 {
			t.Errorf("t = %v, split in two: %v, want %v", tv, got, want)
		}
	}
}

// Binary inputs +-1: mmse(snr) = 1 - E[tanh(snr + sqrt(snr) z)] (Guo, Shamai & Verdu 2005,
// "Mutual information and minimum mean-square error in Gaussian channels", IEEE Trans. Inf.
// Theory, eq. 17), integrated here by Simpson's rule in z with 1 - tanh(x) = 2/(exp(2x) + 1).
func TestMixtureMMSEBinary(t *testing.T) {
	comps := []signal.Component{{Weight: 0.5, Mean: -1}, {Weight: 0.5, Mean: 1}}
	for _, snr := range []float64{0.05, 0.5, 1, 4, 10, 30} {
		want := simpson(func(z float64) float64 {
			x := snr + math.Sqrt(snr)*z
			return 2 / (math.Exp(2*x) + 1) * math.Exp(-z*z/2) / math.Sqrt(2*math.Pi)
		}, -20, 20, 400000)
		got := mmseOf(t, comps, 1/snr)
		if d := relDiff(got, want); d > 1e-9 {
			t.Errorf("snr = %v: mmse %.14g, Guo-Shamai-Verdu %.14g (rel %.2g)", snr, got, want, d)
		}
	}
}

// Bernoulli-Gaussian: the mixing-term form against the textbook form rho2 - E[E[x0|r]^2],
// with the posterior mean written out and integrated by Simpson's rule (common practice).
func TestMixtureMMSEBernoulliGauss(t *testing.T) {
	const eps, v = 0.1, 1.0
	comps := []signal.Component{{Weight: 1 - eps}, {Weight: eps, Var: v}}
	for _, tv := range []float64{0.003, 0.03, 0.3, 3} {
		norm := func(r, s float64) float64 { return math.Exp(-r*r/(2*s)) / math.Sqrt(2*math.Pi*s) }
		ex2 := simpson(func(r float64) float64 {
			q0, q1 := (1-eps)*norm(r, tv), eps*norm(r, v+tv)
			xhat := q1 / (q0 + q1) * v / (v + tv) * r
			return (q0 + q1) * xhat * xhat
		}, -30, 30, 600000)
		want := eps*v - ex2
		if d := relDiff(mmseOf(t, comps, tv), want); d > 1e-8 {
			t.Errorf("t = %v: mmse %.12g, textbook form %.12g (rel %.2g)", tv, mmseOf(t, comps, tv), want, d)
		}
	}
}

// Ridge with l2 = Delta/rho2 is the posterior mean for a Gaussian prior, and its error has a
// closed form for a Gaussian design in the columns scale: rho2 (1 - F(x, b)/(4 b x)) with
// x = rho2/Delta, b = n/m, F(x, z) = (sqrt(x(1 + sqrt z)^2 + 1) - sqrt(x(1 - sqrt z)^2 + 1))^2
// (Tulino & Verdu 2004, Random Matrix Theory and Wireless Communications, eq. 2.121; from
// memory, its scaling confirmed in the fixedpoint tests).
func TestBayesGaussianClosedForm(t *testing.T) {
	tvF := func(x, z float64) float64 {
		a := math.Sqrt(x*(1+math.Sqrt(z))*(1+math.Sqrt(z)) + 1)
		b := math.Sqrt(x*(1-math.Sqrt(z))*(1-math.Sqrt(z)) + 1)
		return (a - b) * (a - b)
	}
	for _, c := range []struct{ alpha, rho2, delta float64 }{{0.5, 1, 0.1}, {1, 2, 0.05}, {2.5, 0.7, 1}, {0.3, 1, 1e-3}} {
		p, err := scen(t, gaussDesign(c.alpha, "columns"), gaussSignal(c.rho2), c.delta, ridge(1)).Problem()
		if err != nil {
			t.Fatal(err)
		}
		b, err := Bayes(p)
		if err != nil {
			t.Fatal(err)
		}
		x, beta := c.rho2/c.delta, 1/c.alpha
		want := c.rho2 * (1 - tvF(x, beta)/(4*beta*x))
		if d := relDiff(b.Uninformed.MSE, want); d > 1e-9 || b.Differ {
			t.Errorf("%+v: Bayes MSE %.14g, Tulino-Verdu %.14g (rel %.2g), differ %v", c, b.Uninformed.MSE, want, d, b.Differ)
		}
	}
}

// No convex estimator beats the Bayes reference (docs/method.md section 4): the best LASSO error is
// at or above the uninformed Bayes error, which is at or above the informed one.
func TestBayesBelowBestLasso(t *testing.T) {
	for _, c := range []struct {
		design, sig string
		delta       float64
	}{
		{gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01},
		{gaussDesign(0.3, "rows"), bgSignal(0.05, 2), 0.1},
		{orthoDesign(0.5, "rows"), bgSignal(0.2, 1), 0.001},
		{gaussDesign(1.5, "columns"), `{"law": "bernoulli-rademacher", "density": 0.3, "amplitude": 1}`, 0.05},
		{orthoDesign(0.6, "rows"), `{"law": "gauss-mixture", "weights": [0.7, 0.2, 0.1], "means": [0, 1, -2], "variances": [0.01, 0.5, 0.1]}`, 0.02},
	} {
		s := scen(t, c.design, c.sig, c.delta, lasso(0.1))
		best, err := Best(context.Background(), s, BestSpec{})
		if err != nil {
			t.Fatal(err)
		}
		p, _ := s.Problem()
		b, err := Bayes(p)
		if err != nil {
			t.Fatal(err)
		}
		if !b.Uninformed.Converged || !b.Informed.Converged {
			t.Fatalf("%s: Bayes did not converge: %+v", c.sig, b)
		}
		if !(b.Uninformed.MSE <= best.MSE) || !(b.Informed.MSE <= b.Uninformed.MSE*(1+1e-9)) {
			t.Errorf("%s, %s: best LASSO %.6g, Bayes uninformed %.6g, informed %.6g", c.design, c.sig, best.MSE, b.Uninformed.MSE, b.Informed.MSE)
		}
	}
}

// Noiseless Bernoulli-Gaussian signal of density 0.1, Gaussian design. Exact recovery is
// possible exactly when alpha exceeds the density (Wu & Verdu 2010, "Renyi information
// dimension: fundamental limits of almost lossless analog compression", IEEE Trans. Inf.
// Theory): the informed start recovers above it and not below. Between that and the
// algorithm's own threshold the uninformed start stays at a positive error: a first-order
// transition, which Bayes reports. Far above, both recover; and the LASSO, whose
// Donoho-Tanner threshold at this density lies near alpha = 0.33, still fails at 0.3.
func TestBayesFirstOrderTransition(t *testing.T) {
	run := func(alpha, delta float64) BayesResult {
		p, err := scen(t, gaussDesign(alpha, "columns"), bgSignal(0.1, 1), delta, lasso(1)).Problem()
		if err != nil {
			t.Fatal(err)
		}
		b, err := Bayes(p)
		if err != nil {
			t.Fatal(err)
		}
		if !b.Uninformed.Converged || !b.Informed.Converged {
			t.Fatalf("alpha = %v: %+v", alpha, b)
		}
		return b
	}
	if b := run(0.09, 0); b.Informed.Exact || b.Differ || b.Informed.NMSE < 0.1 {
		t.Errorf("alpha 0.09 < density: %+v", b)
	}
	if b := run(0.11, 0); !b.Informed.Exact || !b.Differ || b.Uninformed.NMSE < 0.1 {
		t.Errorf("alpha 0.11 > density: %+v", b)
	}
	if b := run(0.15, 1e-8); !b.Differ || b.Informed.NMSE > 1e-6 || b.Uninformed.NMSE < 0.1 {
		t.Errorf("alpha 0.15, small noise: %+v", b)
	}
	if b := run(0.3, 0); !b.Uninformed.Exact || b.Differ {
		t.Errorf("alpha 0.3: %+v", b)
	}
	if dc := dtEps(0.3); dc > 0.1 {
		t.Errorf("the Donoho-Tanner density at alpha 0.3 is %v, above 0.1", dc)
	}
	// Delta -> 0 meets the noiseless limit.
	if z, e := run(0.08, 0), run(0.08, 1e-12); relDiff(e.Uninformed.MSE, z.Uninformed.MSE) > 1e-6 {
		t.Errorf("alpha 0.08: MSE %.10g at Delta = 1e-12, %.10g at Delta = 0", e.Uninformed.MSE, z.Uninformed.MSE)
	}
}

// The Bayes reference covers the laws whose mixture is a discretization, numerically: for
// Laplace, Student-t and uniform signals (and a mixture of 100 components) it exists, and the
// posterior mean's error lies below that of every other estimator, here the best LASSO of a
// grid (the defining property of the minimum mean-square error, common practice).
func TestBayesNumericalPosterior(t *testing.T) {
	w, m, v := make([]float64, 100), make([]float64, 100), make([]float64, 100)
	for i := range w {
		w[i], m[i], v[i] = 0.01, float64(i%10)-4.5, 0.1
	}
	mix, _ := json.Marshal(map[string]any{"law": "gauss-mixture", "weights": w, "means": m, "variances": v})
	for _, sig := range []string{`{"law": "laplace", "scale": 1}`, `{"law": "student-t", "dof": 5, "scale": 1}`, `{"law": "uniform", "halfwidth": 2}`, string(mix)} {
		p, err := scen(t, gaussDesign(0.5, "rows"), sig, 0.1, lasso(1)).Problem()
		if err != nil {
			t.Fatal(err)
		}
		b, err := Bayes(p)
		if err != nil || !b.Uninformed.Converged {
			t.Fatalf("%s: %+v %v", sig, b, err)
		}
		best := math.Inf(1)
		for _, l1 := range []float64{0.01, 0.03, 0.1, 0.3, 1} {
			p.Penalty, _ = penalty.L1(l1)
			if r, err := fixedpoint.Solve(p, fixedpoint.Options{}); err == nil && r.Converged {
				best = math.Min(best, r.MSE)
			}
		}
		if !(b.Informed.MSE <= best) {
			t.Errorf("%s: Bayes MSE %v above the best LASSO %v", sig, b.Informed.MSE, best)
		}
	}
}

// The mixture MMSE of the uniform law's 64 atoms against the posterior of the uniform law
// itself: x0 | r is N(r, t) truncated to [-a, a], whose variance is t (1 + (A phi(A) - B phi(B))/Z
// - ((phi(A) - phi(B))/Z)^2), A = (-a - r)/sqrt t, B = (a - r)/sqrt t, Z = Phi(B) - Phi(A)
// (truncated normal moments; Johnson, Kotz & Balakrishnan 1994, Continuous Univariate
// Distributions 1, section 10.1), integrated over r by Simpson's rule with p(r) = Z/(2a).
func TestBayesUniformPosterior(t *testing.T) {
	const a = 2.0
	l, _ := signal.Uniform(a)
	for _, tv := range []float64{0.1, 1} {
		st := math.Sqrt(tv)
		phi := func(x float64) float64 { return math.Exp(-x*x/2) / math.Sqrt(2*math.Pi) }
		cdf := func(x float64) float64 { return math.Erfc(-x/math.Sqrt2) / 2 }
		want := simpson(func(r float64) float64 {
			A, B := (-a-r)/st, (a-r)/st
			z := cdf(B) - cdf(A)
			if z <= 0 {
				return 0
			}
			d := (phi(A) - phi(B)) / z
			return z / (2 * a) * tv * (1 + (A*phi(A)-B*phi(B))/z - d*d)
		}, -a-14*st, a+14*st, 20000)
		if got := mmseOf(t, l.Mixture(), tv); relDiff(got, want) > 1e-8 {
			t.Errorf("t = %v: mixture MMSE %.12g, truncated-normal integral %.12g", tv, got, want)
		}
	}
}

func TestBayesErrors(t *testing.T) {
	p, _ := scen(t, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.1, lasso(1)).Problem()
	for _, bad := range []fixedpoint.Problem{
		{Design: p.Design, Signal: p.Signal, Noise: -1},
		{Design: p.Design, Signal: p.Signal, Noise: math.NaN()},
		{Signal: p.Signal, Noise: 1},
	} {
		if _, err := Bayes(bad); err == nil {
			t.Errorf("%+v: no error", bad)
		}
	}
	// Noiseless with as many measurements as unknowns: exact at once.
	full, _ := scen(t, gaussDesign(1.2, "rows"), bgSignal(0.5, 1), 0, lasso(1)).Problem()
	if b, err := Bayes(full); err != nil || !b.Uninformed.Exact || !b.Informed.Exact {
		t.Errorf("alpha 1.2, noiseless: %+v, %v", b, err)
	}
}

// The case: a sparse +-1 signal at low noise, where the state evolution has several
// fixed points (gaussian design, density 0.15, noise 1e-4). Both starts converge; at m/n =
// 0.25 they differ (the algorithm's fixed point above the informed one, a first-order
// transition), at 0.5 both recover. Its time is a benchmark figure (BenchmarkBayes), not
// asserted here.
func TestBayesSparseLowNoise(t *testing.T) {
	for _, c := range []struct {
		alpha  float64
		differ bool
	}{{0.25, true}, {0.5, false}} {
		p, err := scen(t, gaussDesign(c.alpha, "rows"), `{"law": "bernoulli-rademacher", "density": 0.15, "amplitude": 1}`, 1e-4, ridge(0.1)).Problem()
		if err != nil {
			t.Fatal(err)
		}
		b, err := Bayes(p)
		if err != nil || !b.Uninformed.Converged || !b.Informed.Converged || b.Differ != c.differ {
			t.Errorf("alpha %v: %+v %v", c.alpha, b, err)
		}
		if b.Informed.MSE > b.Uninformed.MSE {
			t.Errorf("alpha %v: informed error above the uninformed one: %+v", c.alpha, b)
		}
	}
}

// bayesAt is the Bayes reference for a Gaussian design in the columns scale (entries of
// variance 1/m) and a Bernoulli-Gaussian signal of density rho and unit variance.
func bayesAt(t *testing.T, alpha, rho, delta float64) (BayesResult, fixedpoint.Problem) {
	t.Helper()
	p, err := scen(t, gaussDesign(alpha, "columns"), bgSignal(rho, 1), delta, lasso(1)).Problem()
	if err != nil {
		t.Fatal(err)
	}
	b, err := Bayes(p)
	if err != nil || !b.Uninformed.Converged || !b.Informed.Converged {
		t.Fatalf("alpha %v, delta %v: %+v %v", alpha, delta, b, err)
	}
	return b, p
}

// The free-energy gap between the two fixed points against the replica-symmetric potential
// for Gaussian matrices, R(s) = I_X(s) + (alpha/2)(Delta s - log s) + const, whose stationary
// points are s = 1/(Delta + mmse(s)/alpha) (Reeves & Pfister 2016, "The replica-symmetric
// prediction for compressed sensing with Gaussian matrices is exact", ISIT, in their
// normalization Delta = 1/alpha; the form here is from memory and confirmed only through
// that stationarity, which the test checks at both points). I_X(sB) - I_X(sA) is the
// integral of mmse(s)/2 ds (the I-MMSE relation, Guo, Shamai & Verdu 2005, eq. 1), done by
// Simpson's rule in log s: a route independent of the engine's integral along gamma2.
func TestBayesGapGaussianPotential(t *testing.T) {
	for _, c := range []struct{ alpha, delta float64 }{{0.2, 1e-4}, {0.15, 1e-6}, {0.12, 1e-8}} {
		b, p := bayesAt(t, c.alpha, 0.1, c.delta)
		if !b.Differ {
			t.Fatalf("%+v: want two fixed points, got %+v", c, b)
		}
		mx, _ := newMixtureMMSE(p.Signal.Mixture())
		for _, pt := range []BayesPoint{b.Uninformed, b.Informed} {
			if d := relDiff(1/pt.Gamma1, c.delta+pt.MSE/c.alpha); d > 1e-8 {
				t.Errorf("%+v: 1/s = %.12g, Delta + mmse/alpha = %.12g", c, 1/pt.Gamma1, c.delta+pt.MSE/c.alpha)
			}
		}
		sa, sb := b.Uninformed.Gamma1, b.Informed.Gamma1
		ix := simpson(func(u float64) float64 {
			e, _ := mx.at(math.Exp(-u))
			return e / 2 * math.Exp(u)
		}, math.Log(sa), math.Log(sb), 1200)
		want := ix + c.alpha/2*(c.delta*(sb-sa)-math.Log(sb/sa))
		if d := math.Abs(b.Gap - want); d > 1e-5*math.Max(1, math.Abs(want)) {
			t.Errorf("%+v: gap %.10g, Gaussian potential %.10g", c, b.Gap, want)
		}
	}
}

// The optimal fixed point switches at the information-theoretic threshold, which lies
// strictly inside the range where the two starts differ: above the point where the informed
// start loses its low error and below the algorithm's own threshold. As the noise vanishes
// it falls towards the density: noiseless recovery is possible exactly above alpha = rho,
// the information dimension of the signal (Wu & Verdu 2010, "Renyi information dimension:
// fundamental limits of almost lossless analog compression", IEEE Trans. Inf. Theory 56(8)),
// and at Delta = 0 the engine applies that rule. The threshold is found by bisection in
// alpha between two points inside the range where the starts differ (measured when the test
// was written: (0.1475, 0.2078) at Delta = 1e-4, (0.1031, 0.2075) at 1e-8, (0.1002, 0.2076)
// at 1e-12), and the starts must still differ 0.003 either side of it.
func TestBayesOptimalSwitch(t *testing.T) {
	const rho = 0.1
	prevIT := 1.0
	for _, c := range []struct{ delta, lo, hi float64 }{{1e-4, 0.15, 0.205}, {1e-8, 0.105, 0.205}, {1e-12, 0.102, 0.205}} {
		at := func(a float64) BayesResult { b, _ := bayesAt(t, a, rho, c.delta); return b }
		lo, hi := c.lo, c.hi
		if b := at(lo); !b.Differ || b.OptimalStart != StartUninformed || !(b.Gap > 0) || b.Optimal != b.Uninformed {
			t.Fatalf("delta %v, alpha %v: want two fixed points, the uninformed one optimal: %+v", c.delta, lo, b)
		}
		if b := at(hi); !b.Differ || b.OptimalStart != StartInformed || !(b.Gap < 0) || b.Optimal != b.Informed {
			t.Fatalf("delta %v, alpha %v: want two fixed points, the informed one optimal: %+v", c.delta, hi, b)
		}
		for hi-lo > 1e-3 {
			if mid := (lo + hi) / 2; at(mid).OptimalStart == StartInformed {
				hi = mid
			} else {
				lo = mid
			}
		}
		it := (lo + hi) / 2
		t.Logf("delta %v: the informed point is optimal above alpha = %.4f", c.delta, it)
		if !at(it-0.003).Differ || !at(it+0.003).Differ {
			t.Errorf("delta %v: the threshold %.4f is not strictly inside the range where the starts differ", c.delta, it)
		}
		if !(it > rho && it < prevIT) {
			t.Errorf("delta %v: the threshold %.4f is not between rho and the last one, %.4f", c.delta, it, prevIT)
		}
		prevIT = it
	}
	if prevIT > 1.3*rho {
		t.Errorf("at delta 1e-12 the threshold %.4f is still far above the noiseless %v", prevIT, rho)
	}
	// Delta = 0: exact recovery is optimal exactly above alpha = rho.
	for _, c := range []struct {
		alpha float64
		start string
	}{{0.095, StartUninformed}, {0.105, StartInformed}, {0.2, StartInformed}} {
		b, _ := bayesAt(t, c.alpha, rho, 0)
		if b.OptimalStart != c.start || (c.start == StartInformed && (!b.Optimal.Exact || !math.IsNaN(b.Gap))) {
			t.Errorf("noiseless, alpha %v: optimal from %s, want %s: %+v", c.alpha, b.OptimalStart, c.start, b)
		}
	}
}
