package simulate

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/loss"
	"hdrisk/engine/noise"
	"hdrisk/engine/penalty"
	"hdrisk/engine/readout"
	"hdrisk/engine/signal"
)

func must[T any](v T, err error) T {
	if err != nil {
		panic(err)
	}
	return v
}

// TestPrimalDualIsProxGradientForSquareLoss: with the square loss the primal-dual splitting
// solves the same LASSO as ProxGradient.
func TestPrimalDualIsProxGradientForSquareLoss(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	d := DesignDraw{Law: must(design.Gaussian(0.7, design.Rows)), GaussianEntries: true}
	inst, err := Draw(rng, d, must(signal.BernoulliGauss(0.2, 1)), 0.01, 200)
	if err != nil {
		t.Fatal(err)
	}
	p := must(penalty.L1(0.1))
	a, err := ProxGradient(context.Background(), inst.Dense, inst.Y, p, 0, nil, SolverOptions{Tol: 1e-12, MaxIter: 100000})
	if err != nil || !a.Converged {
		t.Fatal(err)
	}
	b, err := PrimalDual(context.Background(), inst.Dense, inst.Y, loss.Square(), p, 0, nil, SolverOptions{Tol: 1e-12, MaxIter: 200000})
	if err != nil || !b.Converged {
		t.Fatalf("%v converged %v after %d", err, b.Converged, b.Iterations)
	}
	for i := range a.X {
		if math.Abs(a.X[i]-b.X[i]) > 1e-7 {
			t.Fatalf("x[%d]: prox gradient %v, primal-dual %v", i, a.X[i], b.X[i])
		}
	}
}

// TestGLMTrialsMatchPrediction: finite instances (n = 300, 6 trials) of the new readouts,
// noise laws and losses against SolveGLM, within 4 standard errors plus 5% for the size.
func TestGLMTrialsMatchPrediction(t *testing.T) {
	if testing.Short() {
		t.Skip("finite-size trials")
	}
	gauss := func(a float64) DesignDraw {
		return DesignDraw{Law: must(design.Gaussian(a, design.Rows)), GaussianEntries: true}
	}
	orth := func(a float64) DesignDraw {
		return DesignDraw{Law: must(design.Orthogonal(a, design.Rows)), Factors: FactorsQR}
	}
	cases := []struct {
		name string
		d    DesignDraw
		x    signal.Law
		w    noise.Law
		rd   readout.Readout
		ls   loss.Loss
		p    penalty.Penalty
	}{
		{"sign-square-l1/orthogonal", orth(0.8), must(signal.BernoulliGauss(0.2, 1)), must(noise.Gauss(0.01)), readout.Sign(), loss.Square(), must(penalty.L1(0.1))},
		{"outliers-huber-l1/gaussian", gauss(1.2), must(signal.BernoulliGauss(0.2, 1)), must(noise.Outliers(0.01, 0.1, 10)), readout.Linear(), must(loss.Huber(0.3)), must(penalty.L1(0.1))},
		{"laplace-absolute-ridge/orthogonal", orth(1.5), must(signal.Gauss(1)), must(noise.Laplace(0.1)), readout.Linear(), loss.Absolute(), must(penalty.Ridge(0.2))},
		{"sign-hinge-ridge/gaussian", gauss(2), must(signal.Gauss(1)), must(noise.Gauss(0.1)), readout.Sign(), loss.Hinge(), must(penalty.Ridge(0.5))},
		{"logistic-logistic-l1/orthogonal", orth(1.5), must(signal.BernoulliGauss(0.3, 5)), nil, readout.Logistic(), loss.Logistic(), must(penalty.L1(0.5))},
		{"2bit-student-square-l1/gaussian", gauss(0.8), must(signal.BernoulliGauss(0.2, 1)), must(noise.StudentT(0.02, 4)), must(readout.Quantize(2, 1)), loss.Square(), must(penalty.L1(0.05))},
	}
	rng := rand.New(rand.NewPCG(15, 2026))
	for _, c := range cases {
		pred, err := fixedpoint.SolveGLM(fixedpoint.GLM{Design: c.d.Law, Signal: c.x, Penalty: c.p, Noise: c.w, Readout: c.rd, Loss: c.ls}, fixedpoint.Options{})
		if err != nil || !pred.Converged {
			t.Fatalf("%s: %v", c.name, err)
		}
		const trials, n = 6, 300
		var mse, mse2, cos float64
		for range trials {
			tr, err := TrialGLM(context.Background(), rng, c.d, c.x, c.w, c.rd, c.ls, c.p, n, SolverOptions{Tol: 1e-9, MaxIter: 200000})
			if err != nil || !tr.Converged {
				t.Fatalf("%s: %v converged %v", c.name, err, tr.Converged)
			}
			mse += tr.MSE / trials
			mse2 += tr.MSE * tr.MSE / trials
			cos += tr.Cosine / trials
		}
		sem := math.Sqrt(math.Max(mse2-mse*mse, 0) / (trials - 1))
		t.Logf("%s: predicted MSE %.4g cosine %.4g; trials %.4g +- %.2g, cosine %.4g", c.name, pred.MSE, pred.Cosine, mse, sem, cos)
		if math.Abs(pred.MSE-mse) > 4*sem+0.05*pred.MSE {
			t.Errorf("%s: predicted MSE %.4g, trials %.4g +- %.2g", c.name, pred.MSE, mse, sem)
		}
	}
}

