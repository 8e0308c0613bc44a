package study

import (
	"context"
	"math"
	"testing"

	"hdrisk/engine/scenario"
)

// For a Gaussian signal the posterior mean is linear, so ridge at its best weight is the
// Bayes-optimal estimator (the Wiener filter; common practice): the best-tuned ridge curve
// must meet the Bayes-optimal error, computed by study.Bayes with the posterior-mean
// denoiser instead of the ridge proximal operator, at every m/n.
func TestTunedRidgeMeetsBayesOnGaussianSignal(t *testing.T) {
	s := scen(t, gaussDesign(1, "columns"), gaussSignal(1.5), 0.05, ridge(1))
	spec := SweepSpec{Axis: Axis{Over: "alpha", From: 0.3, To: 2, Points: 6}}
	pts, err := Tuned(context.Background(), s, spec, BestSpec{Over: "l2"}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(pts) != 6 {
		t.Fatalf("%d points, want 6", len(pts))
	}
	for _, p := range pts {
		if !p.OK() || p.AtBound != "" {
			t.Fatalf("alpha %v: %s, bound %q", p.X, p.Status(), p.AtBound)
		}
		sx, _ := s.With("alpha", p.X)
		pr, err := sx.Problem()
		if err != nil {
			t.Fatal(err)
		}
		b, err := Bayes(pr)
		if err != nil {
			t.Fatal(err)
		}
		if d := relDiff(p.Result.MSE, b.Uninformed.MSE); d > 1e-6 {
			t.Errorf("alpha %v: tuned ridge MSE %v, Bayes-optimal %v (rel. diff %.2g)", p.X, p.Result.MSE, b.Uninformed.MSE, d)
		}
	}
}

// A tuned curve lies on or below the curve of every fixed weight (a minimum over the
// weight; common practice), and its weight is where Best alone puts it.
func TestTunedLassoBelowFixedWeights(t *testing.T) {
	s := scen(t, gaussDesign(1, "columns"), bgSignal(0.2, 1), 0.01, lasso(0.1))
	spec := SweepSpec{Axis: Axis{Over: "alpha", From: 0.4, To: 1.6, Points: 5}}
	tuned, err := Tuned(context.Background(), s, spec, BestSpec{Over: "l1"}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, l1 := range []float64{0.01, 0.1, 1} {
		fixed, err := Sweep(context.Background(), withT(t, s, "l1", l1), spec, nil)
		if err != nil {
			t.Fatal(err)
		}
		for i, p := range fixed {
			if p.OK() && tuned[i].OK() && tuned[i].Result.MSE > p.Result.MSE*(1+1e-6) {
				t.Errorf("alpha %v: tuned MSE %v above that of l1 = %v (%v)", p.X, tuned[i].Result.MSE, l1, p.Result.MSE)
			}
		}
	}
	sx, _ := s.With("alpha", tuned[2].X)
	b, err := Best(context.Background(), sx, BestSpec{Over: "l1"})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(math.Log(b.Value/tuned[2].Weight)) > 1e-2 {
		t.Errorf("alpha %v: tuned weight %v, Best alone %v", tuned[2].X, tuned[2].Weight, b.Value)
	}
}

func TestTunedRefusals(t *testing.T) {
	s := scen(t, gaussDesign(1, "columns"), bgSignal(0.2, 1), 0.01, lasso(0.1))
	if _, err := Tuned(context.Background(), s, SweepSpec{Axis: Axis{Over: "l1", From: 0.01, To: 1, Points: 3}}, BestSpec{Over: "l1"}, nil); err == nil {
		t.Error("re-tuning the swept weight should be refused")
	}
	if _, err := Tuned(context.Background(), s, SweepSpec{Axis: Axis{Over: "alpha", From: 0.5, To: 1, Points: 3}}, BestSpec{Over: "l2"}, nil); err == nil {
		t.Error("tuning a weight the penalty lacks should be refused")
	}
}

func withT(t *testing.T, s scenario.Scenario, path string, v float64) scenario.Scenario {
	t.Helper()
	out, err := s.With(path, v)
	if err != nil {
		t.Fatal(err)
	}
	return out
}
