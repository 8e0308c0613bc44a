package signal

import (
	"fmt"
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"hdrisk/engine/penalty"
)

// channelGivenX0 returns E_z[(prox(x0 + sqrt(t) z) - x0)^2] and E_z[prox'(x0 + sqrt(t) z)] by
// quadrature over z split at the kinks: the channel moments for a fixed x0, with no mixture.
func channelGivenX0(p penalty.Penalty, g, t, x0 float64) (mse, a float64) {
	st := math.Sqrt(t)
	var splits []float64
	for _, k := range p.Kinks(g) {
		splits = append(splits, (k-x0)/st)
	}
	mse = integrate(func(z float64) float64 {
		d := p.Prox(x0+st*z, g) - x0
		return d * d * normPDF(z)
	}, -13, 13, 1, splits...)
	a = integrate(func(z float64) float64 { return p.Deriv(x0+st*z, g) * normPDF(z) }, -13, 13, 1, splits...)
	return mse, a
}

// cachedChannel returns channelGivenX0(p, g, t, x) as a function of x, remembering the
// values it has computed (the outer quadratures ask for each node twice).
func cachedChannel(p penalty.Penalty, g, t float64) func(x float64) [2]float64 {
	cache := map[float64][2]float64{}
	return func(x float64) [2]float64 {
		if v, ok := cache[x]; ok {
			return v
		}
		m, d := channelGivenX0(p, g, t, x)
		cache[x] = [2]float64{m, d}
		return cache[x]
	}
}

// The trapezoidal mixture of the Laplace law (which Expect uses below laplaceSmall and for
// the penalties without pieces) against the Laplace density itself: E over x0 with density
// exp(-|x|/b)/(2b) of the channel moments at fixed x0, by nested quadrature. The
// discretization error of the 63-node mixture is the difference.
func TestLaplaceMixtureAgainstDensity(t *testing.T) {
	b := 0.8
	l := mixtureLaw{must(Laplace(b))}
	for _, p := range []penalty.Penalty{must(penalty.L1(0.5)), must(penalty.Ridge(0.4)), must(penalty.Box(1, 0))} {
		for _, gt := range [][2]float64{{1, 0.3}, {3, 1e-4}} {
			g, tt := gt[0], gt[1]
			mse, a := laplaceByDensity(p, b, g, tt)
			m := Expect(l, p, g, tt)
			t.Logf("%s g=%v t=%v: MSE rel err %.1e, A rel err %.1e", p.Name(), g, tt, math.Abs(m.MSE-mse)/mse, math.Abs(m.A-a)/a)
			if !close(m.MSE, mse, 1e-8, 0) || !close(m.A, a, 1e-8, 0) {
				t.Errorf("%s g=%v t=%v: mixture MSE %.12g A %.12g; density %.12g %.12g", p.Name(), g, tt, m.MSE, m.A, mse, a)
			}
		}
	}
}

// The Student-t mixture against one with a step four times smaller and a lumped tail of 1e-22
// instead of about 1e-14 (convergence of the trapezoidal rule), over degrees of freedom from near 2
// to large and channel noises from small to large.
func TestStudentTConvergence(t *testing.T) {
	for _, dof := range []float64{2.2, 3, 5, 30} {
		law := must(StudentT(dof, 0.9)).(studentT)
		ref := studentT{mixture: mixture{studentTMixture(dof, 0.9, studentStep/4, 1e-22)}, dof: dof, scale: 0.9, unit: studentTMixture(dof, 1, studentStep/4, 1e-22)}
		t.Logf("dof=%v: %d components (reference %d)", dof, len(law.comps), len(ref.comps))
		for _, p := range []penalty.Penalty{must(penalty.L1(0.5)), must(penalty.Ridge(0.4)), must(penalty.Box(1, 0))} {
			for _, gt := range [][2]float64{{1, 0.3}, {3, 1e-3}, {0.3, 5}} {
				got := Expect(law, p, gt[0], gt[1])
				want := Expect(ref, p, gt[0], gt[1])
				t.Logf("dof=%v %s g=%v t=%v: MSE rel diff %.1e, A rel diff %.1e", dof, p.Name(), gt[0], gt[1],
					math.Abs(got.MSE-want.MSE)/want.MSE, math.Abs(got.A-want.A)/want.A)
				cmpMoments(t, "student-t "+p.Name(), got, want, 1e-7, 1e-12)
			}
		}
	}
}

