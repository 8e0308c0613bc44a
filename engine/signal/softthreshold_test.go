package signal

import (
	"math"
	"testing"

	"hdrisk/engine/penalty"
)

// The soft-threshold closed forms of docs/method.md section 3 (elastic net xhat = c soft(r, theta),
// zero-mean Gaussian component x0 ~ N(0, s2)), checked three ways: the formulas against direct
// numerical integration with gonum's quad (1-D over r for the moments of soft, 2-D over x0 and z
// for the MSE, without the posterior split), and Expect against the formulas.
func TestSoftThresholdClosedForms(t *testing.T) {
	for _, tc := range []struct{ s2, t, theta, c float64 }{
		{1, 0.1, 0.5, 1},
		{1, 0.1, 0.5, 0.6},
		{0, 0.3, 0.8, 1},
		{0, 1, 3, 0.9},
		{2.5, 0.01, 0.05, 0.8},
		{0.2, 2, 4, 1},
		{1, 1, 1e-6, 0.7},
	} {
		v := tc.s2 + tc.t
		sd := math.Sqrt(v)
		u := tc.theta / sd
		q := math.Erfc(u/math.Sqrt2) / 2
		phi := normPDF(u)
		beta := tc.s2 / v
		eSoft2 := 2 * v * ((1+u*u)*q - u*phi)
		eSoftR := 2 * v * q
		pNZ := 2 * q
		mse := tc.c*tc.c*eSoft2 - 2*tc.c*beta*eSoftR + tc.s2
		a := tc.c * 2 * q

		soft := func(r float64) float64 {
			switch {
			case r > tc.theta:
				return r - tc.theta
			case r < -tc.theta:
				return r + tc.theta
			}
			return 0
		}
		dens := func(r float64) float64 { return normPDF(r/sd) / sd }
		span := 14 * sd
		numSoft2 := integrate(func(r float64) float64 { return soft(r) * soft(r) * dens(r) }, -span, span, sd, -tc.theta, tc.theta)
		numSoftR := integrate(func(r float64) float64 { return soft(r) * r * dens(r) }, -span, span, sd, -tc.theta, tc.theta)
		numNZ := 2 * integrate(dens, tc.theta, span, sd)
		var numMSE float64
		st := math.Sqrt(tc.t)
		if tc.s2 == 0 {
			numMSE = integrate(func(z float64) float64 {
				d := tc.c * soft(st*z)
				return d * d * normPDF(z)
			}, -14, 14, 1, -tc.theta/st, tc.theta/st)
		} else {
			s := math.Sqrt(tc.s2)
			numMSE = integrate(func(x0 float64) float64 {
				inner := integrate(func(z float64) float64 {
					d := tc.c*soft(x0+st*z) - x0
					return d * d * normPDF(z)
				}, -14, 14, 1, (-tc.theta-x0)/st, (tc.theta-x0)/st)
				return inner * normPDF(x0/s) / s
			}, -14*s, 14*s, s)
		}
		for _, chk := range []struct {
			name           string
			formula, quadr float64
		}{
			{"E[soft^2]", eSoft2, numSoft2},
			{"E[soft r]", eSoftR, numSoftR},
			{"P(xhat != 0)", pNZ, numNZ},
			{"MSE", mse, numMSE},
		} {
			if !close(chk.formula, chk.quadr, 1e-10, 1e-12) {
				t.Errorf("%+v: %s closed form %.15g, quadrature %.15g", tc, chk.name, chk.formula, chk.quadr)
			}
		}

		l2 := 1/tc.c - 1 // c = g/(g + l2) with g = 1
		p := must(penalty.ElasticNet(tc.theta, l2))
		law := must(Gauss(tc.s2))
		m := Expect(law, p, 1, tc.t)
		for _, chk := range []struct {
			name           string
			got, want, tol float64
		}{
			{"MSE", m.MSE, mse, 1e-13},
			{"A", m.A, a, 1e-13},
			{"NonZero", m.NonZero, pNZ, 1e-13},
		} {
			if !close(chk.got, chk.want, chk.tol, 1e-300) {
				t.Errorf("%+v: Expect %s = %.17g, docs/method.md closed form %.17g", tc, chk.name, chk.got, chk.want)
			}
		}
	}
}
