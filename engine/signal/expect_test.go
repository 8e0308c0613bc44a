package signal

import (
	"math"
	"testing"

	"hdrisk/engine/penalty"
)

func testLaws() []Law {
	return []Law{
		must(Gauss(1.3)),
		must(Gauss(0)),
		must(BernoulliGauss(0.1, 1)),
		must(BernoulliGauss(1, 0.5)),
		must(BernoulliRademacher(0.2, 1.5)),
		must(GaussMixture([]float64{0.5, 0.3, 0.2}, []float64{0, 2, -1.5}, []float64{0, 0.4, 0.01})),
		must(Empirical([]float64{-2, 0, 0, 0.3, 1.7, 5})),
		must(Uniform(1.2)),
		mixtureLaw{must(Laplace(0.8))}, // the closed forms of Laplace have tests of their own
		must(StudentT(5, 0.7)),
	}
}

func piecewisePenalties() []penalty.Penalty {
	return []penalty.Penalty{
		must(penalty.L1(0.4)),
		must(penalty.L1(0)),
		must(penalty.Ridge(0.7)),
		must(penalty.ElasticNet(0.3, 1.1)),
		must(penalty.NonnegL1(0.2, 0.5)),
		must(penalty.Box(0.9, 0.3)),
		must(penalty.Box(2, 0)),
		must(penalty.Huber(0.5, 0.4)),
		must(penalty.Power(0.3, 1)),
		must(penalty.Power(0.3, 2)),
	}
}

// cmpMoments reports every field of got that differs from want by more than
// tol * max(|want|, floor).
func cmpMoments(t *testing.T, what string, got, want Moments, tol, floor float64) {
	t.Helper()
	for _, f := range []struct {
		name      string
		got, want float64
	}{
		{"MSE", got.MSE, want.MSE},
		{"A", got.A, want.A},
		{"NonZero", got.NonZero, want.NonZero},
		{"TruePos", got.TruePos, want.TruePos},
		{"Active", got.Active, want.Active},
	} {
		if !close(f.got, f.want, tol, floor) || math.IsNaN(f.got) != math.IsNaN(f.want) {
			t.Errorf("%s: %s = %.16g, want %.16g (rel. diff %.1e)", what, f.name, f.got, f.want, math.Abs(f.got-f.want)/math.Abs(f.want))
		}
	}
}

// The closed forms against quadrature (independent code: Gauss-Legendre over r using Prox and
// Deriv, not the pieces) for every piecewise-linear penalty and every law, over a grid of
// (g, t) whose thresholds l1/g run from 1e-4 to 4e2 channel standard deviations.
func TestExpectMatchesQuadrature(t *testing.T) {
	gs := []float64{1e-3, 0.05, 1, 20, 1e4}
	ts := []float64{1e-6, 0.01, 1, 100}
	for _, l := range testLaws() {
		for _, p := range piecewisePenalties() {
			for _, g := range gs {
				for _, tt := range ts {
					if !l.Exact() && (g == 0.05 || tt == 0.01) {
						continue // keep the scale mixtures (48 components) to a smaller grid
					}
					closed := Expect(l, p, g, tt)
					quadr := ExpectQuad(l, p, g, tt)
					cmpMoments(t, l.Name()+"/"+p.Name()+gtString(g, tt), closed, quadr, 1e-9, 1e-15)
				}
			}
		}
	}
}

func gtString(g, t float64) string {
	return " g=" + ftoa(g) + " t=" + ftoa(t)
}

func ftoa(x float64) string { return string(appendFloat(nil, x)) }

func appendFloat(b []byte, x float64) []byte {
	return append(b, []byte(formatG(x))...)
}

