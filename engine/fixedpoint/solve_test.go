package fixedpoint

import (
	"math"
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

func must[T any](v T, err error) T {
	if err != nil {
		panic(err)
	}
	return v
}

func relDiff(a, b float64) float64 {
	return math.Abs(a-b) / math.Max(math.Abs(b), 1e-300)
}

func solve(t *testing.T, p Problem) Result {
	t.Helper()
	r, err := Solve(p, Options{})
	if err != nil {
		t.Fatalf("Solve: %v", err)
	}
	if !r.Converged {
		t.Fatalf("did not converge: %+v", r)
	}
	if !finiteAll(r.MSE, r.NMSE, r.NMSEdB, r.Susceptibility, r.G1, r.T1, r.G2, r.NonZero, r.TPP, r.FDP, r.TrainError) {
		t.Fatalf("non-finite result: %+v", r)
	}
	return r
}

// Minimum-norm least squares with a Gaussian design in the rows scale, signal power rho2 and
// noise Delta: MSE = Delta/(alpha - 1) above alpha = 1 and rho2 (1 - alpha) + Delta alpha /
// (1 - alpha) below it (Belkin, Hsu & Xu 2020, SIAM J. Math. Data Sci., double descent; the
// form used here is the one re-derived in docs/method.md section 9). The limit is approached by a
// vanishing ridge, whose bias is O(l2).
func TestMinimumNormLeastSquares(t *testing.T) {
	const rho2, delta, l2 = 1.0, 0.1, 1e-9
	for _, alpha := range []float64{0.2, 0.5, 0.8, 1.25, 2, 4} {
		want := delta / (alpha - 1)
		if alpha < 1 {
			want = rho2*(1-alpha) + delta*alpha/(1-alpha)
		}
		r := solve(t, Problem{
			Design:  must(design.Gaussian(alpha, design.Rows)),
			Signal:  must(signal.Gauss(rho2)),
			Penalty: must(penalty.Ridge(l2)),
			Noise:   delta,
		})
		if d := relDiff(r.MSE, want); d > 1e-6 {
			t.Errorf("alpha=%v: MSE %.12g, closed form %.12g (rel %.2g)", alpha, r.MSE, want, d)
		}
	}
}

// Least squares with a Gaussian design: E[(X^T X)^-1] = I/(m - n - 1) for an m x n standard
// Gaussian X (Muirhead 1982, Aspects of Multivariate Statistical Theory, inverse Wishart mean),
// so with entries N(0, 1/n) the finite-size MSE is Delta n/(m - n - 1). The prediction is its
// limit: at n = 10^5 the two differ by (1 + 1/n)/(alpha - 1 - 1/n) - 1/(alpha - 1) only.
func TestLeastSquaresInverseWishart(t *testing.T) {
	const delta = 0.3
	for _, alpha := range []float64{1.5, 2, 3} {
		n := 100000.0
		m := alpha * n
		exact := delta * n / (m - n - 1)
		r := solve(t, Problem{
			Design:  must(design.Gaussian(alpha, design.Rows)),
			Signal:  must(signal.Gauss(1)),
			Penalty: must(penalty.Ridge(1e-10)),
			Noise:   delta,
		})
		if d := relDiff(r.MSE, exact); d > 3/n {
			t.Errorf("alpha=%v: MSE %.12g, inverse-Wishart finite-size %.12g at n=1e5 (rel %.2g)", alpha, r.MSE, exact, d)
		}
	}
}

// Ridge with l2 = Delta/rho2 on a Gaussian signal is the posterior mean, so its error is the
// minimum mean-square error rho2 * eta_nu(rho2/Delta), eta_nu(x) = E_nu[1/(1 + x lambda)]
// (Tulino & Verdu 2004, Random Matrix Theory and Wireless Communications, section 3.1). For a
// Gaussian design in the columns scale it has the closed form
// eta(x) = 1 - F(x, beta)/(4 beta x), F(x, z) = (sqrt(x(1+sqrt z)^2 + 1) - sqrt(x(1-sqrt z)^2 + 1))^2,
// beta = n/m (Tulino & Verdu 2004, eq. 2.121; from memory, its scaling confirmed here against
// the small-x expansion eta = 1 - x E[lambda]).
func TestRidgeEqualsMMSE(t *testing.T) {
	tvF := func(x, z float64) float64 {
		a := math.Sqrt(x*(1+math.Sqrt(z))*(1+math.Sqrt(z)) + 1)
		b := math.Sqrt(x*(1-math.Sqrt(z))*(1-math.Sqrt(z)) + 1)
		return (a - b) * (a - b)
	}
	for _, c := range []struct{ alpha, rho2, delta float64 }{
		{0.5, 1, 0.1}, {1, 2, 0.05}, {2.5, 0.7, 1}, {0.3, 1, 1e-3},
	} {
		law := must(design.Gaussian(c.alpha, design.Columns))
		x := c.rho2 / c.delta
		beta := 1 / c.alpha
		want := c.rho2 * (1 - tvF(x, beta)/(4*beta*x))
		r := solve(t, Problem{
			Design:  law,
			Signal:  must(signal.Gauss(c.rho2)),
			Penalty: must(penalty.Ridge(c.delta / c.rho2)),
			Noise:   c.delta,
		})
		if d := relDiff(r.MSE, want); d > 1e-9 {
			t.Errorf("%+v: ridge MSE %.14g, Tulino-Verdu MMSE %.14g (rel %.2g)", c, r.MSE, want, d)
		}
		// The same through the design's own transform: rho2 eta(x) = Delta S1(Delta/rho2).
		s1, _ := law.Stieltjes(c.delta / c.rho2)
		if d := relDiff(r.MSE, c.delta*s1); d > 1e-9 {
			t.Errorf("%+v: ridge MSE %.14g, Delta*S1 %.14g (rel %.2g)", c, r.MSE, c.delta*s1, d)
		}
	}
}

// For an i.i.d. Gaussian design the LASSO risk is also given by the scalar calibration of
// approximate message passing (Bayati & Montanari 2012, "The LASSO risk for Gaussian
// matrices", IEEE Trans. Inf. Theory, eqs. 1.5-1.6): with entries N(0, 1/m), delta = m/n and a
// threshold theta tau,
//
//	tau^2 = sigma^2 + E[(eta(X + tau Z; theta tau) - X)^2] / delta,
//	lambda = theta tau (1 - E[eta'(X + tau Z; theta tau)] / delta).
//
// That derivation is independent of the R-transform form solved here; both must agree.
func TestLassoMatchesGaussianCalibration(t *testing.T) {
	x0 := must(signal.BernoulliGauss(0.1, 1))
	for _, c := range []struct{ delta, sigma2, theta float64 }{
		{0.5, 0.01, 1.5}, {0.3, 0.1, 2}, {1.5, 0.05, 1}, {0.8, 1e-4, 1.8},
	} {
		tau2 := x0.Second() + c.sigma2
		var m signal.Moments
		for i := 0; i < 100000; i++ {
			tau := math.Sqrt(tau2)
			m = signal.Expect(x0, must(penalty.L1(c.theta*tau)), 1, tau2)
			next := c.sigma2 + m.MSE/c.delta
			if math.Abs(next-tau2) < 1e-15*tau2 {
				tau2 = next
				break
			}
			tau2 = next
		}
		tau := math.Sqrt(tau2)
		m = signal.Expect(x0, must(penalty.L1(c.theta*tau)), 1, tau2)
		lambda := c.theta * tau * (1 - m.A/c.delta)
		if lambda <= 0 {
			t.Fatalf("%+v: calibration gave lambda %v", c, lambda)
		}
		r := solve(t, Problem{
			Design:  must(design.Gaussian(c.delta, design.Columns)),
			Signal:  x0,
			Penalty: must(penalty.L1(lambda)),
			Noise:   c.sigma2,
		})
		if d := relDiff(r.MSE, m.MSE); d > 1e-7 {
			t.Errorf("%+v (lambda %.6g): MSE %.12g, AMP calibration %.12g (rel %.2g)", c, lambda, r.MSE, m.MSE, d)
		}
		if d := relDiff(r.NonZero, m.NonZero); d > 1e-7 {
			t.Errorf("%+v: nonzero fraction %.12g, AMP calibration %.12g", c, r.NonZero, m.NonZero)
		}
	}
}

// quadOnly hides the piecewise-linear form of a penalty so that the channel moments come from
// quadrature instead of the closed forms.
type quadOnly struct{ penalty.Penalty }

func (quadOnly) Pieces(float64) ([]penalty.Piece, bool) { return nil, false }

func TestClosedFormAndQuadratureAgree(t *testing.T) {
	for _, c := range []struct{ l1, l2, alpha float64 }{
		{0.05, 0, 0.4}, {0.3, 0.5, 0.4}, {1e-3, 0.1, 1.5}, {2, 0, 0.7},
	} {
		p := Problem{
			Design:  must(design.Orthogonal(c.alpha, design.Rows)),
			Signal:  must(signal.BernoulliGauss(0.1, 1)),
			Penalty: must(penalty.ElasticNet(c.l1, c.l2)),
			Noise:   0.01,
		}
		closed := solve(t, p)
		p.Penalty = quadOnly{p.Penalty}
		quad := solve(t, p)
		if d := relDiff(quad.MSE, closed.MSE); d > 1e-9 {
			t.Errorf("%+v: quadrature MSE %.14g, closed form %.14g (rel %.2g)", c, quad.MSE, closed.MSE, d)
		}
	}
}

// Ridge on a Gaussian signal with an orthogonal design is solvable by hand: with all nonzero
// eigenvalues equal to k the estimate is k/(k + l2) times the least-squares one on the range.
func TestRidgeOrthogonalByHand(t *testing.T) {
	const rho2, delta, l2 = 1.5, 0.2, 0.3
	for _, alpha := range []float64{0.4, 1, 2} {
		law := must(design.Orthogonal(alpha, design.Rows))
		k := law.Mean() / math.Min(alpha, 1)
		frac := math.Min(alpha, 1)
		// On the range: xhat = k/(k+l2) (x0 + w'/sqrt k) with w' ~ N(0, Delta) per coordinate.
		c := k / (k + l2)
		onRange := (1-c)*(1-c)*rho2 + c*c*delta/k
		want := frac*onRange + (1-frac)*rho2
		r := solve(t, Problem{Design: law, Signal: must(signal.Gauss(rho2)), Penalty: must(penalty.Ridge(l2)), Noise: delta})
		if d := relDiff(r.MSE, want); d > 1e-11 {
			t.Errorf("alpha=%v: MSE %.14g, by hand %.14g", alpha, r.MSE, want)
		}
		// Training error by hand: residual on the range is (l2/(k+l2)) (sqrt k x0 + w'),
		// off the range (when m > n) the noise alone.
		res := l2 / (k + l2)
		trainRange := res * res * (k*rho2 + delta)
		wantTrain := (math.Min(alpha, 1)*trainRange + math.Max(0, alpha-1)*delta) / alpha
		if d := relDiff(r.TrainError, wantTrain); d > 1e-10 {
			t.Errorf("alpha=%v: training error %.14g, by hand %.14g", alpha, r.TrainError, wantTrain)
		}
	}
}

func TestEdges(t *testing.T) {
	bg := must(signal.BernoulliGauss(0.1, 1))
	designs := map[string]design.Law{
		"gaussian 0.5":   must(design.Gaussian(0.5, design.Rows)),
		"gaussian 1":     must(design.Gaussian(1, design.Rows)),
		"gaussian 2":     must(design.Gaussian(2, design.Rows)),
		"orthogonal 0.5": must(design.Orthogonal(0.5, design.Rows)),
		"orthogonal 1":   must(design.Orthogonal(1, design.Rows)),
		"orthogonal 3":   must(design.Orthogonal(3, design.Columns)),
		"geometric 1e4":  must(design.GeometricSV(0.6, 1e4, design.Rows)),
		"uniform-sv":     must(design.UniformSV(1.3, 0.2, 2, design.Rows)),
		"uniform-ev":     must(design.UniformEV(0.7, 0, 3, design.Columns)),
		"empirical one":  must(design.EmpiricalSV(0.5, []float64{2}, design.AsGiven)),
	}
	for name, law := range designs {
		for _, noise := range []float64{0, 0.01} {
			for _, l1 := range []float64{1e-6, 1e-4, 1e-2, 1, 100, 1e3} {
				r, err := Solve(Problem{Design: law, Signal: bg, Penalty: must(penalty.L1(l1)), Noise: noise}, Options{})
				if err != nil {
					t.Errorf("%s noise=%v l1=%v: %v", name, noise, l1, err)
					continue
				}
				if !finiteAll(r.MSE, r.NMSEdB, r.TrainError, r.NonZero, r.Susceptibility) || r.MSE < 0 {
					t.Errorf("%s noise=%v l1=%v: bad result %+v", name, noise, l1, r)
				}
				if !r.Converged {
					t.Errorf("%s noise=%v l1=%v: not converged after %d (residual %g)", name, noise, l1, r.Iterations, r.Residual)
				}
				if r.MSE > bg.Second()*(1+1e-9) && noise == 0 {
					t.Errorf("%s l1=%v: noiseless LASSO worse than the zero estimate: %g", name, l1, r.MSE)
				}
			}
		}
	}
}

// A whole regularization path, warm-started, from 1e-6 to 1e3 on a log grid converges with no
// NaN, and a large enough penalty gives the zero estimate with MSE = rho2.
func TestLambdaPath(t *testing.T) {
	p := Problem{
		Design: must(design.Gaussian(0.5, design.Rows)),
		Signal: must(signal.BernoulliGauss(0.2, 1)),
		Noise:  0.01,
	}
	var start *State
	for i := 0; i <= 90; i++ {
		l1 := math.Pow(10, -6+9*float64(i)/90)
		p.Penalty = must(penalty.L1(l1))
		r, err := Solve(p, Options{Start: start})
		if err != nil || !r.Converged {
			t.Fatalf("l1=%g: err=%v result=%+v", l1, err, r)
		}
		st := r.State()
		start = &st
		if l1 == 1e3 && (!r.EstimateZero || r.MSE != p.Signal.Second()) {
			t.Errorf("l1=1e3: want the zero estimate, got %+v", r)
		}
	}
}

func TestDensities(t *testing.T) {
	for _, rho := range []float64{1e-4, 1e-3, 0.5, 0.999, 1} {
		r := solve(t, Problem{
			Design:  must(design.Orthogonal(0.5, design.Rows)),
			Signal:  must(signal.BernoulliGauss(rho, 1)),
			Penalty: must(penalty.L1(0.1)),
			Noise:   0.01,
		})
		// At a density of 1e-4 the false positives of a threshold near the noise level cost
		// more than the signal is worth (NMSE > 1): that is the answer, not a failure; only the
		// probabilities have hard bounds.
		for name, p := range map[string]float64{"nonzero": r.NonZero, "tpp": r.TPP, "fdp": r.FDP} {
			if p < 0 || p > 1 {
				t.Errorf("density %v: %s = %v", rho, name, p)
			}
		}
		if r.NMSE <= 0 || (rho >= 0.5 && r.NMSE >= 1) {
			t.Errorf("density %v: NMSE %v", rho, r.NMSE)
		}
	}
}

func TestLargeEmpiricalSpectrum(t *testing.T) {
	vals := make([]float64, 100000)
	for i := range vals {
		vals[i] = 0.5 + float64(i%1000)/1000
	}
	r := solve(t, Problem{
		Design:  must(design.EmpiricalSV(0.5, vals, design.Rows)),
		Signal:  must(signal.BernoulliGauss(0.1, 1)),
		Penalty: must(penalty.L1(0.05)),
		Noise:   0.01,
	})
	if r.NMSE >= 1 {
		t.Errorf("NMSE %v", r.NMSE)
	}
}

func TestBadProblems(t *testing.T) {
	good := Problem{
		Design:  must(design.Orthogonal(0.5, design.Rows)),
		Signal:  must(signal.Gauss(1)),
		Penalty: must(penalty.L1(0.1)),
	}
	for name, p := range map[string]Problem{
		"nil design":  {Signal: good.Signal, Penalty: good.Penalty},
		"nil signal":  {Design: good.Design, Penalty: good.Penalty},
		"nil penalty": {Design: good.Design, Signal: good.Signal},
		"noise NaN":   {Design: good.Design, Signal: good.Signal, Penalty: good.Penalty, Noise: math.NaN()},
		"noise -1":    {Design: good.Design, Signal: good.Signal, Penalty: good.Penalty, Noise: -1},
		"noise Inf":   {Design: good.Design, Signal: good.Signal, Penalty: good.Penalty, Noise: math.Inf(1)},
		"zero signal": {Design: good.Design, Signal: must(signal.Gauss(0)), Penalty: good.Penalty},
	} {
		if _, err := Solve(p, Options{}); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
}

// A solver that cannot converge in the iterations it is given says so.
func TestReportsNonConvergence(t *testing.T) {
	r, err := Solve(Problem{
		Design:  must(design.Gaussian(0.3, design.Rows)),
		Signal:  must(signal.BernoulliGauss(0.1, 1)),
		Penalty: must(penalty.L1(0.01)),
		Noise:   0.01,
	}, Options{MaxIter: 2, Tol: 1e-300})
	if err != nil {
		t.Fatal(err)
	}
	if r.Converged || r.Residual <= 1e-300 || r.Note == "" {
		t.Errorf("want an honest non-converged report, got %+v", r)
	}
}

func benchmarkSolve(b *testing.B, p Problem) {
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		r, err := Solve(p, Options{})
		if err != nil || !r.Converged {
			b.Fatal(err, r)
		}
	}
}

func BenchmarkSolve(b *testing.B) {
	designs := []struct {
		name string
		law  design.Law
	}{
		{"gaussian", must(design.Gaussian(0.5, design.Rows))},
		{"orthogonal", must(design.Orthogonal(0.5, design.Rows))},
		{"uniform-sv", must(design.UniformSV(0.5, 0.5, 2, design.Rows))},
		{"uniform-ev", must(design.UniformEV(0.5, 0.1, 2, design.Rows))},
		{"geometric-sv", must(design.GeometricSV(0.5, 100, design.Rows))},
		{"empirical-sv", must(design.EmpiricalSV(0.5, []float64{0.5, 1, 1.5, 2}, design.Rows))},
	}
	for _, d := range designs {
		b.Run(d.name+"/bernoulli-gauss,l1", func(b *testing.B) {
			benchmarkSolve(b, Problem{Design: d.law, Signal: must(signal.BernoulliGauss(0.1, 1)), Penalty: must(penalty.L1(0.05)), Noise: 0.01})
		})
		b.Run(d.name+"/gauss,ridge", func(b *testing.B) {
			benchmarkSolve(b, Problem{Design: d.law, Signal: must(signal.Gauss(1)), Penalty: must(penalty.Ridge(0.1)), Noise: 0.01})
		})
	}
}

// A warm start from a problem that recovers the signal exactly must not carry its zero error
// into one that does not: the noiseless floor stops only a falling error.
func TestWarmStartAcrossRecoveryThreshold(t *testing.T) {
	base := Problem{Design: must(design.Gaussian(0.5, design.Columns)), Penalty: must(penalty.L1(1e-7))}
	base.Signal = must(signal.BernoulliGauss(0.1, 1))
	rec := solve(t, base)
	if rec.NMSE > 1e-9 {
		t.Fatalf("density 0.1 at alpha 0.5 should recover: NMSE %g", rec.NMSE)
	}
	base.Signal = must(signal.BernoulliGauss(0.3, 1))
	cold := solve(t, base)
	st := rec.State()
	warm, err := Solve(base, Options{Start: &st})
	if err != nil {
		t.Fatal(err)
	}
	if cold.NMSE < 1e-3 || relDiff(warm.MSE, cold.MSE) > 1e-6 {
		t.Errorf("density 0.3: warm start gives MSE %g, cold start %g", warm.MSE, cold.MSE)
	}
}

// A user's spectrum whose singular values are all equal is the orthogonal design: the whole
// prediction must agree, not only the transforms.
func TestEmpiricalOnesIsOrthogonal(t *testing.T) {
	ones := make([]float64, 500)
	for i := range ones {
		ones[i] = 1
	}
	for _, alpha := range []float64{0.3, 1, 2.5} {
		for _, sc := range []design.Scale{design.Rows, design.Columns} {
			p := Problem{
				Signal:  must(signal.BernoulliGauss(0.1, 1)),
				Penalty: must(penalty.ElasticNet(0.05, 0.01)),
				Noise:   0.01,
			}
			p.Design = must(design.Orthogonal(alpha, sc))
			orth := solve(t, p)
			p.Design = must(design.EmpiricalSV(alpha, ones, sc))
			emp := solve(t, p)
			if d := relDiff(emp.MSE, orth.MSE); d > 1e-9 {
				t.Errorf("alpha=%v scale=%v: empirical ones %.15g, orthogonal %.15g", alpha, sc, emp.MSE, orth.MSE)
			}
		}
	}
}
