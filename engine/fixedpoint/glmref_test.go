package fixedpoint

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/loss"
	"hdrisk/engine/noise"
	"hdrisk/engine/penalty"
	"hdrisk/engine/readout"
	"hdrisk/engine/signal"
)

// glmRefs holds testdata/glm/glm_references.json, computed by testdata/glm/glm_references.py
// from the published equations (our own script; see its header for the equations).
type glmRefs struct {
	SurCandes []struct {
		Kappa, Gamma2, Alpha, Sigma float64
	} `json:"sur_candes"`
	Boundary []struct {
		Gamma, H float64
	} `json:"candes_sur_boundary"`
	Huber []struct {
		Kappa, Width, R2 float64
		Noise            [][2]float64
	} `json:"el_karoui_huber"`
}

func loadGLMRefs(t *testing.T) glmRefs {
	b, err := os.ReadFile("../../testdata/glm/glm_references.json")
	if err != nil {
		t.Fatal(err)
	}
	var r glmRefs
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	return r
}

// logisticMLE is the unpenalized logistic regression of logistic labels with a Gaussian design
// whose columns have unit norm (entries N(0, 1/m), as in Sur & Candes), at kappa = n/m and
// signal strength gamma^2 = Var((F x0)_mu) = E[x0^2] kappa.
func logisticMLE(kappa, gamma2 float64) GLM {
	return GLM{Design: must(design.Gaussian(1/kappa, design.Columns)), Signal: must(signal.Gauss(gamma2 / kappa)),
		Penalty: must(penalty.Ridge(0)), Readout: readout.Logistic(), Loss: loss.Logistic()}
}

// TestLogisticMLEBiasAndVariance: Sur & Candes 2019 (PNAS 116(29), "A modern maximum-likelihood
// theory for high-dimensional logistic regression"): beta_hat_j ~ alpha beta_j + sigma Z, with
// (alpha, sigma) from their three equations, solved by our script glm_references.py.
func TestLogisticMLEBiasAndVariance(t *testing.T) {
	for _, c := range loadGLMRefs(t).SurCandes {
		p := logisticMLE(c.Kappa, c.Gamma2)
		r, err := SolveGLM(p, Options{})
		if err != nil || !r.Converged {
			t.Fatalf("kappa %g gamma2 %g: %v converged %v", c.Kappa, c.Gamma2, err, r.Converged)
		}
		rho2 := p.Signal.Second()
		q := r.NormRatio * r.NormRatio * rho2
		cx := r.Cosine * math.Sqrt(q*rho2)
		alpha := cx / rho2
		sigma := math.Sqrt(q - cx*cx/rho2)
		if d := relDiff(alpha, c.Alpha); d > 1e-6 {
			t.Errorf("kappa %g gamma2 %g: bias alpha %.10g, Sur & Candes %.10g", c.Kappa, c.Gamma2, alpha, c.Alpha)
		}
		if d := relDiff(sigma, c.Sigma); d > 1e-6 {
			t.Errorf("kappa %g gamma2 %g: sigma %.10g, Sur & Candes %.10g", c.Kappa, c.Gamma2, sigma, c.Sigma)
		}
	}
}

// TestLogisticMLEExistenceBoundary: Candes & Sur 2020 (Ann. Statist. 48(1), "The phase
// transition for the existence of the maximum likelihood estimate in high-dimensional logistic
// regression"): the MLE exists iff kappa < h(gamma), h from our script. At gamma = 0 the labels
// carry no signal and h = 1/2: random labels are linearly separable once n/m > 1/2 (Cover
// 1965, IEEE Trans. Electron. Comput. 14(3)); there the labels are sign readouts of pure noise
// (correlation 1e-4 with F x0, as the signal must have power).
func TestLogisticMLEExistenceBoundary(t *testing.T) {
	for _, c := range loadGLMRefs(t).Boundary {
		for _, f := range []float64{0.9, 1.1} {
			kappa := f * c.H
			p := logisticMLE(kappa, c.Gamma*c.Gamma)
			if c.Gamma == 0 {
				p = GLM{Design: must(design.Gaussian(1/kappa, design.Columns)), Signal: must(signal.Gauss(1 / kappa)),
					Penalty: must(penalty.Ridge(0)), Noise: must(noise.Gauss(1e8)), Readout: readout.Sign(), Loss: loss.Logistic()}
			}
			_, err := SolveGLM(p, Options{MaxIter: 600})
			exists, why := existence(t, err)
			if want := f < 1; exists != want {
				t.Errorf("gamma %g kappa %g (boundary h = %g): exists %v, want %v (%s)", c.Gamma, kappa, c.H, exists, want, why)
			}
		}
	}
}

// TestPerceptronCapacity: random labels are separable by a hyperplane through the origin up to
// m/n = 2 (Cover 1965; Gardner 1988, J. Phys. A 21(1)), so the unpenalized hinge loss has a
// finite minimizer only beyond.
func TestPerceptronCapacity(t *testing.T) {
	for _, alpha := range []float64{1.8, 2.2} {
		_, err := SolveGLM(GLM{Design: must(design.Gaussian(alpha, design.Columns)), Signal: must(signal.Gauss(1)),
			Penalty: must(penalty.Ridge(0)), Noise: must(noise.Gauss(1e8)), Readout: readout.Sign(), Loss: loss.Hinge()}, Options{})
		exists, why := existence(t, err)
		if want := alpha > 2; exists != want {
			t.Errorf("m/n = %g: exists %v, want %v (%s)", alpha, exists, want, why)
		}
	}
}

// TestHuberRegressionVariance: El Karoui, Bean, Bickel, Lim & Yu 2013 (PNAS 110(36), "On
// robust regression with high-dimensional predictors"; Donoho & Montanari 2016, PTRF 166):
// unpenalized Huber regression with X_i ~ N(0, I_p) has ||beta_hat - beta0||^2 -> r^2 from
// their two equations, solved by our script. Rows of unit norm on average (entries N(0, 1/n))
// make (F (xhat - x0))_mu ~ N(0, MSE), so MSE is their r^2.
func TestHuberRegressionVariance(t *testing.T) {
	for _, c := range loadGLMRefs(t).Huber {
		var w noise.Law
		if len(c.Noise) == 1 {
			w = must(noise.Gauss(c.Noise[0][1]))
		} else {
			w = must(noise.Outliers(c.Noise[0][1], c.Noise[1][0], c.Noise[1][1]))
		}
		r, err := SolveGLM(GLM{Design: must(design.Gaussian(1/c.Kappa, design.Rows)), Signal: must(signal.BernoulliGauss(0.3, 2)),
			Penalty: must(penalty.Ridge(0)), Noise: w, Readout: readout.Linear(), Loss: must(loss.Huber(c.Width))}, Options{Tol: 1e-12})
		if err != nil || !r.Converged {
			t.Fatalf("kappa %g: %v converged %v", c.Kappa, err, r.Converged)
		}
		if d := relDiff(r.MSE, c.R2); d > 1e-8 {
			t.Errorf("kappa %g width %g noise %v: MSE %.12g, El Karoui et al. r^2 %.12g (rel %.2g)", c.Kappa, c.Width, c.Noise, r.MSE, c.R2, d)
		}
	}
}

// existence reads SolveGLM's verdict: true for a solution, false with the reason for a
// NoMinimizerError; any other error fails the test.
func existence(t *testing.T, err error) (bool, string) {
	t.Helper()
	var nm *NoMinimizerError
	switch {
	case err == nil:
		return true, ""
	case errors.As(err, &nm):
		return false, nm.Reason
	}
	t.Fatal(err)
	return false, ""
}