// The noiseless channel t = 0 with point masses: the prox at the atom, and A from the piece
// holding it (the right-derivative convention), by both routes.
func TestExpectNoiseless(t *testing.T) {
	l := must(BernoulliRademacher(0.3, 0.5))
	for _, p := range piecewisePenalties() {
		for _, g := range []float64{0.5, 1, 8} {
			cmpMoments(t, p.Name()+" t=0", Expect(l, p, g, 0), ExpectQuad(l, p, g, 0), 1e-14, 1e-300)
		}
	}
	// Atoms exactly at the kinks +-theta: prox = 0 at both; the right derivative is 1 at
	// +theta (the piece [theta, Inf)) and 0 at -theta (the zero piece [-theta, theta)).
	p := must(penalty.L1(0.5))
	m := Expect(l, p, 1, 0)
	if want := 0.15; math.Abs(m.A-want) > 1e-15 || m.NonZero != 0 {
		t.Errorf("atoms at the threshold: A = %v (want %v), NonZero = %v (want 0)", m.A, want, m.NonZero)
	}
	if want := 0.3 * 0.25; math.Abs(m.MSE-want) > 1e-15 {
		t.Errorf("atoms at the threshold: MSE = %v, want %v", m.MSE, want)
	}
}

func TestExpectBadArguments(t *testing.T) {
	l := must(Gauss(1))
	p := must(penalty.L1(1))
	for _, a := range [][2]float64{{0, 1}, {-1, 1}, {1, -1}, {math.NaN(), 1}, {1, math.NaN()}} {
		for _, m := range []Moments{Expect(l, p, a[0], a[1]), ExpectQuad(l, p, a[0], a[1])} {
			if !math.IsNaN(m.MSE) || !math.IsNaN(m.A) {
				t.Errorf("g=%v t=%v: %+v, want NaN", a[0], a[1], m)
			}
		}
	}
}

// Support counts: TruePos <= NonZero, TruePos <= Active, and for the LASSO with a
// Bernoulli-Gaussian law P(xhat != 0 | x0 = 0) = 2 Q(theta / sqrt(t)).
func TestSupportCounts(t *testing.T) {
	l := must(BernoulliGauss(0.2, 1))
	p := must(penalty.L1(0.6))
	g, tt := 1.5, 0.09
	m := Expect(l, p, g, tt)
	if m.Active != 0.2 {
		t.Errorf("Active = %v, want 0.2", m.Active)
	}
	falsePos := 0.8 * math.Erfc(0.6/g/math.Sqrt(tt)/math.Sqrt2)
	if !close(m.NonZero-m.TruePos, falsePos, 1e-12, 0) {
		t.Errorf("false positives %v, want %v", m.NonZero-m.TruePos, falsePos)
	}
	if !(m.TruePos <= m.Active && m.TruePos <= m.NonZero) {
		t.Errorf("inconsistent support counts %+v", m)
	}
}

// Far tails are computed without cancellation: with the threshold at 30 standard deviations
// (A about 1e-197) the tail moments still agree with the asymptotic series of the normal tail,
// P(|r| > x) = 2 phi(x)/x (1 - 1/x^2 + 3/x^4 - 15/x^6 + ...) (Abramowitz & Stegun 26.2.12;
// at x = 30 seven terms leave a relative error below 1e-14).
func TestFarTail(t *testing.T) {
	l := must(Gauss(0))
	p := must(penalty.L1(30))
	m := Expect(l, p, 1, 1)
	x := 30.0
	series := 2 * normPDF(x) / x * (1 - 1/(x*x) + 3/math.Pow(x, 4) - 15/math.Pow(x, 6) + 105/math.Pow(x, 8) -
		945/math.Pow(x, 10) + 10395/math.Pow(x, 12))
	if !close(m.NonZero, series, 1e-12, 0) || !close(m.A, series, 1e-12, 0) {
		t.Errorf("NonZero = %v, A = %v, series %v", m.NonZero, m.A, series)
	}
	// E[soft^2] = 2 ((1 + x^2) Q - x phi) = 2 phi(x) (2/x^3 - 12/x^5 + 90/x^7 - 840/x^9 + 9450/x^11
	// - 124740/x^13 + 1891890/x^15 - ...), the same series multiplied by (x + 1/x) with the leading
	// x cancelled by hand.
	soft2 := 2 * normPDF(x) * (2/math.Pow(x, 3) - 12/math.Pow(x, 5) + 90/math.Pow(x, 7) - 840/math.Pow(x, 9) +
		9450/math.Pow(x, 11) - 124740/math.Pow(x, 13) + 1891890/math.Pow(x, 15))
	if !close(m.MSE, soft2, 1e-12, 0) {
		t.Errorf("MSE = %v, series %v", m.MSE, soft2)
	}
}

