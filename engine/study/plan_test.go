package study

import (
	"context"
	"math"
	"strings"
	"testing"
)

// Ridge on a Gaussian signal with a Gaussian design (rows scale): the best-regularized error
// is the MMSE rho2 (1 - F(x, b)/(4 b x)) with x = alpha rho2/Delta and b = 1/alpha (Tulino &
// Verdu 2004, eq. 2.121, from memory, in the columns scale; the rows scale multiplies the
// design by sqrt(alpha)). The planner's alpha must be where that closed form crosses the
// target, found here by bisection on the closed form itself.
func TestPlanRidgeClosedForm(t *testing.T) {
	const rho2, delta = 1.0, 0.1
	tvF := func(x, z float64) float64 {
		a := math.Sqrt(x*(1+math.Sqrt(z))*(1+math.Sqrt(z)) + 1)
		b := math.Sqrt(x*(1-math.Sqrt(z))*(1-math.Sqrt(z)) + 1)
		return (a - b) * (a - b)
	}
	mmse := func(alpha float64) float64 {
		x, b := alpha*rho2/delta, 1/alpha
		return rho2 * (1 - tvF(x, b)/(4*b*x))
	}
	s := scen(t, gaussDesign(1, "rows"), gaussSignal(rho2), delta, ridge(1))
	for _, db := range []float64{-3, -6, -10, -13} {
		target := rho2 * math.Pow(10, db/10)
		lo, hi := 1e-3, 100.0
		for range 200 {
			m := math.Sqrt(lo * hi)
			if mmse(m) > target {
				lo = m
			} else {
				hi = m
			}
		}
		pl, err := Plan(context.Background(), s, PlanSpec{Target: db, AlphaMax: 20})
		if err != nil {
			t.Fatal(err)
		}
		if !pl.Reached || relDiff(pl.Alpha, hi) > 1e-6 {
			t.Errorf("%v dB: alpha %.10g (reached %v: %s), closed form %.10g (rel %.2g)", db, pl.Alpha, pl.Reached, pl.Reason, hi, relDiff(pl.Alpha, hi))
		}
		if d := relDiff(pl.Best.Value, delta/rho2); d > 1e-5 {
			t.Errorf("%v dB: best l2 there %v, want Delta/rho2", db, pl.Best.Value)
		}
		t.Logf("%v dB: alpha %.8g after %d fixed points", db, pl.Alpha, pl.Solves)
	}
}

// The planner's answer is stable to 1e-4 relative when the scan, the search range and the
// tolerances change; it reaches the target at its alpha and not just below it.
func TestPlanLassoStable(t *testing.T) {
	s := scen(t, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.1))
	specs := []PlanSpec{
		{Target: -12},
		{Target: -12, PerDecade: 5, AlphaMin: 0.03, AlphaMax: 5, Tol: 1e-10},
		{Target: -12, PerDecade: 13, Best: BestSpec{PerDecade: 6, Tol: 1e-8}},
		{Target: 0.1 * math.Pow(10, -1.2), MSE: true, AlphaMax: 3},
	}
	var ref PlanResult
	for i, spec := range specs {
		pl, err := Plan(context.Background(), s, spec)
		if err != nil {
			t.Fatal(err)
		}
		if !pl.Reached || pl.Best.MSE > pl.TargetMSE {
			t.Fatalf("spec %d: %+v", i, pl)
		}
		if i == 0 {
			ref = pl
			below, _ := s.With("alpha", pl.Alpha*(1-1e-5))
			b, err := Best(context.Background(), below, BestSpec{})
			if err != nil || b.MSE <= pl.TargetMSE {
				t.Errorf("just below alpha %v the best MSE %v already reaches %v (%v)", pl.Alpha, b.MSE, pl.TargetMSE, err)
			}
			t.Logf("-12 dB: alpha %.8g, l1 %.6g, after %d fixed points", pl.Alpha, pl.Best.Value, pl.Solves)
			continue
		}
		if d := relDiff(pl.Alpha, ref.Alpha); d > 1e-4 {
			t.Errorf("spec %d: alpha %.10g, default %.10g (rel %.2g)", i, pl.Alpha, ref.Alpha, d)
		}
		if d := relDiff(pl.Best.Value, ref.Best.Value); d > 1e-4 {
			t.Errorf("spec %d: best l1 %.10g, default %.10g (rel %.2g)", i, pl.Best.Value, ref.Best.Value, d)
		}
	}
}

func TestPlanNotReached(t *testing.T) {
	s := scen(t, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.1, lasso(0.1))
	pl, err := Plan(context.Background(), s, PlanSpec{Target: -40, AlphaMax: 2})
	if err != nil {
		t.Fatal(err)
	}
	if pl.Reached || !strings.Contains(pl.Reason, "no alpha up to") || pl.Best.Scenario.Design.Alpha != 2 {
		t.Errorf("%+v", pl)
	}
	pl, err = Plan(context.Background(), s, PlanSpec{Target: -1, AlphaMin: 0.5, AlphaMax: 2})
	if err != nil {
		t.Fatal(err)
	}
	if !pl.Reached || pl.Alpha != 0.5 || !strings.Contains(pl.Reason, "already reached") {
		t.Errorf("%+v", pl)
	}
}

func TestPlanErrors(t *testing.T) {
	s := scen(t, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.1, lasso(0.1))
	for _, c := range []struct {
		spec PlanSpec
		want string
	}{
		{PlanSpec{Target: math.NaN()}, "target"},
		{PlanSpec{Target: -1, MSE: true}, "target"},
		{PlanSpec{Target: -10, AlphaMax: 1000}, "alpha-max"},
		{PlanSpec{Target: -10, AlphaMin: 3, AlphaMax: 2}, "alpha-min"},
	} {
		if _, err := Plan(context.Background(), s, c.spec); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%+v: %v, want an error naming %q", c.spec, err, c.want)
		}
	}
}
