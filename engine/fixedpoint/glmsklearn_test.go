package fixedpoint

import (
	"encoding/json"
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

// sklearnCase is one case of testdata/sklearn/glm_sklearn.json, written by glm_sklearn.py
// (scikit-learn of Debian's python3-sklearn; the script's header states how each estimator's
// parametrization maps onto the engine's problem).
type sklearnCase struct {
	Name, Shape, Estimator string
	Alpha, Noise           float64
	Signal                 map[string]any
	Readout                map[string]any
	L1, L2, Epsilon        float64
	AlphaSK                float64 `json:"alpha_sk"`
	SigmaHat               float64 `json:"sigma_hat"`
	MSE                    float64 `json:"mse"`
	MSESem                 float64 `json:"mse_sem"`
	Cosine                 float64 `json:"cosine"`
	CosineSem              float64 `json:"cosine_sem"`
}

func (c sklearnCase) problem(t *testing.T) GLM {
	var d design.Law
	if c.Shape == "gaussian" {
		d = must(design.Gaussian(c.Alpha, design.Rows))
	} else {
		d = must(design.Orthogonal(c.Alpha, design.Rows))
	}
	var x signal.Law
	if c.Signal["law"] == "gauss" {
		x = must(signal.Gauss(c.Signal["variance"].(float64)))
	} else {
		x = must(signal.BernoulliGauss(c.Signal["density"].(float64), c.Signal["variance"].(float64)))
	}
	g := GLM{Design: d, Signal: x, Noise: must(noise.Gauss(c.Noise))}
	switch c.Readout["kind"] {
	case "logistic":
		g.Readout, g.Noise = readout.Logistic(), nil
	case "sign":
		g.Readout = readout.Sign()
	case "quantize":
		g.Readout = must(readout.Quantize(int(c.Readout["bits"].(float64)), c.Readout["range"].(float64)))
	case "outliers":
		g.Readout = readout.Linear()
		g.Noise = must(noise.Outliers(c.Noise, c.Readout["fraction"].(float64), c.Readout["outlier_variance"].(float64)))
	default:
		t.Fatalf("%s: readout %v", c.Name, c.Readout)
	}
	switch c.Estimator {
	case "logistic-l2":
		g.Loss, g.Penalty = loss.Logistic(), must(penalty.Ridge(c.L2))
	case "logistic-l1":
		g.Loss, g.Penalty = loss.Logistic(), must(penalty.L1(c.L1))
	case "lasso":
		g.Loss, g.Penalty = loss.Square(), must(penalty.L1(c.L1))
	case "huber":
		g.Loss, g.Penalty = must(loss.Huber(c.Epsilon*c.SigmaHat)), must(penalty.Ridge(c.AlphaSK*c.SigmaHat))
	default:
		t.Fatalf("%s: estimator %s", c.Name, c.Estimator)
	}
	return g
}

// TestAgainstScikitLearn compares the prediction with the mean over 10 instances of n = 400
// fitted by scikit-learn (LogisticRegression with l2 and l1 penalties, Lasso on sign and 2-bit
// readouts, HuberRegressor at its fitted scale), on Gaussian and orthogonal designs. The
// tolerance is 4 standard errors of the mean plus 3% for the finite size.
func TestAgainstScikitLearn(t *testing.T) {
	b, err := os.ReadFile("../../testdata/sklearn/glm_sklearn.json")
	if err != nil {
		t.Fatal(err)
	}
	var f struct{ Cases []sklearnCase }
	if err := json.Unmarshal(b, &f); err != nil {
		t.Fatal(err)
	}
	for _, c := range f.Cases {
		r, err := SolveGLM(c.problem(t), Options{})
		if err != nil || !r.Converged {
			t.Fatalf("%s: %v converged %v", c.Name, err, r.Converged)
		}
		if d := math.Abs(r.MSE - c.MSE); d > 4*c.MSESem+0.03*r.MSE {
			t.Errorf("%s: MSE %.4g, scikit-learn %.4g +- %.2g", c.Name, r.MSE, c.MSE, c.MSESem)
		}
		if d := math.Abs(r.Cosine - c.Cosine); d > 4*c.CosineSem+0.03*r.Cosine {
			t.Errorf("%s: cosine %.4g, scikit-learn %.4g +- %.2g", c.Name, r.Cosine, c.Cosine, c.CosineSem)
		}
		t.Logf("%s: MSE %.4g (sklearn %.4g +- %.2g), cosine %.4g (%.4g +- %.2g)", c.Name, r.MSE, c.MSE, c.MSESem, r.Cosine, c.Cosine, c.CosineSem)
	}
}
