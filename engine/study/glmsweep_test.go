package study

import (
	"context"
	"fmt"
	"math"
	"testing"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/scenario"
)

// glmScen builds an invented generalized scenario: the logistic classifier (logistic readout
// and loss, ridge) or the 1-bit recovery (sign readout of noisy measurements, square loss, l1).
func glmScen(t testing.TB, kind string) scenario.Scenario {
	t.Helper()
	var doc string
	switch kind {
	case "logistic":
		doc = `{"kind": "hdrisk.scenario", "version": 1, "title": "invented test case",
		"design": {"shape": "gaussian", "alpha": 2, "scale": "columns"}, "signal": {"law": "gauss", "variance": 1},
		"penalty": {"kind": "ridge", "l2": 0.1}, "readout": {"kind": "logistic"}, "loss": {"kind": "logistic"}}`
	case "sign":
		doc = `{"kind": "hdrisk.scenario", "version": 1, "title": "invented test case",
		"design": {"shape": "gaussian", "alpha": 0.6, "scale": "columns"}, "signal": {"law": "bernoulli-gauss", "density": 0.1, "variance": 1},
		"noise": {"variance": 0.01}, "penalty": {"kind": "l1", "l1": 0.05}, "readout": {"kind": "sign"}, "loss": {"kind": "square"}}`
	}
	s, err := scenario.Decode([]byte(doc))
	if err != nil {
		t.Fatalf("scenario %s: %v", doc, err)
	}
	return s
}

// glmAxis is the m/n axis of the GLM sweeps, from and to in the given direction.
func glmAxis(kind string, points int, down bool) Axis {
	a := Axis{Over: "alpha", From: 0.5, To: 4, Points: points}
	if kind == "sign" {
		a.From, a.To = 0.2, 3
	}
	if down {
		a.From, a.To = a.To, a.From
	}
	return a
}

// coldGLMSweep solves every point of the axis from the solver's cold starts.
func coldGLMSweep(t testing.TB, s scenario.Scenario, a Axis) []Point {
	t.Helper()
	c, err := s.Check()
	if err != nil {
		t.Fatal(err)
	}
	b, xs, err := a.bind(c, scenario.MaxSweepPoints, "")
	if err != nil {
		t.Fatal(err)
	}
	pts := make([]Point, len(xs))
	for i, x := range xs {
		cx, err := b.At(x)
		if err != nil {
			t.Fatal(err)
		}
		g, ok := cx.GLM()
		if !ok {
			t.Fatal("not a generalized model")
		}
		pts[i] = solveGLM(g, fixedpoint.Options{})
		pts[i].X = x
	}
	return pts
}

// TestGLMSweepWarmEqualsCold: along a sweep over m/n, in either direction, every warm-started
// point of the logistic and of the 1-bit scenario is the cold start's fixed point to the
// solver's tolerance (1e-10 on the relative change of the iterate; 1e-8 allowed on the
// observables, since near the fixed point the iterate's error is the step over one minus
// the contraction), and the warm sweep spends fewer iterations.
func TestGLMSweepWarmEqualsCold(t *testing.T) {
	for _, kind := range []string{"logistic", "sign"} {
		for _, down := range []bool{false, true} {
			s := glmScen(t, kind)
			a := glmAxis(kind, 40, down)
			warm, err := Sweep(context.Background(), s, SweepSpec{Axis: a}, nil)
			if err != nil {
				t.Fatal(err)
			}
			cold := coldGLMSweep(t, s, a)
			itw, itc, worst := 0, 0, 0.0
			for i := range warm {
				w, c := warm[i], cold[i]
				if !w.OK() || !c.OK() {
					t.Fatalf("%s down %v x %g: warm %q converged %v, cold %q converged %v", kind, down, w.X, w.Failed, w.Result.Converged, c.Failed, c.Result.Converged)
				}
				for _, f := range [][2]float64{{w.Result.NMSE, c.Result.NMSE}, {w.Result.Cosine, c.Result.Cosine},
					{w.Result.NormRatio, c.Result.NormRatio}, {w.Result.TestError, c.Result.TestError}, {w.Result.TrainLoss, c.Result.TrainLoss}} {
					d := relDiff(f[0], f[1])
					worst = math.Max(worst, d)
					if d > 1e-8 {
						t.Errorf("%s down %v x %g: warm %.12g, cold %.12g", kind, down, w.X, f[0], f[1])
					}
				}
				itw += w.Result.Iterations
				itc += c.Result.Iterations
			}
			t.Logf("%s down %v: %d iterations warm, %d cold; largest relative difference %.3g", kind, down, itw, itc, worst)
			if itw >= itc {
				t.Errorf("%s down %v: the warm sweep took %d iterations, the cold one %d", kind, down, itw, itc)
			}
		}
	}
}

// BenchmarkGLMSweep200 times a 200-point sweep over m/n of the logistic and the 1-bit
// scenario, warm-started (Sweep) and from cold starts at every point.
func BenchmarkGLMSweep200(b *testing.B) {
	for _, kind := range []string{"logistic", "sign"} {
		s := glmScen(b, kind)
		a := glmAxis(kind, 200, false)
		b.Run(fmt.Sprintf("%s/warm", kind), func(b *testing.B) {
			for b.Loop() {
				pts, err := Sweep(context.Background(), s, SweepSpec{Axis: a}, nil)
				if err != nil || len(pts) != 200 {
					b.Fatal(err)
				}
			}
		})
		b.Run(fmt.Sprintf("%s/cold", kind), func(b *testing.B) {
			for b.Loop() {
				if pts := coldGLMSweep(b, s, a); len(pts) != 200 {
					b.Fatal(len(pts))
				}
			}
		})
	}
}
