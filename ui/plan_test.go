package ui

import (
	"bytes"
	"context"
	"encoding/csv"
	"fmt"
	"math"
	"strings"
	"testing"

	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
)

func TestPlanMatchesEngineForEveryShape(t *testing.T) {
	m := modelOf(t, lassoScenario)
	jobs, br := &queueJobs{}, &keepBrowser{}
	c := &PlanView{Model: m, Jobs: jobs, Browser: br}
	_ = c.Set("target", "-15")
	_ = c.Set("alpha_max", "3")
	c.Start()
	if c.Problem() != "" || c.Run() != RunRunning {
		t.Fatalf("run %s, problem %q", c.Run(), c.Problem())
	}
	jobs.flush()
	if c.Run() != RunDone {
		t.Fatalf("run %s, problem %q", c.Run(), c.Problem())
	}
	s, _ := scenario.Decode([]byte(lassoScenario))
	want, err := study.Plan(context.Background(), s, study.PlanSpec{Target: -15, AlphaMax: 3})
	if err != nil {
		t.Fatal(err)
	}
	h, ok := c.Headline()
	if !ok || h[0] != "plan_alpha" || h[1] != full(want.Alpha) || !want.Reached {
		t.Fatalf("headline %v, engine %+v", h, want)
	}
	lines := c.Lines()
	shapes := map[string]planLine{}
	for _, l := range lines {
		shapes[strings.TrimPrefix(l.Name, "plan_alpha_")] = l
	}
	for _, sh := range []string{"orthogonal", "gaussian", "uniform-sv", "uniform-ev", "geometric-sv"} {
		if _, ok := shapes[sh]; !ok {
			t.Errorf("no answer for %s", sh)
		}
	}
	g, _ := withShape(s, "gaussian")
	wg, err := study.Plan(context.Background(), g, study.PlanSpec{Target: -15, AlphaMax: 3})
	if err != nil {
		t.Fatal(err)
	}
	if l := shapes["gaussian"]; l.Value != full(wg.Alpha) {
		t.Errorf("gaussian: view %s, engine %v", l.Value, wg.Alpha)
	}
	// An orthogonal design needs fewer measurements than a Gaussian one for the LASSO: its
	// spectrum is flat (from memory: Vehkaperä, Kabashima & Chatterjee 2016, IEEE Trans. Inf.
	// Theory 62, "Analysis of regularized LS reconstruction and random matrix ensembles in
	// compressed sensing", find row-orthogonal ensembles ahead of Gaussian ones).
	if !(want.Alpha < wg.Alpha) {
		t.Errorf("orthogonal %g should need fewer measurements than gaussian %g", want.Alpha, wg.Alpha)
	}
	if st := m.Check().Scenario.Study; st == nil || st.View != "plan" || st.Plan == nil || st.Plan.TargetDB != -15 || st.Plan.AlphaMax != 3 {
		t.Fatalf("study.plan not saved: %+v", st)
	}
	c.Export()
	rows, err := csv.NewReader(bytes.NewReader(br.files["hdrisk-plan.csv"])).ReadAll()
	if err != nil || len(rows) != len(lines)+1 || rows[1][0] != "orthogonal" || rows[1][4] != "true" {
		t.Fatalf("CSV %v: %q", err, rows)
	}

	// Stated as an MSE, the same target gives the same answer (E x0^2 = 0.05 here).
	c2 := &PlanView{Model: m, Jobs: jobs}
	_ = c2.Set("unit", "mse")
	_ = c2.Set("target", full(0.05*math.Pow(10, -1.5)))
	_ = c2.Set("alpha_max", "3")
	c2.Start()
	jobs.flush()
	h2, _ := c2.Headline()
	a1, a2 := want.Alpha, parse(t, h2[1])
	if math.Abs(a2-a1) > 1e-6*a1 {
		t.Errorf("MSE target: alpha %v, dB target: %v", a2, a1)
	}
}

func parse(t *testing.T, s string) float64 {
	t.Helper()
	var v float64
	if _, err := fmt.Sscan(s, &v); err != nil {
		t.Fatalf("%q: %v", s, err)
	}
	return v
}

func TestPlanNotReachedIsStated(t *testing.T) {
	m := modelOf(t, lassoScenario)
	jobs := &queueJobs{}
	c := &PlanView{Model: m, Jobs: jobs}
	_ = c.Set("target", "-60")
	_ = c.Set("alpha_max", "0.5")
	c.Start()
	jobs.flush()
	h, ok := c.Headline()
	if !ok || h[1] != "not reached" || !strings.Contains(h[2], "not reached up to m/n = 0.5") {
		t.Fatalf("headline %v", h)
	}
	if l := c.Lines()[0]; l.Value != "not reached" || !strings.Contains(l.Alpha, "not reached up to m/n = 0.5") || l.Note == "" {
		t.Errorf("line %+v", l)
	}
	_ = c.Set("target", "abc")
	c.Start()
	if !strings.Contains(c.Problem(), "target") {
		t.Errorf("a bad target should be named: %q", c.Problem())
	}
	_ = c.Set("target", "-10")
	_ = c.Set("alpha_max", "1000")
	c.Start()
	if !strings.Contains(c.Problem(), "m/n") {
		t.Errorf("alpha_max beyond the limit should be refused: %q", c.Problem())
	}
	_ = c.Set("alpha_max", "2")
	c.Start()
	c.Cancel()
	if c.Run() != RunCancelled || jobs.flush() != 0 {
		t.Errorf("cancel: %s", c.Run())
	}
}
