package study

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// dtCurve is the Donoho-Tanner weak phase transition of l1 recovery with a Gaussian design,
// given parametrically by tau > 0 (Donoho & Tanner 2009, J. AMS; the parametric form through
// the minimax soft-threshold risk, Donoho, Maleki & Montanari 2009, PNAS, from memory as
// quoted in docs/method.md section 9): eps = k/n and delta = m/n.
func dtCurve(tau float64) (eps, delta float64) {
	phi, tail := distuv.UnitNormal.Prob(tau), distuv.UnitNormal.Survival(tau)
	a := 2 * (phi - tau*tail)
	eps = a / (tau + a)
	delta = eps*(1+tau*tau) + (1-eps)*2*((1+tau*tau)*tail-tau*phi)
	return eps, delta
}

// dtEps returns the eps of the curve at delta, by bisection on tau (delta falls with tau).
func dtEps(delta float64) float64 {
	lo, hi := 1e-6, 20.0
	for range 200 {
		m := (lo + hi) / 2
		if _, d := dtCurve(m); d > delta {
			lo = m
		} else {
			hi = m
		}
	}
	e, _ := dtCurve(lo)
	return e
}

// The curve as the tests use it: at delta = 0.5, eps = 0.1928 and k/m = 0.3857 (docs/method.md
// section 9, from memory and checked there), and each point of the parametric form is the
// minimum over the threshold of the soft-threshold risk eps (1 + tau^2) + (1 - eps) 2((1 +
// tau^2) Phi(-tau) - tau phi(tau)) at its eps (the minimax characterization, Donoho, Maleki
// & Montanari 2009, PNAS).
func TestDonohoTannerCurve(t *testing.T) {
	e := dtEps(0.5)
	if math.Abs(e-0.1928) > 5e-5 || math.Abs(e/0.5-0.3857) > 1e-4 {
		t.Errorf("delta = 0.5: eps %.6f, k/m %.6f; want 0.1928 and 0.3857", e, e/0.5)
	}
	risk := func(eps, tau float64) float64 {
		phi, tail := distuv.UnitNormal.Prob(tau), distuv.UnitNormal.Survival(tau)
		return eps*(1+tau*tau) + (1-eps)*2*((1+tau*tau)*tail-tau*phi)
	}
	for _, tau := range []float64{0.3, 0.8, 1.5, 2.5} {
		eps, delta := dtCurve(tau)
		m := math.Inf(1)
		for k := 1; k < 200000; k++ {
			m = math.Min(m, risk(eps, float64(k)*5e-5))
		}
		if math.Abs(m-delta) > 1e-8 {
			t.Errorf("tau = %v: parametric delta %.10f, minimum risk %.10f", tau, delta, m)
		}
	}
}

// Noiseless LASSO with a vanishing penalty and a Gaussian design (columns scale) recovers a
// Bernoulli-Gaussian signal exactly below the Donoho-Tanner curve and not above it (Donoho &
// Tanner 2009, J. AMS; the curve as in TestDonohoTannerCurve). The density is set at 0.8 and
// 1.2 times the curve's eps at several delta, through a sweep over the density, at l1 = 1e-3
// and 1e-4. Below the curve the error vanishes with the penalty (quadratically: it drops by
// about 100 when l1 drops by 10, and is under 1e-6 at l1 = 1e-4); above it the error stays at a
// positive limit. (Smaller l1 take the solver more than its default 2000 iterations.)
func TestDonohoTannerTransition(t *testing.T) {
	for _, delta := range []float64{0.15, 0.3, 0.5, 0.7, 0.9} {
		ec := dtEps(delta)
		var nmse [2][2]float64 // [l1 = 1e-3, 1e-4][below, above]
		for k, l1 := range []float64{1e-3, 1e-4} {
			s := scen(t, gaussDesign(delta, "columns"), bgSignal(ec, 1), 0, lasso(l1))
			pts, err := Sweep(context.Background(), s, SweepSpec{Axis: Axis{Over: "density", From: 0.8 * ec, To: 1.2 * ec, Points: 2}}, nil)
			if err != nil {
				t.Fatal(err)
			}
			for i, p := range pts {
				if !p.OK() {
					t.Fatalf("delta = %v, density %v, l1 = %v: %s", delta, p.X, l1, p.Status())
				}
				nmse[k][i] = p.Result.NMSE
			}
		}
		if b := nmse[1][0]; b > 1e-6 || b > 0.02*nmse[0][0] {
			t.Errorf("delta = %v, 0.8 of the curve: NMSE %.3g at l1 = 1e-4 and %.3g at 1e-3; want exact recovery in the limit", delta, b, nmse[0][0])
		}
		if a := nmse[1][1]; a < 1e-2 || a < 0.5*nmse[0][1] {
			t.Errorf("delta = %v, 1.2 of the curve: NMSE %.3g at l1 = 1e-4 and %.3g at 1e-3; want a positive limit", delta, a, nmse[0][1])
		}
		t.Logf("delta %.2f eps_c %.5f: NMSE below %.3g -> %.3g, above %.3g -> %.3g", delta, ec, nmse[0][0], nmse[1][0], nmse[0][1], nmse[1][1])
	}
}

// A sweep does not warm-start from exact recovery: from such a start the solver stops at
// once on its error floor, and a point above the curve would be reported as recovered.
func TestSweepNoWarmStartFromExactRecovery(t *testing.T) {
	ec := dtEps(0.15)
	s := scen(t, gaussDesign(0.15, "columns"), bgSignal(ec, 1), 0, lasso(1e-7))
	pts, err := Sweep(context.Background(), s, SweepSpec{Axis: Axis{Over: "density", From: 0.8 * ec, To: 1.2 * ec, Points: 2}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !pts[0].OK() || pts[0].Result.NMSE > 1e-10 {
		t.Fatalf("below the curve: %s, NMSE %v; the case no longer sets up the warm start it tests", pts[0].Status(), pts[0].Result.NMSE)
	}
	if !pts[1].OK() || pts[1].Result.NMSE < 1e-2 {
		t.Errorf("above the curve after exact recovery: %s, NMSE %.3g after %d iterations; want clearly positive",
			pts[1].Status(), pts[1].Result.NMSE, pts[1].Result.Iterations)
	}
}
