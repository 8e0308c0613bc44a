package ui

import (
	"bytes"
	"encoding/csv"
	"strings"
	"testing"

	"hdrisk/engine/fixedpoint"
)

// twoWorkerJobs is cdJobs with a pool of two workers, so that a check's trials are shared.
type twoWorkerJobs struct{ cdJobs }

func (*twoWorkerJobs) Size() int { return 2 }

// TestCheckGLMInPage: the check view runs a 1-bit scenario's check on the workers, its trials
// shared between two jobs, and shows the MSE, the cosine and the test error, each mean with
// its standard error beside the prediction, with no support statistics; the CSV carries the
// generalized model's columns.
func TestCheckGLMInPage(t *testing.T) {
	m := modelOf(t, oneBitCurveScenario)
	jobs := &twoWorkerJobs{cdJobs{run: true}}
	c := &CheckView{Model: m, Jobs: jobs}
	c.checkStart()
	for k, v := range map[string]string{"n": "120", "trials": "4", "seed": "5"} {
		if err := c.SetSetting(k, v); err != nil {
			t.Fatal(err)
		}
	}
	c.Start()
	if c.Run() != RunDone || c.Problem() != "" {
		t.Fatalf("run %s, problem %q", c.Run(), c.Problem())
	}
	if got := strings.Join(jobs.started, ","); got != "check,check" {
		t.Errorf("jobs %s: the trials should be shared between the two workers", got)
	}
	r, _ := c.Latest()
	if !r.GLM || r.Trials != 4 || len(r.PerTrial) != 4 {
		t.Fatalf("result %+v", r)
	}
	rows := map[string]checkRow{}
	var names []string
	for _, row := range c.Rows() {
		rows[row.Name] = row
		names = append(names, row.Name)
	}
	if got := strings.Join(names, ","); got != "check_mean_mse,check_cosine,check_norm_ratio,check_test_error" {
		t.Errorf("rows %s", got)
	}
	te := rows["check_test_error"]
	if te.Value != fullNum(float64(r.TestError.Mean)) || te.PredValue != fullNum(float64(r.TestError.Predicted)) ||
		!strings.Contains(te.Shown, " ± "+fmtNum(float64(r.TestError.StdErr))) {
		t.Errorf("test error row %+v, result %+v", te, *r.TestError)
	}
	// The prediction the page shows is the engine's fixed point of the scenario.
	ch := m.Check()
	g, _ := ch.Engine.GLM()
	want, err := fixedpoint.SolveGLM(g, fixedpoint.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if rows["check_cosine"].PredValue != fullNum(want.Cosine) {
		t.Errorf("predicted cosine %v, engine %v", rows["check_cosine"].PredValue, want.Cosine)
	}
	if float64(r.TestError.Predicted) != want.TestError || float64(r.PredictedMSE) != want.MSE {
		t.Errorf("predictions %v %v, engine %v %v", r.TestError.Predicted, r.PredictedMSE, want.TestError, want.MSE)
	}
	// The solver menu (cd here) does not apply to a generalized model, and the view says so.
	if n := c.Notes(); len(n) == 0 || n[0][0] != "solver" || !strings.Contains(n[0][1], "cd was asked; the solver menu is for the linear readout") ||
		!strings.Contains(n[0][1], "primal-dual") {
		t.Errorf("notes %q: the GLM check should say the solver menu does not apply", n)
	}
	if s := c.PerTrial()[0]; !strings.Contains(s, "cosine") || !strings.Contains(s, "test error") || strings.Contains(s, "TPP") {
		t.Errorf("trial line %q", s)
	}
	recs, err := csv.NewReader(bytes.NewReader(c.CSV())).ReadAll()
	if err != nil || len(recs) != 5 {
		t.Fatalf("CSV: %v, %d rows", err, len(recs))
	}
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	if recs[1][col["predicted_test_error"]] != fullNum(float64(r.TestError.Predicted)) || recs[4][col["cosine"]] != fullNum(float64(r.PerTrial[3].Cosine)) {
		t.Errorf("CSV header %v, row %v", recs[0], recs[1])
	}
}