// TestGLMTrialsTestError: the test error measured on fresh rows of finite instances (n = 400,
// 6 trials) agrees with SolveGLM's within 4 standard errors plus 0.02 for the size, for
// label readouts; a readout without labels reports none (NaN).
func TestGLMTrialsTestError(t *testing.T) {
	if testing.Short() {
		t.Skip("finite-size trials")
	}
	gauss := DesignDraw{Law: must(design.Gaussian(2, design.Rows)), GaussianEntries: true}
	orth := DesignDraw{Law: must(design.Orthogonal(0.8, design.Rows)), Factors: FactorsQR}
	cases := []struct {
		name string
		d    DesignDraw
		x    signal.Law
		w    noise.Law
		rd   readout.Readout
		ls   loss.Loss
		p    penalty.Penalty
	}{
		{"1bit-square-l1/gaussian", gauss, must(signal.BernoulliGauss(0.2, 1)), must(noise.Gauss(0.01)), must(readout.Quantize(1, 1)), loss.Square(), must(penalty.L1(0.05))},
		{"sign-square-l1/orthogonal", orth, must(signal.BernoulliGauss(0.2, 1)), must(noise.Gauss(0.01)), readout.Sign(), loss.Square(), must(penalty.L1(0.1))},
		{"logistic-logistic-ridge/gaussian", gauss, must(signal.Gauss(4)), nil, readout.Logistic(), loss.Logistic(), must(penalty.Ridge(0.5))},
	}
	rng := rand.New(rand.NewPCG(16, 2026))
	for _, c := range cases {
		pred, err := fixedpoint.SolveGLM(fixedpoint.GLM{Design: c.d.Law, Signal: c.x, Penalty: c.p, Noise: c.w, Readout: c.rd, Loss: c.ls}, fixedpoint.Options{})
		if err != nil || !pred.Converged || !pred.Labels {
			t.Fatalf("%s: %v (labels %v)", c.name, err, pred.Labels)
		}
		const trials, n = 6, 400
		var te, te2 float64
		for range trials {
			tr, err := TrialGLM(context.Background(), rng, c.d, c.x, c.w, c.rd, c.ls, c.p, n, SolverOptions{Tol: 1e-9, MaxIter: 200000})
			if err != nil || math.IsNaN(tr.TestError) || tr.TestError < 0 || tr.TestError > 1 {
				t.Fatalf("%s: %v, test error %v", c.name, err, tr.TestError)
			}
			te += tr.TestError / trials
			te2 += tr.TestError * tr.TestError / trials
		}
		sem := math.Sqrt(math.Max(te2-te*te, 0) / (trials - 1))
		t.Logf("%s: predicted test error %.4g; trials %.4g +- %.2g", c.name, pred.TestError, te, sem)
		if math.Abs(pred.TestError-te) > 4*sem+0.02 {
			t.Errorf("%s: predicted test error %.4g, trials %.4g +- %.2g", c.name, pred.TestError, te, sem)
		}
	}
	tr, err := TrialGLM(context.Background(), rng, gauss, must(signal.Gauss(1)), must(noise.Gauss(0.1)), readout.Linear(), loss.Square(), must(penalty.Ridge(0.1)), 100, SolverOptions{})
	if err != nil || !math.IsNaN(tr.TestError) {
		t.Errorf("linear readout: test error %v (%v), want NaN", tr.TestError, err)
	}
}
