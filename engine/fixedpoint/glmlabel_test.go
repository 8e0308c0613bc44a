package fixedpoint

import (
	"math"
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/loss"
	"hdrisk/engine/noise"
	"hdrisk/engine/penalty"
	"hdrisk/engine/readout"
	"hdrisk/engine/signal"
)

// TestSignSquareIsLinearWithGaussianDesign checks the label path of the output side against
// the equivalence of Thrampoulidis, Abbasi & Hassibi 2015 ("LASSO with non-linear
// measurements is equivalent to one with linear measurements", NeurIPS; the least-squares
// case is Brillinger 1982): with an i.i.d. Gaussian design, the square loss on y = sign(z + w)
// behaves as the square loss on y' = mu z + N(0, sigma^2) with mu = E[y z]/E[z^2] and
// sigma^2 = E[y^2] - mu^2 E[z^2]. For z ~ N(0, rhoz), mu = sqrt(2/(pi (rhoz + Delta))).
func TestSignSquareIsLinearWithGaussianDesign(t *testing.T) {
	for _, c := range []struct {
		alpha, delta float64
		pen          penalty.Penalty
	}{
		{0.6, 0.1, must(penalty.L1(0.05))},
		{2, 0.01, must(penalty.L1(0.2))},
		{1.5, 0.3, must(penalty.Ridge(0.5))},
	} {
		d := must(design.Gaussian(c.alpha, design.Columns))
		x := must(signal.BernoulliGauss(0.2, 1))
		rhoz := d.Mean() * x.Second() / d.Alpha()
		mu := math.Sqrt(2 / (math.Pi * (rhoz + c.delta)))
		sigma2 := 1 - mu*mu*rhoz
		lin, err := Solve(Problem{Design: d, Signal: newScaledLaw(x, mu), Penalty: c.pen, Noise: sigma2}, Options{Tol: 1e-12})
		if err != nil || !lin.Converged {
			t.Fatalf("Solve: %v", err)
		}
		got, err := SolveGLM(GLM{Design: d, Signal: x, Penalty: c.pen, Noise: must(noise.Gauss(c.delta)),
			Readout: readout.Sign(), Loss: loss.Square()}, Options{Tol: 1e-12})
		if err != nil || !got.Converged {
			t.Fatalf("SolveGLM: %v converged %v after %d (res %g)", err, got.Converged, got.Iterations, got.Residual)
		}
		q := got.NormRatio * got.NormRatio * x.Second()
		cx := got.Cosine * math.Sqrt(q*x.Second())
		e := q - 2*mu*cx + mu*mu*x.Second()
		if d := relDiff(e, lin.MSE); d > 1e-6 {
			t.Errorf("alpha %g: E[(xhat - mu x0)^2] %v, linear equivalent %v (rel %.2g)", c.alpha, e, lin.MSE, d)
		}
		t.Logf("alpha %g: iterations %d, cosine %.6f, test error %.6f", c.alpha, got.Iterations, got.Cosine, got.TestError)
	}
}

// TestSquareDesignColdStart: with an orthogonal design at m/n = 1, S1 is bounded (S1(0) = 1),
// and a cold start whose g1 is too small for it put g on the boundary 0, where the output
// side has no precision; the solver must start again further in (found in the page's map).
func TestSquareDesignColdStart(t *testing.T) {
	r, err := SolveGLM(GLM{Design: must(design.Orthogonal(1, design.Rows)), Signal: must(signal.BernoulliGauss(0.05, 1)),
		Penalty: must(penalty.ElasticNet(0.05, 0)), Noise: must(noise.Gauss(0.01)), Readout: must(readout.Quantize(1, 1)),
		Loss: loss.Square()}, Options{})
	if err != nil || !r.Converged || !(r.Cosine > 0.5) {
		t.Fatalf("%v converged %v cosine %v", err, r.Converged, r.Cosine)
	}
}