// The two branches of tailMoments agree where both are usable, and j2 obeys the identity
// j2 = (1 + x^2) q - x phi with the continued fraction as well (common practice: the partial
// moments of the normal tail).
func TestTailMomentsBranches(t *testing.T) {
	cf := func(x float64) (float64, float64) {
		k := 0.0
		for n := 8 + int(500/(x*x)); n >= 2; n-- {
			k = float64(n) / (x + k)
		}
		k1 := 1 / (x + k)
		return k1, k1 * k
	}
	for _, x := range []float64{3, 3.5, 4} {
		phi := normPDF(x)
		q := math.Erfc(x/math.Sqrt2) / 2
		_, j1, j2 := tailMoments(x, phi, q)
		c1, c2 := cf(x)
		if !close(j1, q*c1, 1e-13, 0) || !close(j2, q*c2, 5e-13, 0) {
			t.Errorf("x=%v: direct (%.16g, %.16g), continued fraction (%.16g, %.16g)", x, j1, j2, q*c1, q*c2)
		}
	}
}

// For the power penalty with 1 < q < 2 (no linear pieces) Expect integrates along the branch
// of the prox and ExpectQuad over r; both MSE and A are checked against direct integrals over
// z for each atom of an empirical law
// (gonum quad, finer sub-intervals, graded towards r = 0 where prox' behaves like a small
// power of |r|). The posterior split of ExpectQuad for Gaussian components is checked with the
// piecewise-linear penalties, against closed forms that are checked against 2-D integrals.
func TestPowerPenaltyQuadrature(t *testing.T) {
	atoms := []float64{-1.3, 0, 0.25, 0.9}
	l := must(Empirical(atoms))
	for _, tc := range []struct{ q, g, t float64 }{{1.1, 0.5, 2}, {1.1, 2, 0.05}, {1.5, 3, 0.02}, {1.9, 1, 0.3}} {
		p := must(penalty.Power(0.4, tc.q))
		m := Expect(l, p, tc.g, tc.t)
		mq := ExpectQuad(l, p, tc.g, tc.t)
		if m.NonZero != 1 {
			t.Errorf("q=%v: nonzero fraction %v, want exactly 1 (no zero region)", tc.q, m.NonZero)
		}
		st := math.Sqrt(tc.t)
		var mse, a float64
		for _, x0 := range atoms {
			splits := []float64{-x0 / st}
			for k := 1; k <= 26; k++ {
				d := math.Pow(4, -float64(k)) / st
				splits = append(splits, -x0/st-d, -x0/st+d)
			}
			mse += integrate(func(z float64) float64 {
				d := p.Prox(x0+st*z, tc.g) - x0
				return d * d * normPDF(z)
			}, -13, 13, 0.1, splits...) / float64(len(atoms))
			a += integrate(func(z float64) float64 { return p.Deriv(x0+st*z, tc.g) * normPDF(z) }, -13, 13, 0.1, splits...) / float64(len(atoms))
		}
		if !close(m.MSE, mse, 1e-10, 0) || !close(m.A, a, 1e-10, 0) {
			t.Errorf("%+v: Expect MSE %.12g A %.12g, direct integral %.12g %.12g", tc, m.MSE, m.A, mse, a)
		}
		if !close(mq.MSE, mse, 1e-10, 0) || !close(mq.A, a, 1e-10, 0) {
			t.Errorf("%+v: ExpectQuad MSE %.12g A %.12g, direct integral %.12g %.12g", tc, mq.MSE, mq.A, mse, a)
		}
	}
}

