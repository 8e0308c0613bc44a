package fixedpoint

import (
	"errors"
	"math"
	"strings"
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/param"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

// Least squares on a design with no eigenvalue at 0 is solved in closed form: the error is
// noise E[1/lambda] and the training error noise (1 - 1/alpha) (the least-squares risk
// Delta tr((F^T F)^-1)/n and residual Delta (m - n)/m, common practice), here with lambda
// uniform on [a, b] so that E[1/lambda] = log(b/a)/(b - a). Spreads up to 1e28, where the
// iteration's equations are degenerate to E[1/lambda]^2/E[1/lambda^2] ~ 1e-25.
func TestLeastSquaresClosedForm(t *testing.T) {
	for _, a := range []float64{1e-3, 1e-16, 1e-28} {
		for _, alpha := range []float64{1.5, 3} {
			d := must(design.UniformEV(alpha, a, 1, design.AsGiven))
			p := Problem{Design: d, Signal: must(signal.Gauss(2)), Penalty: must(penalty.L1(0)), Noise: 0.01}
			r, err := Solve(p, Options{})
			if err != nil {
				t.Errorf("a=%v alpha=%v: %v", a, alpha, err)
				continue
			}
			want := 0.01 * math.Log(1/a) / (1 - a)
			if math.Abs(r.MSE-want) > 1e-12*want || !r.Converged {
				t.Errorf("a=%v alpha=%v: MSE %.15g, want %.15g (converged %v)", a, alpha, r.MSE, want, r.Converged)
			}
			if tr := 0.01 * (1 - 1/alpha); math.Abs(r.TrainError-tr) > 1e-12*tr {
				t.Errorf("a=%v alpha=%v: training error %.15g, want %.15g", a, alpha, r.TrainError, tr)
			}
			if a == 1e-3 {
				// Where the iteration is well determined, a vanishing ridge agrees.
				q := p
				q.Penalty = must(penalty.Ridge(1e-12))
				rr, err := Solve(q, Options{})
				if err != nil || math.Abs(rr.MSE-want) > 1e-8*want {
					t.Errorf("a=%v alpha=%v: ridge 1e-12 gives %v (%v), least squares %v", a, alpha, rr.MSE, err, want)
				}
			}
		}
	}
}

// A penalty too weak to act on a design whose eigenvalues spread over more decades than
// double precision resolves: the fixed point's equations are degenerate, every t1 nearly
// solves them, and versions of the solver reported NMSE 0.11, 0.015 and 6.05 as converged for
// the first case (a random property-test draw). Solve refuses, naming the design, and a
// well-determined neighbour (spread 1e3) is still solved.
func TestUndeterminedRefused(t *testing.T) {
	for _, c := range []struct {
		name string
		p    Problem
	}{
		{"laplace lasso, spread 4e23", Problem{
			Design:  must(design.UniformEV(28.042351600557925, 1263.9617737794083, 5.4753395330922204e+26, design.AsGiven)),
			Signal:  must(signal.Laplace(150.18216386132028)),
			Penalty: must(penalty.L1(0.01429531315091322)),
			Noise:   1.7678053420704063,
		}},
		{"gauss lasso l1 1e-9, spread 1e16", Problem{
			Design:  must(design.UniformEV(3, 1e-16, 1, design.AsGiven)),
			Signal:  must(signal.Gauss(1)),
			Penalty: must(penalty.L1(1e-9)),
			Noise:   0.01,
		}},
	} {
		r, err := Solve(c.p, Options{})
		var fe *param.Error
		if !errors.As(err, &fe) || fe.Field != "design" || !strings.Contains(fe.Reason, "not determined") {
			t.Errorf("%s: got %+v, %v; want a refusal naming design", c.name, r, err)
		}
	}
	p := Problem{Design: must(design.UniformEV(3, 1e-3, 1, design.AsGiven)), Signal: must(signal.Gauss(1)), Penalty: must(penalty.L1(1e-9)), Noise: 0.01}
	if r, err := Solve(p, Options{}); err != nil || !r.Converged {
		t.Errorf("spread 1e3: %+v, %v", r, err)
	} else if ls := 0.01 * math.Log(1e3) / (1 - 1e-3); math.Abs(r.MSE-ls) > 1e-6*ls {
		t.Errorf("spread 1e3, l1 1e-9: MSE %v, least squares %v", r.MSE, ls)
	}
}

// A ridge so weak that its prox is the identity at g = 1 but not at the least-squares g1 =
// 1/E[1/lambda] is not least squares: Solve leaves it to the iteration, whose answer there
// is ridge's, below the least-squares error.
func TestWeakRidgeIsNotLeastSquares(t *testing.T) {
	d := must(design.UniformEV(3, 1e-20, 1e-16, design.AsGiven))
	p := Problem{Design: d, Signal: must(signal.Gauss(1)), Penalty: must(penalty.Ridge(1e-17)), Noise: 1e-30}
	r, err := Solve(p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(r.Note, "least squares") {
		t.Errorf("ridge 1e-17 solved as least squares: %+v", r)
	}
}

// A quadrature path near noiseless recovery (a power penalty, q = 1.61, NMSE 4.7e-12; one
// draw of 100000 in the property test) settles at a relative change of 1e-10 to 1e-9 against
// the tolerance 1e-10: the rule's rounding. It is reported converged, with a note giving the
// residual, at the point a looser tolerance reaches to 1e-9.
func TestQuadratureSettles(t *testing.T) {
	p := Problem{
		Design:  must(design.Gaussian(13.812330783112287, design.AsGiven)),
		Signal:  must(signal.BernoulliRademacher(0.004029176899156393, 5350.877112587737)),
		Penalty: must(penalty.Power(0.0004740845640980157, 1.6093576505344076)),
		Noise:   3.874351975795425e-30,
	}
	r, err := Solve(p, Options{})
	if err != nil || !r.Converged || !strings.Contains(r.Note, "precision of the quadrature") || !(r.Residual < quadSettle*1e-10) {
		t.Fatalf("%+v, %v", r, err)
	}
	loose, err := Solve(p, Options{Tol: 1e-9})
	if err != nil || math.Abs(r.NMSE-loose.NMSE) > 1e-9*loose.NMSE {
		t.Errorf("settled NMSE %v, at tolerance 1e-9 %v (%v)", r.NMSE, loose.NMSE, err)
	}
}