// The Gauss-Legendre atoms of the uniform law against the uniform density itself, by nested
// quadrature split where the moments at fixed x0 change fast (within a few sqrt(t) of a kink).
// The atoms resolve the law only down to their spacing (about halfwidth/30 in the middle), so
// the error is at rounding level while sqrt(t) exceeds about halfwidth/12 and grows below; the
// tolerances record what was measured.
func TestUniformAtomsAgainstDensity(t *testing.T) {
	hw := 1.2
	l := must(Uniform(hw))
	for _, tc := range []struct {
		p      penalty.Penalty
		g, t   float64
		relTol float64
	}{
		{must(penalty.L1(0.5)), 1, 0.3, 1e-12},
		{must(penalty.Box(0.8, 0)), 1, 0.3, 1e-12},
		{must(penalty.L1(0.5)), 2, 0.01, 1e-12},
		{must(penalty.Box(0.8, 0)), 2, 0.01, 1e-12},
		{must(penalty.Ridge(0.3)), 2, 1e-4, 1e-12},
		// sqrt(t) below the spacing of the atoms (about 0.04 here): measured 4.5e-5 and 1.0e-2.
		{must(penalty.L1(0.5)), 2, 1e-3, 1e-4},
		{must(penalty.L1(0.5)), 2, 1e-4, 3e-2},
	} {
		var splits []float64
		for _, k := range tc.p.Kinks(tc.g) {
			for _, d := range []float64{0, 1, 2, 4, 8, 16} {
				splits = append(splits, k-d*math.Sqrt(tc.t), k+d*math.Sqrt(tc.t))
			}
		}
		cache := map[float64][2]float64{}
		at := func(x float64) [2]float64 {
			if v, ok := cache[x]; !ok {
				m, d := channelGivenX0(tc.p, tc.g, tc.t, x)
				cache[x] = [2]float64{m, d}
				return cache[x]
			} else {
				return v
			}
		}
		mse := integrate(func(x float64) float64 { return at(x)[0] / (2 * hw) }, -hw, hw, 0.2, splits...)
		a := integrate(func(x float64) float64 { return at(x)[1] / (2 * hw) }, -hw, hw, 0.2, splits...)
		m := Expect(l, tc.p, tc.g, tc.t)
		t.Logf("%s g=%v t=%v: MSE rel err %.1e, A rel err %.1e", tc.p.Name(), tc.g, tc.t, math.Abs(m.MSE-mse)/mse, math.Abs(m.A-a)/a)
		if !close(m.MSE, mse, tc.relTol, 0) || !close(m.A, a, tc.relTol, 0) {
			t.Errorf("%s g=%v t=%v: atoms MSE %.12g A %.12g; density %.12g %.12g", tc.p.Name(), tc.g, tc.t, m.MSE, m.A, mse, a)
		}
	}
}

