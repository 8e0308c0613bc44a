package ui

import (
	"errors"
	"strings"
	"testing"
	"time"
)

// recorder is a test double of the Evaluator: it keeps the callbacks so that the test decides
// when and how each evaluation ends.
type recorder struct {
	calls     [][]byte
	dones     []func(Figures, error)
	cancelled []bool
}

func (r *recorder) Evaluate(chk Checked, done func(Figures, error)) func() {
	s := chk.JSON
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
	if c.State() != "ready" || !c.have || c.stale || c.Figures.MSE != 0.5 {
		t.Fatalf("after a result: state %s, have %v, stale %v", c.State(), c.have, c.stale)
	}
	first := c.summary
	if !strings.Contains(first, "m/n = 0.4") || !strings.Contains(first, "Noise: variance 0.01") {
		t.Errorf("summary %q does not state the scenario", first)
	}

	// An edit starts a new evaluation and keeps the old figures on screen until it ends.
	_ = c.Model.SetText("in-noise-variance", "0.1")
	c.changed()
	if !c.have || c.State() != "busy" || len(ev.calls) != 2 || ev.cancelled[0] {
		t.Fatalf("after an edit: have %v, state %s, calls %d", c.have, c.State(), len(ev.calls))
	}
	// A second edit while busy cancels the running evaluation.
	_ = c.Model.SetText("in-noise-variance", "0.2")
	c.changed()
	if !ev.cancelled[1] {
		t.Errorf("the running evaluation was not cancelled")
	}
	ev.dones[2](Figures{}, errors.New("penalty.l1: must be positive"))
	if c.State() != "error" || !c.stale || c.problem != "penalty.l1: must be positive" || c.Figures.MSE != 0.5 {
		t.Errorf("after an engine error: state %s, stale %v, problem %q, mse %v", c.State(), c.stale, c.problem, c.Figures.MSE)
	}

	// Text that is not a number never reaches the evaluator; the input is marked and the
	// last valid figures stay, with the summary of their scenario.
	_ = c.Model.SetText("in-noise-variance", "x")
	c.changed()
	if len(ev.calls) != 3 || c.State() != "error" || !c.stale || c.summary != first {
		t.Errorf("bad text: %d evaluations, state %s, stale %v, summary %q", len(ev.calls), c.State(), c.stale, c.summary)
	}
	if msg := c.checked.Invalid["in-noise-variance"]; !strings.Contains(msg, "noise.variance") {
		t.Errorf("the noise input is not marked: %q", msg)
	}
	// Fixing it brings fresh figures and clears the marks.
	_ = c.Model.SetText("in-noise-variance", "0.3")
	c.changed()
	ev.dones[3](Figures{MSE: 0.7, Converged: true}, nil)
	if c.State() != "ready" || c.stale || len(c.checked.Invalid) != 0 || c.Figures.MSE != 0.7 || !strings.Contains(c.summary, "0.3") {
		t.Errorf("after the fix: state %s, stale %v, marks %v, summary %q", c.State(), c.stale, c.checked.Invalid, c.summary)
	}
}

// Without an evaluator the page says so instead of showing nothing.
func TestRootWithoutEvaluator(t *testing.T) {
	c := &Root{}
	c.Init(nil)
	if c.State() != "error" || !strings.Contains(c.problem, "not connected") {
		t.Errorf("state %s, problem %q", c.State(), c.problem)
	}
}

func TestTabs(t *testing.T) {
	c := &Root{Eval: &recorder{}}
	c.Init(nil)
	if c.Tab() != viewTabs[0].Name || c.selectedText(viewTabs[0].Name) != "true" {
		t.Errorf("first tab %q not selected", viewTabs[0].Name)
	}
	c.showTab("about")
	if c.Tab() != "about" || c.selectedText("curve") != "false" {
		t.Errorf("about not selected: %q", c.Tab())
	}
	c.showTab("nowhere")
	if c.Tab() != "about" {
		t.Errorf("an unknown tab changed the selection to %q", c.Tab())
	}
}

// Every figure of `hdrisk eval` that the page shows carries its name and its value at full
// precision (contract 4); TPP and FDP say when they do not apply; flags read true/false.
func TestResultsCarryFullPrecision(t *testing.T) {
	f := Figures{MSE: 0.006618111408899176, NMSEdB: -8.782359305628198, Iterations: 23, Converged: true,
		NonzeroFraction: 0.0812345678901234, TPP: 0.75, FDP: 0.125, TrainError: 0.0031234567890123, Susceptibility: 1.2345678901234567}
	r := &Results{Figures: f, Have: true, Support: true, Zeroes: true}
	got := map[string]row{}
	for _, x := range r.rows() {
		got[x.Name] = x
	}
	want := map[string]string{"mse": "0.006618111408899176", "nmse_db": "-8.782359305628198", "nonzero_fraction": "0.0812345678901234",
		"tpp": "0.75", "fdp": "0.125", "train_error": "0.0031234567890123", "susceptibility": "1.2345678901234567",
		"converged": "true", "iterations": "23", "estimate_zero": "false"}
	if len(got) != len(want) {
		t.Errorf("%d figures, want the %d names of hdrisk eval", len(got), len(want))
	}
	for name, v := range want {
		if got[name].Value != v || got[name].Applies != "true" {
			t.Errorf("%s: data-value %q applies %s, want %q", name, got[name].Value, got[name].Applies, v)
		}
	}
	if got["mse"].Shown != "0.006618" || got["nmse_db"].Shown != "-8.78 dB" {
		t.Errorf("shown: mse %q, nmse %q", got["mse"].Shown, got["nmse_db"].Shown)
	}
	r.Support = false
	for _, x := range r.rows() {
		if (x.Name == "tpp" || x.Name == "fdp") && (x.Applies != "false" || x.Shown != "n/a" || x.Value == "") {
			t.Errorf("%s for a dense signal: %+v", x.Name, x)
		}
	}
}

