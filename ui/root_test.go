package ui

import (
	"errors"
	"testing"
)

// recorder is a test double of the Evaluator: it keeps the callbacks so that the test decides
// when and how each evaluation ends.
type recorder struct {
	calls     [][]byte
	dones     []func(Figures, error)
	cancelled []bool
}

func (r *recorder) Evaluate(s []byte, done func(Figures, error)) func() {
	i := len(r.calls)
	r.calls = append(r.calls, s)
	r.dones = append(r.dones, done)
	r.cancelled = append(r.cancelled, false)
	return func() { r.cancelled[i] = true }
}

func TestRootStates(t *testing.T) {
	ev := &recorder{}
	c := &Root{Eval: ev}
	c.Init(nil)
	if c.State() != "busy" || len(ev.calls) != 1 {
		t.Fatalf("after Init: state %s, %d evaluations", c.State(), len(ev.calls))
	}
	ev.dones[0](Figures{MSE: 0.5, Converged: true, Iterations: 3}, nil)
	if c.State() != "ready" || !c.have || c.Figures.MSE != 0.5 {
		t.Fatalf("after a result: state %s, have %v", c.State(), c.have)
	}

	// An edit cancels nothing finished, hides the old figures and starts a new evaluation.
	_ = c.Model.SetText("in-noise-variance", "0.1")
	c.changed()
	if c.have || c.State() != "busy" || len(ev.calls) != 2 || ev.cancelled[0] {
		t.Fatalf("after an edit: have %v, state %s, calls %d", c.have, c.State(), len(ev.calls))
	}
	// A second edit while busy cancels the running evaluation.
	_ = c.Model.SetText("in-noise-variance", "0.2")
	c.changed()
	if !ev.cancelled[1] {
		t.Errorf("the running evaluation was not cancelled")
	}
	ev.dones[2](Figures{}, errors.New("penalty.l1: must be positive"))
	if c.State() != "error" || c.have || c.problem != "penalty.l1: must be positive" {
		t.Errorf("after an engine error: state %s, have %v, problem %q", c.State(), c.have, c.problem)
	}

	// Text that is not a number never reaches the evaluator.
	_ = c.Model.SetText("in-noise-variance", "x")
	c.changed()
	if len(ev.calls) != 3 || c.State() != "error" {
		t.Errorf("bad text: %d evaluations, state %s", len(ev.calls), c.State())
	}
}

func TestResultsCarryFullPrecision(t *testing.T) {
	r := &Results{Figures: Figures{MSE: 0.006618111408899176, NMSEdB: -8.782359305628198, Iterations: 23, Converged: true}}
	got := map[string]row{}
	for _, x := range r.rows() {
		got[x.Name] = x
	}
	if got["mse"].Value != "0.006618111408899176" || got["mse"].Shown != "0.006618" {
		t.Errorf("mse row = %+v", got["mse"])
	}
	if got["nmse_db"].Shown != "-8.78 dB" || got["nmse_db"].Value != "-8.782359305628198" {
		t.Errorf("nmse_db row = %+v", got["nmse_db"])
	}
	if got["converged"].Value != "true" || got["estimate_zero"].Value != "false" || got["iterations"].Value != "23" {
		t.Errorf("flags = %+v %+v %+v", got["converged"], got["estimate_zero"], got["iterations"])
	}
	if len(got) != 7 {
		t.Errorf("%d figures, want the 7 of contract 3", len(got))
	}
}