// Second() is the law's own formula; the mixture's second moment sum w (mean^2 + var) must
// reproduce it (exactly for exact laws and by construction for the quadratures), the weights
// must sum to 1, and the symmetric laws must have mean 0.
func TestSecondMoment(t *testing.T) {
	for _, tc := range []struct {
		l    Law
		want float64 // from the textbook formula of each law (common practice)
		sym  bool
	}{
		{must(Gauss(2.5)), 2.5, true},
		{must(BernoulliGauss(0.1, 3)), 0.3, true},
		{must(BernoulliRademacher(0.2, 1.5)), 0.2 * 2.25, true},
		{must(Laplace(0.7)), 2 * 0.49, true},
		{must(Uniform(1.2)), 1.44 / 3, true},
		{must(StudentT(2.2, 0.9)), 0.81 * 2.2 / 0.2, true},
		{must(StudentT(5, 0.9)), 0.81 * 5 / 3, true},
		{must(StudentT(300, 0.9)), 0.81 * 300 / 298, true},
		{must(GaussMixture([]float64{0.25, 0.75}, []float64{1, -2}, []float64{0.5, 0})), 0.25*1.5 + 0.75*4, false},
		{must(Empirical([]float64{1, -3, 0, 2, 2})), (1 + 9 + 0 + 4 + 4) / 5.0, false},
	} {
		if got := tc.l.Second(); math.Abs(got-tc.want) > 1e-14*tc.want {
			t.Errorf("%s: Second() = %.17g, formula %.17g", tc.l.Name(), got, tc.want)
		}
		var w, m1, m2 float64
		for _, c := range tc.l.Mixture() {
			w += c.Weight
			m1 += c.Weight * c.Mean
			m2 += c.Weight * (c.Mean*c.Mean + c.Var)
		}
		if math.Abs(w-1) > 1e-13 || math.Abs(m2-tc.want) > 1e-12*tc.want || (tc.sym && math.Abs(m1) > 1e-14) {
			t.Errorf("%s: mixture weights sum %.17g, mean %.3g, second %.17g (law %.17g)", tc.l.Name(), w, m1, m2, tc.want)
		}
	}
}

// The Gauss rule that folds the heavy tail of the Student-t mixture (foldTail) against the
// same trapezoidal mixture unfolded, over degrees of freedom, thresholds from 1e-3 to 1e3 times
// the scale, channel noises from 1e-8 to 1e8 times its square, directly and through Scaled
// (the solver's path): where Expect uses the fold the moments move by less than 1e-9
// relative, far below the 1e-7 accuracy that docs/method.md (section 11.3) states for the
// mixture itself; elsewhere they are the unfolded ones.
func TestStudentTTailFold(t *testing.T) {
	worst := 0.0
	for _, dof := range []float64{2.05, 2.2, 2.5, 3, 4, 5, 8, 30, 300, 1e4, 1e9} {
		const scale = 0.9
		law := must(StudentT(dof, scale)).(studentT)
		full := studentT{mixture: law.mixture, dof: dof, scale: scale, unit: law.unit}
		used := 0
		var ps []penalty.Penalty
		for _, lam := range []float64{1e-3, 0.1, 1, 10, 1e3} {
			ps = append(ps, must(penalty.L1(lam)), must(penalty.ElasticNet(lam, 0.3)), must(penalty.Box(lam, 0)), must(penalty.Huber(lam, 0.5)))
		}
		ps = append(ps, must(penalty.Ridge(0.4)))
		for _, pair := range [][2]Law{{law, full}, {Scaled(law, 7), Scaled(full, 7)}} {
			fd := pair[0].(folder).foldedTail()
			for _, p := range ps {
				for _, g := range []float64{0.1, 1, 10} {
					for _, tt := range []float64{1e-8, 1e-4, 1e-2, 1, 1e2, 1e4, 1e8} {
						m, w := Expect(pair[0], p, g, tt), Expect(pair[1], p, g, tt)
						if k := p.Kinks(g); fd.comps != nil && len(k) > 0 && k[len(k)-1]*k[len(k)-1]+tt <= foldReach*fd.vmin {
							used++
						}
						for _, f := range [][2]float64{{m.MSE, w.MSE}, {m.A, w.A}, {m.NonZero, w.NonZero}, {m.Active, w.Active}} {
							if d := math.Abs(f[0]-f[1]) / math.Max(math.Abs(f[1]), 1e-12); d > worst {
								worst = d
							}
						}
						cmpMoments(t, fmt.Sprintf("dof=%v %s g=%v t=%v", dof, p.Name(), g, tt), m, w, 1e-9, 1e-12)
					}
				}
			}
		}
		t.Logf("dof=%v: %d components, %d folded; the fold serves %d of %d cases", dof, len(law.comps), len(law.fold.comps), used, 2*len(ps)*3*7)
		if dof == 5 && used == 0 {
			t.Errorf("dof=5: the fold never serves")
		}
	}
	t.Logf("largest relative change %.1e", worst)
}

