package job

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"hdrisk/engine/scenario"
	"hdrisk/engine/simulate"

	"hdrisk/protocol"
)

// lassoScenario is an invented example: a sparse signal measured by an orthogonal design,
// estimated by the LASSO.
const lassoScenario = `{"kind":"hdrisk.scenario","version":1,"title":"invented example",` +
	`"design":{"shape":"orthogonal","alpha":0.5,"scale":"rows"},` +
	`"signal":{"law":"bernoulli-gauss","density":0.1,"variance":1},` +
	`"noise":{"variance":0.01},"penalty":{"kind":"l1","l1":0.1}}`

func runJob(t *testing.T, kind string, args any) (protocol.Reply, []protocol.Reply) {
	t.Helper()
	raw, err := json.Marshal(args)
	if err != nil {
		t.Fatal(err)
	}
	var replies []protocol.Reply
	Run(protocol.Request{ID: 3, Kind: kind, Args: raw}, func(r protocol.Reply) { replies = append(replies, r) })
	return replies[len(replies)-1], replies
}

// The check job hands on simulate.Check's report unchanged; this checks the glue (the
// engine's check has its own tests against the prediction).
func TestCheckPassesEngineReportThrough(t *testing.T) {
	s, err := scenario.Decode([]byte(lassoScenario))
	if err != nil {
		t.Fatal(err)
	}
	p, err := s.Problem()
	if err != nil {
		t.Fatal(err)
	}
	want, err := simulate.Check(context.Background(), simulate.Problem{Problem: p},
		simulate.Options{N: 60, Trials: 3, Seed: 7, Solver: simulate.SolverCD}, nil)
	if err != nil {
		t.Fatal(err)
	}
	last, replies := runJob(t, "check", protocol.CheckArgs{Scenario: json.RawMessage(lassoScenario), N: 60, Trials: 3, Seed: 7, Solver: "cd"})
	if last.Type != protocol.Result {
		t.Fatalf("check failed: %+v", last)
	}
	var got protocol.CheckResult
	if err := json.Unmarshal(last.Result, &got); err != nil {
		t.Fatal(err)
	}
	if float64(got.MeanMSE) != want.MeanMSE || float64(got.StdErr) != want.StdErr ||
		float64(got.PredictedMSE) != want.Predicted.MSE || got.M != want.M || got.N != 60 {
		t.Errorf("job %+v, engine mean %v stderr %v predicted %v m %d", got, want.MeanMSE, want.StdErr, want.Predicted.MSE, want.M)
	}
	if len(got.PerTrial) != 3 || float64(got.PerTrial[2].MSE) != want.PerTrial[2].MSE {
		t.Errorf("per-trial values differ: %+v vs %+v", got.PerTrial, want.PerTrial)
	}
	if got.Criterion != want.Criterion || got.Criterion == "" || got.MaxIter != want.MaxIter {
		t.Errorf("stopping rule %q/%d, engine %q/%d", got.Criterion, got.MaxIter, want.Criterion, want.MaxIter)
	}
	if got.Converged != (want.NotConverged == 0) || got.Warnings == nil {
		t.Errorf("converged %v, warnings %v; engine not converged %d", got.Converged, got.Warnings, want.NotConverged)
	}
	if float64(got.TPP.Predicted) != want.Predicted.TPP || float64(got.FDP.Mean) != want.FDP.Mean {
		t.Errorf("tpp/fdp %+v %+v", got.TPP, got.FDP)
	}
	// protocol.Progress counts trials; the last one reports all done.
	var prog []protocol.Reply
	for _, r := range replies {
		if r.Type == protocol.Progress {
			prog = append(prog, r)
		}
	}
	if len(prog) == 0 || prog[len(prog)-1].Done != 3 || prog[len(prog)-1].Total != 3 {
		t.Errorf("progress replies %+v, want the last to be 3 of 3", prog)
	}
}

