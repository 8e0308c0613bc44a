package study

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"math"
	"strings"
	"testing"

	"hdrisk/engine/fixedpoint"
)

func TestAxisValues(t *testing.T) {
	for _, c := range []struct {
		a    Axis
		want []float64
	}{
		{Axis{From: 0, To: 1, Points: 5}, []float64{0, 0.25, 0.5, 0.75, 1}},
		{Axis{From: 1, To: 0, Points: 3}, []float64{1, 0.5, 0}},
		{Axis{From: 0.01, To: 100, Points: 5, Log: true}, []float64{0.01, 0.1, 1, 10, 100}},
		{Axis{From: 3, To: 7, Points: 1}, []float64{3}},
	} {
		got, err := c.a.Values()
		if err != nil {
			t.Fatalf("%+v: %v", c.a, err)
		}
		if len(got) != len(c.want) {
			t.Fatalf("%+v: %v, want %v", c.a, got, c.want)
		}
		for i := range got {
			if relDiff(got[i], c.want[i]) > 1e-14 && math.Abs(got[i]-c.want[i]) > 1e-15 {
				t.Errorf("%+v: value %d is %v, want %v", c.a, i, got[i], c.want[i])
			}
		}
		if got[0] != c.a.From || got[len(got)-1] != c.want[len(c.want)-1] {
			t.Errorf("%+v: end points %v, %v are not exact", c.a, got[0], got[len(got)-1])
		}
	}
	for _, c := range []struct {
		a     Axis
		field string
	}{
		{Axis{From: 0, To: 1, Points: 0}, "points"},
		{Axis{From: math.NaN(), To: 1, Points: 3}, "from"},
		{Axis{From: 0, To: math.Inf(1), Points: 3}, "to"},
		{Axis{From: 0, To: 1, Points: 3, Log: true}, "log"},
	} {
		_, err := c.a.Values()
		var se *SpecError
		if !errors.As(err, &se) || se.Field != c.field {
			t.Errorf("%+v: error %v, want one naming %q", c.a, err, c.field)
		}
	}
}