// The law in the solver's units that Laplace and StudentT prepare is the one Scaled computes.
func TestPreparedUnitSecond(t *testing.T) {
	for _, l := range []Law{must(Laplace(1.7)), must(StudentT(5, 1)), must(StudentT(3.5, 1e-120))} {
		s := math.Sqrt(l.Second())
		got, want := Scaled(l, s).(scaled), scaleBy(l, s).(scaled)
		if l.(unitSecond).atUnitSecond() == nil {
			t.Errorf("%s: nothing prepared", l.Name())
		}
		if !slices.Equal(got.comps, want.comps) || !slices.Equal(got.fold.comps, want.fold.comps) || got.fold.vmin != want.fold.vmin || got.sec != want.sec || got.s != want.s {
			t.Errorf("%s: the prepared law differs from Scaled's", l.Name())
		}
	}
}

// The Student-t mixture, with its folded tail where Expect uses it, against the Student-t
// density itself (gonum distuv.StudentsT): E over x0 of the soft-threshold channel moments at
// fixed x0, by nested quadrature on |x0| <= K = k + 14 sqrt(t); beyond K the soft threshold
// moves x0 + sqrt(t) z by k on the side of x0 but for a mass below 1e-44, so that the MSE there
// is t + k^2 and A is 1, weighted by the exact tail mass from the CDF.
func TestStudentTMixtureAgainstDensity(t *testing.T) {
	for _, dof := range []float64{3, 5, 30} {
		const scale = 0.9
		l := must(StudentT(dof, scale)).(studentT)
		dist := distuv.StudentsT{Mu: 0, Sigma: scale, Nu: dof}
		p := must(penalty.L1(0.5))
		for _, gt := range [][2]float64{{1, 0.3}, {3, 1e-4}, {0.3, 2}} {
			g, tt := gt[0], gt[1]
			k := p.Kinks(g)[1]
			big := k + 14*math.Sqrt(tt)
			var splits []float64
			for _, d := range []float64{0, 1, 2, 4, 8} {
				splits = append(splits, -k-d*math.Sqrt(tt), -k+d*math.Sqrt(tt), k-d*math.Sqrt(tt), k+d*math.Sqrt(tt))
			}
			at := cachedChannel(p, g, tt)
			h := math.Min(scale, math.Sqrt(tt)) / 2
			tail := 2 * dist.Survival(big)
			mse := integrate(func(x float64) float64 { return at(x)[0] * dist.Prob(x) }, -big, big, h, append(splits, 0)...) + (tt+k*k)*tail
			a := integrate(func(x float64) float64 { return at(x)[1] * dist.Prob(x) }, -big, big, h, append(splits, 0)...) + tail
			m := Expect(l, p, g, tt)
			usesFold := l.fold.comps != nil && k*k+tt <= foldReach*l.fold.vmin
			t.Logf("dof=%v g=%v t=%v (fold used: %v): MSE rel err %.1e, A rel err %.1e", dof, g, tt, usesFold, math.Abs(m.MSE-mse)/mse, math.Abs(m.A-a)/a)
			if !close(m.MSE, mse, 1e-7, 0) || !close(m.A, a, 1e-7, 0) {
				t.Errorf("dof=%v g=%v t=%v: mixture MSE %.12g A %.12g; density %.12g %.12g", dof, g, tt, m.MSE, m.A, mse, a)
			}
		}
	}
}