// Evaluating a group of components as one (merger) against evaluating every component, over
// thresholds from 1e-4 to 4e2 channel standard deviations and channel noises far below and
// far above the component variances: the merged moments stay within 1e-9 relative.
func TestExpectMergeMatchesComponents(t *testing.T) {
	for _, l := range testLaws() {
		for _, p := range piecewisePenalties() {
			for _, g := range []float64{1e-3, 0.05, 1, 20, 1e4} {
				for _, tt := range []float64{1e-6, 0.01, 1, 100} {
					pieces, ok := p.Pieces(g)
					if !ok {
						t.Fatalf("%s: no pieces", p.Name())
					}
					var each Moments
					for _, c := range componentsOf(l) {
						addComponent(&each, c, pieces, tt)
					}
					cmpMoments(t, l.Name()+"/"+p.Name()+gtString(g, tt), Expect(l, p, g, tt), each, 1e-9, 1e-15)
				}
			}
		}
	}
}

// oddPenalties are the penalties whose prox is odd with three pieces (the batched path of
// Expect and the closed-form slopes of ExpectSlopes).
func oddPenalties() []penalty.Penalty {
	return []penalty.Penalty{
		must(penalty.L1(0.4)),
		must(penalty.ElasticNet(0.3, 1.1)),
		must(penalty.Huber(0.5, 0.4)),
		must(penalty.Box(0.9, 0.3)),
	}
}

// The batched evaluation of an odd three-piece prox performs the operations of
// addComponent in the same order, so that the two agree exactly, over thresholds from 1e-4
// to 4e2 channel standard deviations (the narrow middle piece, the continued fraction of the
// far tail, tails beyond the reach of the normal law).
func TestAddOddMatchesAddComponent(t *testing.T) {
	n := 0
	for _, p := range oddPenalties() {
		for _, g := range []float64{1e-3, 0.05, 1, 20, 1e4} {
			pieces, ok := p.Pieces(g)
			if !ok || !oddThree(pieces) {
				t.Fatalf("%s at g=%v: pieces %v are not odd with three pieces", p.Name(), g, pieces)
			}
			for _, tt := range []float64{0, 1e-6, 0.01, 1, 100} {
				for _, c := range []Component{{1, 0, 0}, {0.3, 0, 1e-9}, {0.7, 0, 0.5}, {1, 0, 3e4}, {0.2, 1.5, 0.3}, {0.5, -2, 0}} {
					var got, want Moments
					addOdd(&got, c, pieces, tt)
					addComponent(&want, c, pieces, tt)
					if got != want && !(math.IsNaN(got.MSE) && math.IsNaN(want.MSE)) {
						t.Errorf("%s g=%v t=%v %+v: addOdd %+v, addComponent %+v", p.Name(), g, tt, c, got, want)
					}
					n++
				}
			}
		}
	}
	t.Logf("%d cases", n)
}