// Over and At move the scenario before the check, and Curve sweeps the scenario as given.
func TestCheckAtAnotherValueWithCurve(t *testing.T) {
	base, _ := scenario.Decode([]byte(lassoScenario))
	moved, err := base.With("l1", 0.3)
	if err != nil {
		t.Fatal(err)
	}
	p, _ := moved.Problem()
	want, err := simulate.Check(context.Background(), simulate.Problem{Problem: p},
		simulate.Options{N: 40, Trials: 2, Seed: 1, Solver: simulate.SolverProx}, nil)
	if err != nil {
		t.Fatal(err)
	}
	got, err := Check(protocol.CheckArgs{Scenario: json.RawMessage(lassoScenario), N: 40, Trials: 2, Seed: 1, Solver: "prox",
		Over: "l1", At: 0.3, Curve: &protocol.CurveSpec{Over: "l1", From: 0.01, To: 1, Points: 5, Log: true}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if float64(got.MeanMSE) != want.MeanMSE || float64(got.PredictedMSE) != want.Predicted.MSE {
		t.Errorf("at l1 = 0.3: job mean %v predicted %v, engine %v %v", got.MeanMSE, got.PredictedMSE, want.MeanMSE, want.Predicted.MSE)
	}
	if len(got.Curve) != 5 || got.Curve[0].X != 0.01 || got.Curve[4].X != 1 {
		t.Fatalf("curve %+v, want 5 points from 0.01 to 1", got.Curve)
	}
	// The curve's point at the moved value equals the check's own prediction.
	r, err := Check(protocol.CheckArgs{Scenario: json.RawMessage(lassoScenario), N: 40, Trials: 1, Solver: "cd",
		Over: "l1", At: 0.1, Curve: &protocol.CurveSpec{Over: "l1", From: 0.1, To: 0.2, Points: 2}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if d := float64(r.Curve[0].MSE) - float64(r.PredictedMSE); d > 1e-9 || d < -1e-9 || !r.Curve[0].OK {
		t.Errorf("curve at l1 = 0.1 gives %v, the check's prediction %v", r.Curve[0].MSE, r.PredictedMSE)
	}
}

func TestCheckRefusals(t *testing.T) {
	for _, c := range []struct {
		args protocol.CheckArgs
		want string
	}{
		{protocol.CheckArgs{N: 10, Trials: 1}, "scenario: missing"},
		{protocol.CheckArgs{Scenario: json.RawMessage(lassoScenario), N: 10, Trials: 1, Solver: "newton"}, "solver"},
		{protocol.CheckArgs{Scenario: json.RawMessage(lassoScenario), N: 10, Trials: 1, Factors: "dense"}, "factors"},
		{protocol.CheckArgs{Scenario: json.RawMessage(lassoScenario), N: 10, Trials: 0}, "trials"},
		{protocol.CheckArgs{Scenario: json.RawMessage(lassoScenario), N: 10, Trials: 1, Over: "width", At: 1}, "width"},
		{protocol.CheckArgs{Scenario: json.RawMessage(strings.Replace(lassoScenario, `"l1","l1"`, `"huber","width":1,"l1"`, 1)), N: 10, Trials: 1, Solver: "cd"}, "cd"},
	} {
		last, _ := runJob(t, "check", c.args)
		if last.Type != protocol.Failed || !strings.Contains(last.Error, c.want) {
			t.Errorf("%+v: reply %+v, want an error naming %q", c.args, last, c.want)
		}
	}
}

// A check shared between workers by trials (protocol.SplitTrials) and merged
// (protocol.MergeChecks) gives the numbers of one job: trials are seeded by their index. With
// a matrix, the verdict is recomputed the same way.
func TestCheckSplitMatchesWhole(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 4))
	var mtx strings.Builder
	const m, n = 40, 80
	for i := 0; i < m; i++ {
		for j := 0; j < n; j++ {
			if j > 0 {
				mtx.WriteString(",")
			}
			fmt.Fprintf(&mtx, "%.6g", rng.NormFloat64()/math.Sqrt(m))
		}
		mtx.WriteString("\n")
	}
	for _, c := range []struct {
		name, scen, matrix string
	}{{"rotations", lassoScenario, ""}, {"matrix", lassoScenario, mtx.String()}} {
		args := protocol.CheckArgs{Scenario: json.RawMessage(c.scen), N: 120, Trials: 11, Seed: 9, Matrix: c.matrix}
		whole, err := Check(args, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, workers := range []int{2, 3, 11} {
			var parts []protocol.CheckResult
			for _, sp := range protocol.SplitTrials(0, args.Trials, workers) {
				a := args
				a.First, a.Trials = sp[0], sp[1]
				r, err := Check(a, nil)
				if err != nil {
					t.Fatal(err)
				}
				parts = append(parts, r)
			}
			got, err := protocol.MergeChecks(parts)
			if err != nil {
				t.Fatal(err)
			}
			if got.MeanMSE != whole.MeanMSE || got.StdErr != whole.StdErr || got.Trials != whole.Trials || got.TPP != whole.TPP ||
				got.Nonzero.StdErr != whole.Nonzero.StdErr {
				t.Errorf("%s, %d workers: mean %v +- %v (%d trials), whole %v +- %v (%d)", c.name, workers, got.MeanMSE, got.StdErr, got.Trials, whole.MeanMSE, whole.StdErr, whole.Trials)
			}
			if (got.Comparison == nil) != (c.matrix == "") {
				t.Fatalf("%s: comparison %v", c.name, got.Comparison)
			}
			if w := whole.Comparison; w != nil {
				g := got.Comparison
				if g.Z != w.Z || g.Agrees != w.Agrees || g.RotatedMeanMSE != w.RotatedMeanMSE || g.RotatedStdErr != w.RotatedStdErr || len(g.RotatedPerTrial) != len(w.RotatedPerTrial) {
					t.Errorf("%d workers: verdict z %v rotated %v, whole z %v rotated %v", workers, g.Z, g.RotatedMeanMSE, w.Z, w.RotatedMeanMSE)
				}
			}
		}
	}
	bad := []protocol.CheckResult{{First: 0, Trials: 2, PerTrial: make([]protocol.CheckTrial, 2)}, {First: 3, Trials: 2, PerTrial: make([]protocol.CheckTrial, 2)}}
	if _, err := protocol.MergeChecks(bad); err == nil {
		t.Error("parts with a gap between their trials were merged")
	}
}

// TestWarmCheckScenarios checks that the warm-up's scenarios run, one on each solver a LASSO
// check with cd asked may run: a warm-up that fails at once would warm nothing.
func TestWarmCheckScenarios(t *testing.T) {
	ran := map[string]bool{}
	defer func() {
		if !ran["cd"] || !ran["prox"] {
			t.Errorf("the warm-up ran the solvers %v, want cd and prox", ran)
		}
	}()
	for _, s := range warmScenarios {
		r, err := Check(warmArgs(s), nil)
		if err != nil {
			t.Fatalf("%s: %v", s, err)
		}
		if r.Trials != 1 || len(r.PerTrial) != 1 {
			t.Errorf("%s: %d trials, want 1", s, r.Trials)
		}
		ran[r.Solver] = true
	}
}
