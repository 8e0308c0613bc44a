package study

import (
	"context"
	"math"
	"strings"
	"testing"

	"hdrisk/engine/fixedpoint"
)

// For a Gaussian prior the posterior mean is ridge with l2 = Delta/rho2, so the best ridge
// must be found there, with the Bayes error (docs/method.md section 4; Tulino & Verdu 2004, Random
// Matrix Theory and Wireless Communications, section 3.1). Both numbers are computed here:
// the l2 by Best's search, the error by Bayes' state evolution with the posterior-mean
// denoiser.
func TestBestRidgeIsBayesForGaussianPrior(t *testing.T) {
	for _, c := range []struct {
		design      string
		rho2, delta float64
	}{
		{gaussDesign(0.5, "rows"), 1, 0.1},
		{gaussDesign(2.5, "columns"), 0.7, 1},
		{gaussDesign(1, "rows"), 2, 0.05},
		{orthoDesign(0.3, "rows"), 1, 0.01},
		{orthoDesign(2, "columns"), 2.5, 0.5},
		{`{"shape": "uniform-sv", "alpha": 0.7, "scale": "rows", "min": 0.2, "max": 1.5}`, 1, 0.2},
		{`{"shape": "geometric-sv", "alpha": 1.5, "scale": "columns", "condition": 30}`, 1.3, 0.03},
	} {
		s := scen(t, c.design, gaussSignal(c.rho2), c.delta, ridge(1))
		b, err := Best(context.Background(), s, BestSpec{})
		if err != nil {
			t.Fatalf("%+v: %v", c, err)
		}
		want := c.delta / c.rho2
		if b.Over != "l2" || b.AtBound != "" || relDiff(b.Value, want) > 1e-5 {
			t.Errorf("%+v: best %s = %.10g (bound %q), want l2 = Delta/rho2 = %.10g (rel %.2g)", c, b.Over, b.Value, b.AtBound, want, relDiff(b.Value, want))
		}
		p, err := s.Problem()
		if err != nil {
			t.Fatal(err)
		}
		bayes, err := Bayes(p)
		if err != nil {
			t.Fatal(err)
		}
		if bayes.Differ || !bayes.Uninformed.Converged || !bayes.Informed.Converged {
			t.Errorf("%+v: Bayes %+v; a Gaussian prior has one fixed point", c, bayes)
		}
		if d := relDiff(b.MSE, bayes.Uninformed.MSE); d > 1e-9 {
			t.Errorf("%+v: best ridge MSE %.14g, Bayes %.14g (rel %.2g)", c, b.MSE, bayes.Uninformed.MSE, d)
		}
	}
}

// At equal Frobenius norm (the same scale, so the same E_nu[lambda]) a row-orthogonal design
// gives the LASSO a lower best-regularized error than an i.i.d. Gaussian design for a sparse
// signal (a fact of the trade; common practice).
func TestBestOrthogonalBeatsGaussian(t *testing.T) {
	for _, c := range []struct{ alpha, density, delta float64 }{
		{0.3, 0.05, 0.01}, {0.5, 0.1, 0.01}, {0.5, 0.2, 0.1}, {0.7, 0.15, 0.001}, {0.4, 0.1, 1},
	} {
		var mse [2]float64
		for k, d := range []string{orthoDesign(c.alpha, "rows"), gaussDesign(c.alpha, "rows")} {
			b, err := Best(context.Background(), scen(t, d, bgSignal(c.density, 1), c.delta, lasso(0.1)), BestSpec{})
			if err != nil {
				t.Fatal(err)
			}
			if b.AtBound != "" || !b.Result.Converged {
				t.Fatalf("%+v: best l1 at bound %q", c, b.AtBound)
			}
			mse[k] = b.MSE
		}
		if !(mse[0] < mse[1]) {
			t.Errorf("%+v: best LASSO MSE %.6g with the orthogonal design, %.6g with the Gaussian one", c, mse[0], mse[1])
		}
	}
}

