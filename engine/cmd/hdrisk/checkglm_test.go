package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"
)

const oneBitScenario = `{"kind": "hdrisk.scenario", "version": 1, "title": "One-bit LASSO",
 "design": {"shape": "orthogonal", "alpha": 0.8},
 "signal": {"law": "bernoulli-gauss", "density": 0.2, "variance": 1},
 "noise": {"variance": 0.01},
 "readout": {"kind": "sign"}, "loss": {"kind": "square"},
 "penalty": {"kind": "l1", "l1": 0.1}}`

// check of a scenario with a readout group runs the generalized model's finite-size check:
// the mean error of solved instances lies within a few standard errors (plus a finite-size
// margin of 5 %) of the prediction, and so do the cosine and the test error (0.02 margin).
func TestCheckGLM(t *testing.T) {
	code, out, errs := call(t, oneBitScenario, "check", "-", "--n", "300", "--trials", "4")
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	var r struct {
		GLM                            bool
		MeanMSE                        float64  `json:"mean_mse"`
		StdErr                         float64  `json:"stderr"`
		PredictedMSE                   float64  `json:"predicted_mse"`
		MeanCosine                     float64  `json:"mean_cosine"`
		CosineStdErr                   float64  `json:"cosine_stderr"`
		PredictedCosine                float64  `json:"predicted_cosine"`
		MeanTestError                  *float64 `json:"mean_test_error"`
		TestErrorStdErr                float64  `json:"test_error_stderr"`
		PredictedTestError             float64  `json:"predicted_test_error"`
		Converged, PredictionConverged bool
		Trials, N, M                   int
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if !r.GLM || r.Trials != 4 || r.N != 300 || r.M != 240 {
		t.Fatalf("output %s", out)
	}
	if math.Abs(r.MeanMSE-r.PredictedMSE) > 4*r.StdErr+0.05*r.PredictedMSE ||
		math.Abs(r.MeanCosine-r.PredictedCosine) > 4*r.CosineStdErr+0.05*r.PredictedCosine {
		t.Errorf("instances %v +- %v (cosine %v +- %v), prediction %v (cosine %v)", r.MeanMSE, r.StdErr,
			r.MeanCosine, r.CosineStdErr, r.PredictedMSE, r.PredictedCosine)
	}
	// The sign readout gives labels: the test error on fresh rows stands beside its prediction.
	if r.MeanTestError == nil || math.Abs(*r.MeanTestError-r.PredictedTestError) > 4*r.TestErrorStdErr+0.02 {
		t.Errorf("test error %v +- %v, prediction %v", r.MeanTestError, r.TestErrorStdErr, r.PredictedTestError)
	}
	f := filepath.Join(t.TempDir(), "m.mtx")
	if err := os.WriteFile(f, []byte("%%MatrixMarket matrix array real general\n2 2\n1\n0\n0\n1\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	failing(t, "--matrix", oneBitScenario, "check", "-", "--matrix", f)
}