// Double descent: with a vanishing ridge the MSE over alpha peaks at alpha = 1 and follows
// the minimum-norm least-squares closed form on both sides: Delta/(alpha - 1) above 1 and
// rho2 (1 - alpha) + Delta alpha/(1 - alpha) below (Belkin, Hsu & Xu 2020, SIAM J. Math. Data
// Sci.; the form re-derived in docs/method.md section 9; the peak at alpha = 1 is common practice).
// At alpha = 1 itself the error of a ridge of 1e-10 is of order 1/sqrt(l2) and the fixed point
// is approached too slowly to converge; the sweep must then mark that point, not draw it.
func TestSweepDoubleDescent(t *testing.T) {
	const rho2, delta = 1.5, 0.2
	s := scen(t, gaussDesign(0.5, "rows"), gaussSignal(rho2), delta, ridge(1e-10))
	pts, err := Sweep(context.Background(), s, SweepSpec{Axis: Axis{Over: "alpha", From: 0.1, To: 3, Points: 59}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	peak := -1
	for i, p := range pts {
		a := p.X
		if math.Abs(a-1) < 1e-9 {
			if !p.OK() && p.Status() != "not converged" {
				t.Errorf("alpha = 1: status %q", p.Status())
			}
			if !p.OK() {
				continue
			}
		} else if !p.OK() {
			t.Fatalf("alpha = %v: %s", a, p.Status())
		}
		if peak < 0 || p.Result.MSE > pts[peak].Result.MSE {
			peak = i
		}
		if math.Abs(a-1) < 1e-9 {
			continue
		}
		want := delta / (a - 1)
		if a < 1 {
			want = rho2*(1-a) + delta*a/(1-a)
		}
		if d := relDiff(p.Result.MSE, want); d > 1e-6 {
			t.Errorf("alpha = %v: MSE %.10g, minimum-norm closed form %.10g (rel %.2g)", a, p.Result.MSE, want, d)
		}
		// Rising towards alpha = 1 from both sides (below 1 the closed form has its minimum at
		// 1 - alpha = sqrt(Delta/rho2), that is alpha = 0.635).
		if i > 0 && a > 0.7 && a < 1 && !(p.Result.MSE > pts[i-1].Result.MSE) {
			t.Errorf("alpha = %v: MSE %v does not rise towards 1 (%v before)", a, p.Result.MSE, pts[i-1].Result.MSE)
		}
		if i > 0 && a > 1.01 && pts[i-1].OK() && !(p.Result.MSE < pts[i-1].Result.MSE) {
			t.Errorf("alpha = %v: MSE %v does not fall after 1 (%v before)", a, p.Result.MSE, pts[i-1].Result.MSE)
		}
	}
	if math.Abs(pts[peak].X-1) > 0.05+1e-9 {
		t.Errorf("the MSE peaks at alpha = %v, not next to 1", pts[peak].X)
	}
}

// Warm starts change the path, not the answer: every point of a warm-started sweep agrees
// with a cold solve of the same scenario.
func TestSweepWarmMatchesCold(t *testing.T) {
	s := scen(t, gaussDesign(0.4, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.1))
	pts, err := Sweep(context.Background(), s, SweepSpec{Axis: Axis{Over: "l1", From: 1e-3, To: 10, Points: 25, Log: true}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range pts {
		sc, err := s.With("l1", p.X)
		if err != nil {
			t.Fatal(err)
		}
		cold := solveCold(t, sc)
		if !p.OK() || !cold.Converged {
			t.Fatalf("l1 = %v: sweep %s, cold converged %v", p.X, p.Status(), cold.Converged)
		}
		if d := relDiff(p.Result.MSE, cold.MSE); d > 1e-7 {
			t.Errorf("l1 = %v: warm MSE %.12g, cold %.12g (rel %.2g)", p.X, p.Result.MSE, cold.MSE, d)
		}
	}
}

// A point that does not converge is marked, and CSV output leaves its observables empty.
func TestSweepMarksNonConverged(t *testing.T) {
	s := scen(t, gaussDesign(0.3, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.05))
	spec := SweepSpec{Axis: Axis{Over: "noise", From: 0.01, To: 0.1, Points: 3}, Solver: fixedpoint.Options{MaxIter: 2}}
	pts, err := Sweep(context.Background(), s, spec, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range pts {
		if p.OK() || p.Status() != "not converged" || p.Result.Iterations == 0 {
			t.Errorf("noise = %v: status %q, iterations %d; want a marked non-converged point", p.X, p.Status(), p.Result.Iterations)
		}
	}
	var buf bytes.Buffer
	if err := WriteCSV(&buf, []string{"noise"}, pts); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	head := rows[0]
	if head[0] != "noise" || head[1] != "mse" || head[len(head)-1] != "status" {
		t.Fatalf("header %v", head)
	}
	for _, r := range rows[1:] {
		if r[1] != "" || r[len(r)-1] != "not converged" || r[len(r)-4] != "false" {
			t.Errorf("row %v: a non-converged point must have empty observables and say so", r)
		}
	}
}

func TestSweepCSVConverged(t *testing.T) {
	s := scen(t, orthoDesign(0.5, "rows"), bgSignal(0.2, 1), 0.01, lasso(0.05))
	pts, err := Sweep(context.Background(), s, SweepSpec{Axis: Axis{Over: "density", From: 0.05, To: 0.3, Points: 4}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteCSV(&buf, []string{"density"}, pts); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 5 || len(rows[0]) != 1+len(Observables())+5 {
		t.Fatalf("got %d rows of %d columns", len(rows), len(rows[0]))
	}
	for i, r := range rows[1:] {
		if r[len(r)-1] != "ok" || r[1] == "" {
			t.Errorf("row %d: %v", i, r)
		}
		if r[1] != num(pts[i].Result.MSE) {
			t.Errorf("row %d: mse %s, want %s in full precision", i, r[1], num(pts[i].Result.MSE))
		}
	}
}

func TestSweepCancel(t *testing.T) {
	s := scen(t, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.1))
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	var calls []int
	pts, err := Sweep(ctx, s, SweepSpec{Axis: Axis{Over: "l1", From: 0.01, To: 1, Points: 50, Log: true}}, func(done, total int) {
		calls = append(calls, done)
		if total != 50 {
			t.Errorf("total %d, want 50", total)
		}
		if done == 7 {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) || len(pts) != 7 {
		t.Fatalf("got %d points and %v, want 7 points and context.Canceled", len(pts), err)
	}
	if len(calls) != 7 || calls[6] != 7 {
		t.Errorf("progress calls %v", calls)
	}
}

func TestSweepSpecErrors(t *testing.T) {
	s := scen(t, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.1))
	for _, c := range []struct {
		a    Axis
		want string
	}{
		{Axis{Over: "", From: 1, To: 2, Points: 3}, "over"},
		{Axis{Over: "l2", From: 1, To: 2, Points: 3}, "l2"},
		{Axis{Over: "alpha", From: -1, To: 2, Points: 3}, "alpha"},
		{Axis{Over: "density", From: 0.1, To: 2, Points: 3}, "density"},
		{Axis{Over: "l1", From: 0, To: 2, Points: 3, Log: true}, "log"},
		{Axis{Over: "l1", From: 0.1, To: 2, Points: 1 << 20}, "points"},
	} {
		_, err := Sweep(context.Background(), s, SweepSpec{Axis: c.a}, nil)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%+v: error %v, want one naming %q", c.a, err, c.want)
		}
	}
}