// The best point is no worse than any point of a dense sweep, and lies within one step of
// the sweep's best point.
func TestBestAgainstDenseSweep(t *testing.T) {
	s := scen(t, gaussDesign(0.6, "rows"), bgSignal(0.1, 1), 0.05, lasso(0.1))
	b, err := Best(context.Background(), s, BestSpec{})
	if err != nil {
		t.Fatal(err)
	}
	pts, err := Sweep(context.Background(), s, SweepSpec{Axis: Axis{Over: "l1", From: 1e-3, To: 10, Points: 801, Log: true}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	k := 0
	for i, p := range pts {
		if !p.OK() {
			t.Fatalf("l1 = %v: %s", p.X, p.Status())
		}
		if p.Result.MSE < pts[k].Result.MSE {
			k = i
		}
	}
	if b.MSE > pts[k].Result.MSE*(1+1e-12) {
		t.Errorf("Best MSE %.14g above the sweep's %.14g (at l1 = %v)", b.MSE, pts[k].Result.MSE, pts[k].X)
	}
	step := math.Pow(10, 4.0/800)
	if b.Value < pts[k].X/step || b.Value > pts[k].X*step {
		t.Errorf("Best l1 = %v, the sweep's best %v", b.Value, pts[k].X)
	}
}

// Best-regularization answers are stable to 1e-4 relative when the grid, the search range
// and the tolerances change.
func TestBestStable(t *testing.T) {
	// The weight must matter for its best value to be well defined: an l2 of 1e-4 beside an
	// l1 of 5e-3 moves the MSE so little that its minimum is flat to the solver's precision
	// (the density 0.5 case below keeps l2 relevant).
	cases := []struct {
		name    string
		density float64
		pen     string
		over    string
	}{
		{"lasso", 0.15, lasso(0.1), "l1"},
		{"ridge on a sparse signal", 0.15, ridge(0.1), "l2"},
		{"elastic net, l2 with l1 fixed", 0.5, `{"kind": "elastic-net", "l1": 0.02, "l2": 0.02}`, "l2"},
		{"elastic net along l2/l1", 0.15, `{"kind": "elastic-net", "l1": 0.005, "l2": 0.002}`, Ratio},
	}
	specs := []BestSpec{
		{},
		{PerDecade: 7, Tol: 1e-9, Solver: fixedpoint.Options{Tol: 1e-13}},
		{PerDecade: 3, Lo: 1e-6, Hi: 1e2, Tol: 1e-6},
		{PerDecade: 5, Lo: 3e-7, Hi: 3e3, Solver: fixedpoint.Options{Tol: 1e-11, MaxIter: 5000}},
	}
	for _, c := range cases {
		s := scen(t, gaussDesign(0.5, "rows"), bgSignal(c.density, 1), 0.02, c.pen)
		var ref BestResult
		for i, spec := range specs {
			spec.Over = c.over
			b, err := Best(context.Background(), s, spec)
			if err != nil {
				t.Fatalf("%s, spec %d: %v", c.name, i, err)
			}
			if b.AtBound != "" {
				t.Fatalf("%s, spec %d: at bound %q", c.name, i, b.AtBound)
			}
			if i == 0 {
				ref = b
				continue
			}
			if d := relDiff(b.Value, ref.Value); d > 1e-4 {
				t.Errorf("%s, spec %d: best %.10g, default search %.10g (rel %.2g)", c.name, i, b.Value, ref.Value, d)
			}
			if d := relDiff(b.MSE, ref.MSE); d > 1e-8 {
				t.Errorf("%s, spec %d: MSE %.14g, default search %.14g (rel %.2g)", c.name, i, b.MSE, ref.MSE, d)
			}
		}
		if c.over == Ratio {
			l1, _ := ref.Scenario.Get("l1")
			l2, _ := ref.Scenario.Get("l2")
			if relDiff(l2/l1, 0.4) > 1e-12 || l1 != ref.Value {
				t.Errorf("along the ratio: l1 %v, l2 %v; want l2/l1 = 0.4 and l1 = Value = %v", l1, l2, ref.Value)
			}
		}
	}
}

// The bracketing step says when the minimum sits at a bound of the search instead of
// reporting an edge point as a minimum.
func TestBestBounds(t *testing.T) {
	s := scen(t, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.1))
	free, err := Best(context.Background(), s, BestSpec{})
	if err != nil || free.AtBound != "" {
		t.Fatalf("free search: %+v, %v", free, err)
	}
	lo, err := Best(context.Background(), s, BestSpec{Lo: 10 * free.Value, Hi: 1000 * free.Value})
	if err != nil || lo.AtBound != Lower || lo.Value != 10*free.Value {
		t.Errorf("range above the minimum: bound %q at %v, %v", lo.AtBound, lo.Value, err)
	}
	hi, err := Best(context.Background(), s, BestSpec{Lo: 1e-3 * free.Value, Hi: 0.1 * free.Value})
	if err != nil || hi.AtBound != Upper || hi.Value != 0.1*free.Value {
		t.Errorf("range below the minimum: bound %q at %v, %v", hi.AtBound, hi.Value, err)
	}
	// Noiseless and below the Donoho-Tanner curve: the smaller the penalty, the better. At
	// l1 = 1e-3 the fixed point converges and the minimum is at the bound; from 1e-4 up the
	// smallest l1 take the solver more than its 2000 iterations at Best's tolerance, so the
	// lowest converged point is the bound, with a note.
	nl := scen(t, gaussDesign(0.5, "columns"), bgSignal(0.1, 1), 0, lasso(0.1))
	b, err := Best(context.Background(), nl, BestSpec{Lo: 1e-3})
	if err != nil || b.AtBound != Lower || b.Value != 1e-3 || b.Note != "" || b.Result.NMSE > 1e-5 {
		t.Errorf("noiseless recovery from 1e-3: bound %q at %v (%s), NMSE %v, %v", b.AtBound, b.Value, b.Note, b.Result.NMSE, err)
	}
	// With too few iterations allowed, the smallest l1 do not converge: the lowest converged
	// point is then reported as the bound, with a note, not as an interior minimum.
	b, err = Best(context.Background(), nl, BestSpec{Lo: 1e-5, Solver: fixedpoint.Options{MaxIter: 300}})
	if err != nil || b.AtBound != Lower || b.Note == "" || b.Value <= 1e-5 || b.Result.NMSE > 1e-4 {
		t.Errorf("noiseless recovery, 300 iterations: bound %q at %v (%s), NMSE %v, %v", b.AtBound, b.Value, b.Note, b.Result.NMSE, err)
	}
	t.Logf("noiseless recovery, 300 iterations: %s at l1 = %v: %s", b.AtBound, b.Value, b.Note)
	// A signal drowned in noise: the zero estimate is best.
	loud := scen(t, gaussDesign(0.1, "rows"), `{"law": "bernoulli-rademacher", "density": 0.01, "amplitude": 1}`, 100, lasso(0.1))
	b, err = Best(context.Background(), loud, BestSpec{})
	if err != nil || b.AtBound != Upper || !b.Result.EstimateZero {
		t.Errorf("signal in loud noise: bound %q, zero estimate %v, MSE %v, %v", b.AtBound, b.Result.EstimateZero, b.MSE, err)
	}
}

func TestBestErrors(t *testing.T) {
	for _, c := range []struct {
		pen, over string
		spec      BestSpec
		want      string
	}{
		{lasso(0.1), "l2", BestSpec{}, "l2"},
		{lasso(0.1), Ratio, BestSpec{}, "over"},
		{`{"kind": "elastic-net", "l1": 0.1, "l2": 0}`, Ratio, BestSpec{}, "over"},
		{lasso(0.1), "l1", BestSpec{Lo: 1, Hi: 0.5}, "lo"},
	} {
		s := scen(t, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, c.pen)
		c.spec.Over = c.over
		_, err := Best(context.Background(), s, c.spec)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s over %q: error %v, want one naming %q", c.pen, c.over, err, c.want)
		}
	}
	// The power penalty's one strength is its weight, found by its role rather than its name.
	pw := scen(t, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, `{"kind": "power", "weight": 0.1, "q": 1.5}`)
	if b, err := Best(context.Background(), pw, BestSpec{Lo: 1e-3, Hi: 10, Tol: 1e-3}); err != nil || b.Over != "weight" {
		t.Errorf("power penalty, no field named: over %q, %v; want weight", b.Over, err)
	}
	s := scen(t, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, `{"kind": "huber", "l1": 0.1, "width": 0.5}`)
	if b, err := Best(context.Background(), s, BestSpec{Over: "width", Lo: 1e-3, Hi: 1e3}); err != nil || b.Over != "width" {
		t.Errorf("Huber penalty over width: %v", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Best(ctx, s, BestSpec{}); err == nil {
		t.Error("cancelled context: no error")
	}
}
