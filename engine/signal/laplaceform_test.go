package signal

import (
	"math"
	"testing"

	"hdrisk/engine/penalty"
)

// mixtureLaw hides every method of a law but those of Law, so that Expect evaluates it
// through its mixture (the path the closed forms of laplaceform.go replace for Laplace).
type mixtureLaw struct{ Law }

// laplaceByDensity returns the MSE and A of the channel for the Laplace law of scale b by
// nested Gauss-Legendre quadrature: over x0 against the density exp(-|x|/b)/(2b), of the
// moments at fixed x0 (channelGivenX0), split at the kinks and at multiples of sqrt(t) about
// them, out to 40 b beyond the farthest kink. Independent of the closed forms and of the mixture: it uses only Prox and Deriv.
func laplaceByDensity(p penalty.Penalty, b, g, tt float64) (mse, a float64) {
	var splits []float64
	for _, k := range p.Kinks(g) {
		for _, d := range []float64{0, 1, 2, 4, 8, 16} {
			splits = append(splits, k-d*math.Sqrt(tt), k+d*math.Sqrt(tt))
		}
	}
	splits = append(splits, 0)
	// Far enough out that the mass beyond is below 1e-17 of what lies beyond the kinks.
	hi := 40 * b
	for _, k := range p.Kinks(g) {
		hi = math.Max(hi, math.Abs(k)+40*b)
	}
	at := cachedChannel(p, g, tt)
	dens := func(x float64) float64 { return math.Exp(-math.Abs(x)/b) / (2 * b) }
	mse = integrate(func(x float64) float64 { return at(x)[0] * dens(x) }, -hi, hi, b/2, splits...)
	a = integrate(func(x float64) float64 { return at(x)[1] * dens(x) }, -hi, hi, b/2, splits...)
	return mse, a
}

// The closed forms for a Laplace law against every piecewise-linear penalty, over channel
// noises from S = sqrt(t)/b = 1e-3 (laplaceSmall) to 100 and thresholds from a small fraction
// of the noise to far in the tail, against quadrature of the Laplace density itself
// (laplaceByDensity). Measured: within 1e-14 relative.
func TestLaplaceClosedForm(t *testing.T) {
	b := 0.8
	l := must(Laplace(b))
	pens := []penalty.Penalty{
		must(penalty.L1(0.4)), must(penalty.ElasticNet(0.3, 1.1)), must(penalty.NonnegL1(0.2, 0.5)),
		must(penalty.Box(0.9, 0.3)), must(penalty.Box(2, 0)), must(penalty.Huber(0.5, 0.4)), must(penalty.Ridge(0.7)),
	}
	worst := map[bool]float64{}
	for i, p := range pens {
		for j, gs := range [][2]float64{{1, 1e-3}, {0.05, 0.01}, {3, 0.3}, {20, 3}, {0.3, 100}, {0.01, 1}} {
			if (i+j)%3 != 0 {
				continue // a third of the grid, every penalty and noise: the reference is slow
			}
			g, S := gs[0], gs[1]
			tt := S * S * b * b
			m, _, ok := ExpectSlopes(l, p, g, tt)
			if !ok {
				t.Errorf("%s g=%v S=%v: no closed form", p.Name(), g, S)
				continue
			}
			mse, a := laplaceByDensity(p, b, g, tt)
			tol := 1e-13
			em, ea := math.Abs(m.MSE-mse)/mse, math.Abs(m.A-a)/math.Max(a, 1e-300)
			worst[S < 0.01] = math.Max(worst[S < 0.01], math.Max(em, ea))
			if !close(m.MSE, mse, tol, 0) || !close(m.A, a, tol, 1e-300) {
				t.Errorf("%s g=%v S=%v: closed form MSE %.15g A %.15g; density %.15g %.15g (rel. %.1e %.1e)", p.Name(), g, S, m.MSE, m.A, mse, a, em, ea)
			}
			if m.Active != 1 || m.TruePos != m.NonZero || m.NonZero < m.A*(1-1e-15) && p.Name() == "l1" {
				t.Errorf("%s g=%v S=%v: Active %v TruePos %v NonZero %v", p.Name(), g, S, m.Active, m.TruePos, m.NonZero)
			}
		}
	}
	// The smallest noises the closed forms take, with the threshold far below b (the
	// middle piece then cancels most: measured 2.3e-11) and of the order of b.
	for _, c := range []struct {
		p      penalty.Penalty
		g, tol float64
	}{{must(penalty.L1(0.4)), 400, 2e-10}, {must(penalty.L1(0.4)), 0.5, 1e-13}, {must(penalty.Box(0.9, 0.3)), 40, 1e-13}} {
		tt := laplaceSmall * laplaceSmall * b * b
		m := Expect(l, c.p, c.g, tt)
		mse, a := laplaceByDensity(c.p, b, c.g, tt)
		if !close(m.MSE, mse, c.tol, 0) || !close(m.A, a, c.tol, 0) {
			t.Errorf("%s g=%v S=%v: closed form MSE %.15g A %.15g; density %.15g %.15g", c.p.Name(), c.g, laplaceSmall, m.MSE, m.A, mse, a)
		}
	}
	t.Logf("worst relative difference: %.1e at S >= 0.01, %.1e at S = 1e-3", worst[false], worst[true])
}

// The closed-form slopes of the Laplace moments against central differences of the closed
// forms, for every piecewise-linear penalty with pieces at both g +- h (odd or not), through
// the law itself and through Scaled (the solver's units), over noises S from 1e-3 to 30.
func TestLaplaceSlopes(t *testing.T) {
	n := 0
	for _, l := range []Law{must(Laplace(0.8)), Scaled(must(Laplace(0.8)), 1.7)} {
		b := 0.8
		if l.Name() == "laplace" && l.Second() != 2*b*b {
			b /= 1.7
		}
		for _, p := range piecewisePenalties() {
			for _, g := range []float64{0.01, 0.3, 1, 20} {
				for _, S := range []float64{1e-3, 0.1, 1, 30} {
					tt := S * S * b * b
					m, sl, ok := ExpectSlopes(l, p, g, tt)
					pieces, _ := p.Pieces(g)
					y := 0.0
					for _, q := range pieces[:len(pieces)-1] {
						y = math.Max(y, math.Abs(q.Hi)/math.Sqrt(tt))
					}
					if !ok {
						t.Errorf("%s/%s g=%v S=%v: no slopes", l.Name(), p.Name(), g, S)
						continue
					}
					if y > 40 || m.A == 0 {
						continue // the differences lose their digits to rounding
					}
					n++
					h := 1e-4 / (1 + y*y)
					cmpSlopes(t, l.Name()+"/"+p.Name()+gtString(g, tt), m, sl, g, tt, h, func(g, tt float64) Moments { return Expect(l, p, g, tt) })
				}
			}
		}
	}
	t.Logf("%d cases", n)
}