// The closed-form slopes against central differences of the moments summed component by
// component, without the merger, for the odd penalties and the laws whose components all
// have mean 0. The relative step is 1e-4/(1 + y^2), y the kink in channel standard
// deviations, since a tail mass changes by a factor exp(-y^2 h) over the step; kinks beyond
// 40 standard deviations of the channel noise are left out (the differences then lose
// their digits to rounding).
func TestExpectSlopes(t *testing.T) {
	laws := []Law{must(Gauss(1.3)), must(Gauss(0)), must(BernoulliGauss(0.1, 1)), mixtureLaw{must(Laplace(0.8))}, must(StudentT(5, 0.7))}
	each := func(l Law, p penalty.Penalty, g, tt float64) Moments {
		pieces, _ := p.Pieces(g)
		var m Moments
		for _, c := range componentsOf(l) {
			addComponent(&m, c, pieces, tt)
		}
		return m
	}
	n := 0
	defer func() { t.Logf("%d cases", n) }()
	for _, l := range laws {
		for _, p := range oddPenalties() {
			for _, g := range []float64{0.01, 0.3, 1, 20} {
				for _, tt := range []float64{1e-4, 0.05, 1, 30} {
					pieces, _ := p.Pieces(g)
					y := pieces[1].Hi / math.Sqrt(tt)
					if y > 40 {
						continue
					}
					h := 1e-4 / (1 + y*y)
					n++
					m, sl, ok := ExpectSlopes(l, p, g, tt)
					if !ok {
						t.Errorf("%s/%s g=%v t=%v: no slopes", l.Name(), p.Name(), g, tt)
						continue
					}
					cmpMoments(t, l.Name()+"/"+p.Name()+gtString(g, tt), m, Expect(l, p, g, tt), 0, 0)
					cmpSlopes(t, l.Name()+"/"+p.Name()+gtString(g, tt), m, sl, g, tt, h, func(g, tt float64) Moments { return each(l, p, g, tt) })
				}
			}
		}
	}
}

// Where the slopes have no closed form here (a prox that is not odd with three pieces, a
// component of nonzero mean, t = 0, a penalty without pieces) ExpectSlopes says so and still
// returns the moments of Expect.
func TestExpectSlopesUnavailable(t *testing.T) {
	for _, tc := range []struct {
		l  Law
		p  penalty.Penalty
		tt float64
	}{
		{mixtureLaw{must(Laplace(0.8))}, must(penalty.NonnegL1(0.2, 0.5)), 0.1},
		{mixtureLaw{must(Laplace(0.8))}, must(penalty.Ridge(0.7)), 0.1},
		{must(BernoulliRademacher(0.2, 1.5)), must(penalty.L1(0.4)), 0.1},
		{must(GaussMixture([]float64{0.5, 0.5}, []float64{0, 2}, []float64{1, 0.4})), must(penalty.L1(0.4)), 0.1},
		{must(Laplace(0.8)), must(penalty.L1(0.4)), 0},
		{must(Laplace(0.8)), must(penalty.Power(0.3, 1.5)), 0.1},
	} {
		m, sl, ok := ExpectSlopes(tc.l, tc.p, 0.7, tc.tt)
		if ok || sl != (Slopes{}) {
			t.Errorf("%s/%s t=%v: slopes %+v reported available", tc.l.Name(), tc.p.Name(), tc.tt, sl)
		}
		cmpMoments(t, tc.l.Name()+"/"+tc.p.Name(), m, Expect(tc.l, tc.p, 0.7, tc.tt), 0, 0)
	}
}

// cmpSlopes reports every slope of sl that differs from the central difference of relative
// step h of the moments at (g, t) by more than 1e-6 of the moment's own scale (m.MSE/g and so
// on).
func cmpSlopes(t *testing.T, what string, m Moments, sl Slopes, g, tt, h float64, at func(g, tt float64) Moments) {
	t.Helper()
	gp, gm := at(g*(1+h), tt), at(g*(1-h), tt)
	tp, tm := at(g, tt*(1+h)), at(g, tt*(1-h))
	for _, f := range []struct {
		name             string
		got, want, scale float64
	}{
		{"MSEg", sl.MSEg, (gp.MSE - gm.MSE) / (2 * h * g), m.MSE / g},
		{"MSEt", sl.MSEt, (tp.MSE - tm.MSE) / (2 * h * tt), m.MSE / tt},
		{"Ag", sl.Ag, (gp.A - gm.A) / (2 * h * g), m.A / g},
		{"At", sl.At, (tp.A - tm.A) / (2 * h * tt), m.A / tt},
	} {
		if !close(f.got, f.want, 1e-6, f.scale) {
			t.Errorf("%s: %s = %.10g, central difference %.10g", what, f.name, f.got, f.want)
		}
	}
}
