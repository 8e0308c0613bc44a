package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

// An invented scenario: sparse signal, orthonormal rows, LASSO.
const checkScenario = `{"kind": "hdrisk.scenario", "version": 1, "title": "invented: sparse signal, orthogonal rows",
 "design": {"shape": "orthogonal", "alpha": 0.5, "scale": "rows"},
 "signal": {"law": "bernoulli-gauss", "density": 0.1, "variance": 1},
 "noise": {"variance": 0.01},
 "penalty": {"kind": "l1", "l1": 0.05}}`

// check prints the fields of contract 3 and states its stopping rule; the same seed gives the
// same numbers.
func TestCheckCommand(t *testing.T) {
	for _, solver := range []string{"cd", "prox", "vamp"} {
		code, out, errs := call(t, checkScenario, "check", "-", "--n", "300", "--trials", "3", "--seed", "5", "--solver", solver)
		if code != 0 {
			t.Fatalf("%s: status %d: %s", solver, code, errs)
		}
		var r map[string]any
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatalf("%s: %v\n%s", solver, err, out)
		}
		for _, k := range []string{"mean_mse", "stderr", "trials", "n", "predicted_mse", "stop_criterion", "tol", "converged", "per_trial", "seed"} {
			if _, ok := r[k]; !ok {
				t.Errorf("%s: no %q", solver, k)
			}
		}
		// cd with fast factors on this orthogonal design runs prox, matrix-free, and says so.
		ran := map[string]string{"cd": "prox"}[solver]
		if ran == "" {
			ran = solver
		} else if note, _ := r["solver_note"].(string); !strings.Contains(note, "prox ran") {
			t.Errorf("%s: solver_note %q", solver, note)
		}
		if r["trials"] != 3.0 || r["n"] != 300.0 || r["solver"] != ran || r["converged"] != true {
			t.Errorf("%s: trials %v n %v solver %v converged %v", solver, r["trials"], r["n"], r["solver"], r["converged"])
		}
		if solver == "vamp" {
			if _, ok := r["vamp_trace"]; !ok {
				t.Error("vamp: no vamp_trace")
			}
		}
		_, again, _ := call(t, checkScenario, "check", "-", "--n", "300", "--trials", "3", "--seed", "5", "--solver", solver)
		var r2 map[string]any
		json.Unmarshal([]byte(again), &r2)
		if r2["mean_mse"] != r["mean_mse"] {
			t.Errorf("%s: mean_mse %v then %v with the same seed", solver, r["mean_mse"], r2["mean_mse"])
		}
	}
}

func TestCheckCommandErrors(t *testing.T) {
	failing(t, "cap of 1000000 unknowns", checkScenario, "check", "-", "--n", "2000000", "--solver", "vamp")
	failing(t, "cap of 25000000", checkScenario, "check", "-", "--n", "20000", "--factors", "haar-qr")
	failing(t, "--solver", checkScenario, "check", "-", "--solver", "newton")
	failing(t, "--factors", checkScenario, "check", "-", "--factors", "random")
	failing(t, "trials", checkScenario, "check", "-", "--trials", "0")
}

// A solver stopped by its iteration cap is reported as such, on stdout and stderr.
func TestCheckCommandIterationLimit(t *testing.T) {
	code, out, errs := call(t, checkScenario, "check", "-", "--n", "200", "--trials", "2", "--max-iter", "2", "--tol", "1e-14")
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	var r struct {
		Converged    bool     `json:"converged"`
		NotConverged int      `json:"not_converged"`
		Warnings     []string `json:"warnings"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if r.Converged || r.NotConverged != 2 || len(r.Warnings) != 2 || !strings.Contains(errs, "iteration limit") {
		t.Errorf("converged %v, not converged %d, warnings %q, stderr %q", r.Converged, r.NotConverged, r.Warnings, errs)
	}
}

// check --matrix holds the committed AR(1) matrix fixed: n and m are its shape, the verdict
// fields are present and consistent, and an --n other than its column count is refused.
func TestCheckMatrixCommand(t *testing.T) {
	const mtx = "../../../testdata/matrices/ar1_200x400.mtx"
	code, out, errs := call(t, checkScenario, "check", "-", "--matrix", mtx, "--trials", "12", "--seed", "3")
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	var r struct {
		N, M, Trials     int
		MeanMSE          float64 `json:"mean_mse"`
		MatrixMean       float64 `json:"matrix_mean_mse"`
		MatrixSE         float64 `json:"matrix_stderr"`
		RotatedMean      float64 `json:"rotated_mean_mse"`
		RotatedSE        float64 `json:"rotated_stderr"`
		Z                float64 `json:"z"`
		Agrees           bool    `json:"agrees"`
		Verdict, Factors string
		RotatedPerTrial  []map[string]any `json:"rotated_per_trial"`
		PerTrial         []map[string]any `json:"per_trial"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if r.N != 400 || r.M != 200 || r.Trials != 12 || len(r.PerTrial) != 12 || len(r.RotatedPerTrial) != 12 || r.Factors != "matrix" {
		t.Errorf("n %d m %d trials %d (%d, %d per trial), factors %q", r.N, r.M, r.Trials, len(r.PerTrial), len(r.RotatedPerTrial), r.Factors)
	}
	if r.MatrixMean != r.MeanMSE || !(r.MatrixSE > 0) || !(r.RotatedSE > 0) || !(r.RotatedMean > 0) {
		t.Errorf("matrix %v +- %v (mean_mse %v), rotated %v +- %v", r.MatrixMean, r.MatrixSE, r.MeanMSE, r.RotatedMean, r.RotatedSE)
	}
	z := (r.MatrixMean - r.RotatedMean) / math.Hypot(r.MatrixSE, r.RotatedSE)
	if math.Abs(z-r.Z) > 1e-9*math.Max(1, math.Abs(z)) || r.Agrees != (math.Abs(z) <= 3) || !strings.HasPrefix(r.Verdict, map[bool]string{true: "agrees", false: "disagrees"}[r.Agrees]) {
		t.Errorf("z %v (recomputed %v), agrees %v, verdict %q", r.Z, z, r.Agrees, r.Verdict)
	}
	failing(t, "column count, 400", checkScenario, "check", "-", "--matrix", mtx, "--n", "300")
	failing(t, "no-such.mtx", checkScenario, "check", "-", "--matrix", "no-such.mtx")
	failing(t, "at least 2 trials", checkScenario, "check", "-", "--matrix", mtx, "--trials", "1")
}
