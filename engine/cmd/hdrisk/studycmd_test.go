package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// An invented scenario: a sparse signal measured through a row-orthogonal design.
const studyScenario = `{"kind": "hdrisk.scenario", "version": 1, "title": "invented: sparse signal, orthogonal design",
 "design": {"shape": "orthogonal", "alpha": 0.5, "scale": "rows"},
 "signal": {"law": "bernoulli-gauss", "density": 0.1, "variance": 1},
 "noise": {"variance": 0.01},
 "penalty": {"kind": "l1", "l1": 0.1}}`

func runCmd(t *testing.T, stdin string, args ...string) (stdout, stderr string, code int) {
	t.Helper()
	var o, e bytes.Buffer
	code = run(args, strings.NewReader(stdin), &o, &e)
	return o.String(), e.String(), code
}

func TestSweepCommand(t *testing.T) {
	out, errs, code := runCmd(t, studyScenario, "sweep", "-", "--over", "l1", "--from", "0.01", "--to", "1", "--points", "5", "--log")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 6 || rows[0][0] != "l1" || rows[0][1] != "mse" || rows[0][len(rows[0])-1] != "status" {
		t.Fatalf("header %v, %d rows", rows[0], len(rows))
	}
	if rows[1][0] != "0.01" || rows[5][0] != "1" || rows[3][len(rows[3])-1] != "ok" {
		t.Errorf("rows %v", rows[1:])
	}
	// Non-converged points are marked on stdout and counted on stderr.
	out, errs, code = runCmd(t, studyScenario, "sweep", "-", "--over", "noise", "--from", "0.01", "--to", "0.1", "--points", "3", "--max-iter", "2")
	if code != 0 || !strings.Contains(out, "not converged") || !strings.Contains(errs, "3 of 3 points") {
		t.Errorf("exit %d, stdout %q, stderr %q", code, out, errs)
	}
	out, errs, code = runCmd(t, studyScenario, "sweep", "-", "--over", "l3", "--from", "1", "--to", "2")
	if code != 1 || out != "" || !strings.Contains(errs, "l3") {
		t.Errorf("unknown field: exit %d, stdout %q, stderr %q", code, out, errs)
	}
	if _, _, code = runCmd(t, studyScenario, "sweep", "-", "--from", "1"); code != 2 {
		t.Errorf("missing --over: exit %d, want 2", code)
	}
}

