package main

import (
	"encoding/json"
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
		if r["trials"] != 3.0 || r["n"] != 300.0 || r["solver"] != solver || r["converged"] != true {
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
	failing(t, "cap of 25000000", checkScenario, "check", "-", "--n", "20000")
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