// A result that did not converge is said to be one, in words and in the converged figure.
func TestResultsUnconverged(t *testing.T) {
	r := &Results{Figures: Figures{MSE: 0.1, Iterations: 2000}, Have: true}
	var conv row
	for _, x := range r.rows() {
		if x.Name == "converged" {
			conv = x
		}
	}
	if conv.Value != "false" || conv.Shown != "NO" || conv.Kind != "warning" {
		t.Errorf("converged row = %+v", conv)
	}
	if !strings.Contains(r.unconvergedText(), "2000 iterations") || r.convergedText() != "false" {
		t.Errorf("message %q, data-converged %q", r.unconvergedText(), r.convergedText())
	}
	r.Stale, r.Summary, r.Problem = true, "Design: x.", "penalty.l1: bad"
	if !strings.HasPrefix(r.summaryText(), "Last valid scenario") || !strings.Contains(r.problemText(), "last valid") {
		t.Errorf("stale texts: %q / %q", r.summaryText(), r.problemText())
	}
}

// The solver's note is shown, a result on the floor is greyed and marked, and an unconverged
// result is greyed with its residual (issue 14 item 3).
func TestResultsNoteFloorResidual(t *testing.T) {
	floor := &Results{Figures: Figures{MSE: 1e-14, Converged: true, Floor: true, Note: "below the solver's floor"}, Have: true}
	if floor.noteText() != "below the solver's floor" || floor.floorText() != "true" || floor.greyed() != "figures greyed" {
		t.Errorf("floor: note %q, data-floor %q, class %q", floor.noteText(), floor.floorText(), floor.greyed())
	}
	for _, x := range floor.rows() {
		if x.Name == "nmse_db" && x.Shown != "≤ −120 dB" {
			t.Errorf("floor: the normalized error reads %q, not as the floor", x.Shown)
		}
	}
	plain := &Results{Figures: Figures{MSE: 0.1, Converged: true}, Have: true}
	if plain.noteText() != "" || plain.floorText() != "false" || plain.greyed() != "figures" {
		t.Errorf("plain: note %q, data-floor %q, class %q", plain.noteText(), plain.floorText(), plain.greyed())
	}
	un := &Results{Figures: Figures{MSE: 0.1, Iterations: 2000, Residual: 3.5e-4, Note: "not converged: the last relative change is 0.00035"}, Have: true}
	if !strings.Contains(un.unconvergedText(), "0.00035") || un.greyed() != "figures greyed" || un.noteText() != "" {
		t.Errorf("unconverged: %q, class %q, note %q", un.unconvergedText(), un.greyed(), un.noteText())
	}
	zero := &Results{Figures: Figures{MSE: 1, Converged: true, EstimateZero: true, Note: "the estimate is zero"}, Have: true}
	if zero.noteText() != "" {
		t.Errorf("zero estimate: the note %q repeats the paragraph of its own", zero.noteText())
	}
}

// An evaluation that took longer than slowEval in the page sends the next ones of the same
// kinds to a compute worker, where the editor is not blocked; a quick one brings them back.
func TestSlowEvaluationMovesToAWorker(t *testing.T) {
	ev, jobs := &recorder{}, &queueJobs{}
	now := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	c := &Root{Eval: ev, Jobs: jobs, Clock: func() time.Time { return now }}
	c.Init(nil)
	now = now.Add(300 * time.Millisecond)
	ev.dones[0](Figures{MSE: 0.5, Converged: true}, nil)
	if c.slowKinds == "" {
		t.Fatal("a 0.3 s evaluation was not noted as slow")
	}
	c.changed()
	if len(ev.calls) != 1 || len(jobs.queue) != 1 || jobs.queue[0].kind != "eval" || !c.onWorker || c.State() != "busy" {
		t.Fatalf("the next evaluation should go to a worker: page calls %d, jobs %d, on worker %v", len(ev.calls), len(jobs.queue), c.onWorker)
	}
	if !strings.Contains(c.WorkerNote(), "compute worker") {
		t.Errorf("no progress line while on the worker: %q", c.WorkerNote())
	}
	jobs.flush()
	if c.State() != "ready" || c.onWorker || !c.have || c.Figures.MSE <= 0 {
		t.Fatalf("the worker's figures were not taken: state %s, %+v", c.State(), c.Figures)
	}
	// Another kind of penalty is tried in the page again.
	if err := c.Model.SetKind("penalty", "ridge"); err != nil {
		t.Fatal(err)
	}
	c.changed()
	if len(ev.calls) != 2 {
		t.Errorf("a scenario of other kinds should be evaluated in the page first")
	}
}