// The map's CSV does not depend on the number of workers, and settings may come from the
// scenario's study.map.
func TestMapCommand(t *testing.T) {
	args := []string{"map", "-", "--x", "alpha", "--x-from", "0.2", "--x-to", "1", "--x-points", "4",
		"--y", "l1", "--y-from", "0.01", "--y-to", "1", "--y-points", "3", "--y-log"}
	one, errs, code := runCmd(t, studyScenario, append(args, "--workers", "1")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	two, _, _ := runCmd(t, studyScenario, append(args, "--workers", "2")...)
	if one != two {
		t.Error("the map differs between 1 and 2 workers")
	}
	rows, err := csv.NewReader(strings.NewReader(one)).ReadAll()
	if err != nil || len(rows) != 13 || rows[0][0] != "alpha" || rows[0][1] != "l1" {
		t.Fatalf("%v: %d rows, header %v", err, len(rows), rows[0])
	}
	withStudy := strings.Replace(studyScenario, `"penalty"`, `"study": {"view": "map", "map": {"x": "alpha", "x_from": 0.2, "x_to": 1, "x_points": 4,
		"y": "l1", "y_from": 0.01, "y_to": 1, "y_points": 3, "y_log": true}}, "penalty"`, 1)
	dir := t.TempDir()
	file := filepath.Join(dir, "s.json")
	if err := os.WriteFile(file, []byte(withStudy), 0o600); err != nil {
		t.Fatal(err)
	}
	fromFile, errs, code := runCmd(t, "", "map", file)
	if code != 0 {
		t.Fatalf("map from study.map: exit %d: %s", code, errs)
	}
	if fromFile != one {
		t.Error("the map from study.map differs from the one given by flags")
	}
}

func TestBestCommand(t *testing.T) {
	out, errs, code := runCmd(t, studyScenario, "best", "-", "--bayes")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r struct {
		Over    string             `json:"over"`
		Value   float64            `json:"value"`
		MSE     float64            `json:"mse"`
		AtBound string             `json:"at_bound"`
		Penalty map[string]float64 `json:"penalty"`
		Bayes   struct {
			MSE float64 `json:"mse"`
		} `json:"bayes"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if r.Over != "l1" || !(r.Value > 0) || !(r.MSE > 0) || r.AtBound != "" || r.Penalty["l1"] != r.Value {
		t.Errorf("%+v", r)
	}
	if !(r.Bayes.MSE > 0 && r.Bayes.MSE <= r.MSE) {
		t.Errorf("Bayes MSE %v, best LASSO %v", r.Bayes.MSE, r.MSE)
	}
	if out, _, code := runCmd(t, studyScenario, "best", "-", "--over", "l2"); code != 1 || out != "" {
		t.Errorf("over l2 of a LASSO: exit %d, stdout %q", code, out)
	}
}

func TestPlanCommand(t *testing.T) {
	out, errs, code := runCmd(t, studyScenario, "plan", "-", "--target-db", "-12")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r struct {
		Alpha   *float64 `json:"alpha"`
		Reached bool     `json:"reached"`
		Best    struct {
			Alpha  float64 `json:"alpha"`
			Over   string  `json:"over"`
			Value  float64 `json:"value"`
			NMSEdB float64 `json:"nmse_db"`
		} `json:"best"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if !r.Reached || r.Alpha == nil || *r.Alpha != r.Best.Alpha || r.Best.Over != "l1" || r.Best.NMSEdB > -12+1e-9 {
		t.Errorf("%s", out)
	}
	out, _, code = runCmd(t, studyScenario, "plan", "-", "--target-db", "-60", "--alpha-max", "1")
	if code != 0 || !strings.Contains(out, `"alpha": null`) || !strings.Contains(out, `"reached": false`) {
		t.Errorf("unreachable target: exit %d, %s", code, out)
	}
	if _, _, code = runCmd(t, studyScenario, "plan", "-"); code != 2 {
		t.Errorf("no target: exit %d, want 2", code)
	}
	if _, _, code = runCmd(t, studyScenario, "plan", "-", "--target-db", "-10", "--target-mse", "0.01"); code != 2 {
		t.Errorf("two targets: exit %d, want 2", code)
	}
}

// The sparse +-1 signal at low noise: the Bayes state evolution has two fixed
// points, and best --bayes reports the optimal one (the informed start's, of lower free
// energy, docs/method.md section 4.1), names its start and says that the other exists.
func TestBestBayesTwoFixedPoints(t *testing.T) {
	sc := `{"kind": "hdrisk.scenario", "version": 1, "title": "sparse +-1, low noise",
		"design": {"shape": "gaussian", "alpha": 0.25, "scale": "rows"},
		"signal": {"law": "bernoulli-rademacher", "density": 0.15, "amplitude": 1},
		"noise": {"variance": 1e-4}, "penalty": {"kind": "ridge", "l2": 0.1}}`
	out, errs, code := runCmd(t, sc, "best", "-", "--over", "l2", "--bayes")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r struct {
		Bayes struct {
			MSE           float64  `json:"mse"`
			Start         string   `json:"optimal_start"`
			UninformedMSE float64  `json:"uninformed_mse"`
			InformedMSE   float64  `json:"informed_mse"`
			Differ        bool     `json:"differ"`
			Gap           *float64 `json:"gap"`
			Note          string   `json:"note"`
		} `json:"bayes"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	b := r.Bayes
	if !b.Differ || b.Start != "informed" || b.MSE != b.InformedMSE || !(b.InformedMSE < b.UninformedMSE) ||
		b.Gap == nil || !(*b.Gap < 0) || !strings.Contains(b.Note, "also exists") {
		t.Errorf("%s", out)
	}
}
