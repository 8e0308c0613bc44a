package fixedpoint

import (
	"fmt"
	"math"
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/loss"
	"hdrisk/engine/noise"
	"hdrisk/engine/penalty"
	"hdrisk/engine/readout"
	"hdrisk/engine/signal"
)

// defaultsCases spans designs, signal laws, penalties and noise levels of the existing tests.
func defaultsCases() map[string]Problem {
	cases := map[string]Problem{}
	designs := map[string]design.Law{
		"gauss0.5": must(design.Gaussian(0.5, design.Columns)),
		"gauss2":   must(design.Gaussian(2, design.Rows)),
		"orth0.7":  must(design.Orthogonal(0.7, design.Columns)),
		"geom1.5":  must(design.GeometricSV(1.5, 10, design.Columns)),
		"uev0.4":   must(design.UniformEV(0.4, 0.5, 3, design.AsGiven)),
	}
	signals := map[string]signal.Law{
		"bg0.1":   must(signal.BernoulliGauss(0.1, 1)),
		"gauss":   must(signal.Gauss(1)),
		"laplace": must(signal.Laplace(0.7)),
	}
	pens := map[string]penalty.Penalty{
		"l1":    must(penalty.L1(0.1)),
		"ridge": must(penalty.Ridge(0.3)),
		"enet":  must(penalty.ElasticNet(0.05, 0.2)),
	}
	for dn, d := range designs {
		for sn, x := range signals {
			for pn, f := range pens {
				for _, delta := range []float64{0.01, 0.3} {
					cases[fmt.Sprintf("%s/%s/%s/%g", dn, sn, pn, delta)] = Problem{Design: d, Signal: x, Penalty: f, Noise: delta}
				}
			}
		}
	}
	return cases
}

// TestDefaultsReproduceSolve: with the linear readout, Gaussian noise and the square loss the
// generalized iteration has the fixed point of Solve (docs/method.md section 10), so every
// observable agrees to 1e-9.
func TestDefaultsReproduceSolve(t *testing.T) {
	o := Options{Tol: 1e-13, MaxIter: 20000}
	for name, p := range defaultsCases() {
		t.Run(name, func(t *testing.T) {
			want, err := Solve(p, o)
			if err != nil || !want.Converged {
				t.Skipf("Solve: %v (converged %v)", err, want.Converged)
			}
			got, err := SolveGLM(GLM{Design: p.Design, Signal: p.Signal, Penalty: p.Penalty,
				Noise: must(noise.Gauss(p.Noise)), Readout: readout.Linear(), Loss: loss.Square()}, o)
			if err != nil || !got.Converged {
				t.Fatalf("SolveGLM: %v converged %v after %d", err, got.Converged, got.Iterations)
			}
			for _, c := range []struct {
				name string
				g, w float64
			}{{"mse", got.MSE, want.MSE}, {"train", got.TrainError, want.TrainError}, {"g1", got.G1, want.G1},
				{"t1", got.T1, want.T1}, {"nonzero", got.NonZero, want.NonZero}, {"V", got.Susceptibility, want.Susceptibility}} {
				if d := relDiff(c.g, c.w); d > 1e-9 {
					t.Errorf("%s: GLM %.15g, Solve %.15g (rel %.2g)", c.name, c.g, c.w, d)
				}
			}
		})
	}
}

// A 3-bit readout with l1 at m/n 0.5 on an orthogonal design (an invented scenario, the
// property the page's bit-depth map met): early Newton steps leave the problem's range there,
// and the solver must still reach the fixed point that the damped iteration with late Newton
// steps finds, not refuse it.
func TestGLMEarlyNewtonFallsBack(t *testing.T) {
	p := GLM{Design: must(design.Orthogonal(0.5, design.Rows)), Signal: must(signal.BernoulliGauss(0.05, 1)),
		Penalty: must(penalty.L1(0.05)), Noise: must(noise.Gauss(0.01)), Readout: must(readout.Quantize(3, 1)), Loss: loss.Square()}
	r, err := SolveGLM(p, Options{})
	if err != nil || !r.Converged {
		t.Fatalf("SolveGLM: %v, converged %v", err, r.Converged)
	}
	s, err := newGLMSolver(p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	s.cautious = true
	st := s.coldStart()
	want, err := s.run(st)
	if err != nil || !want.Converged {
		t.Fatalf("late Newton steps only: %v, converged %v", err, want.Converged)
	}
	if d := math.Abs(r.MSE-want.MSE) / want.MSE; d > 1e-9 {
		t.Errorf("MSE %.15g, with late Newton steps only %.15g (rel %.2g)", r.MSE, want.MSE, d)
	}
}
