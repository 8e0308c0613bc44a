package job

import (
	"context"
	"encoding/json"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"hdrisk/engine/scenario"
	"hdrisk/engine/simulate"
	"hdrisk/protocol"
)

// oneBitCheck is an invented 1-bit scenario: one bit of a quantizer, Gaussian design.
const oneBitCheck = `{"kind":"hdrisk.scenario","version":1,"title":"invented 1-bit case",` +
	`"design":{"shape":"gaussian","alpha":2,"scale":"rows"},` +
	`"signal":{"law":"bernoulli-gauss","density":0.2,"variance":1},"noise":{"variance":0.01},` +
	`"penalty":{"kind":"l1","l1":0.05},"readout":{"kind":"quantize","bits":1,"range":1}}`

// TestCheckGLM: the check job of a generalized model hands on simulate.TrialGLM's trials
// (trial t from PCG(seed, t), as `hdrisk check` draws them) beside SolveGLM's predictions,
// with the cosine and the test error of the 1-bit readout; its trials shared over two jobs
// merge into the numbers of one.
func TestCheckGLM(t *testing.T) {
	args := protocol.CheckArgs{Scenario: json.RawMessage(oneBitCheck), N: 150, Trials: 4, Seed: 9}
	last, _ := runJob(t, "check", args)
	if last.Type != protocol.Result {
		t.Fatalf("check failed: %+v", last)
	}
	var one protocol.CheckResult
	if err := json.Unmarshal(last.Result, &one); err != nil {
		t.Fatal(err)
	}
	if !one.GLM || one.Solver != glmSolver || one.Cosine == nil || one.TestError == nil || one.NormRatio == nil || len(one.PerTrial) != 4 {
		t.Fatalf("result %+v", one)
	}
	s, _ := scenario.Decode([]byte(oneBitCheck))
	c, _ := s.Check()
	g, _ := c.GLM()
	d := simulate.DesignDraw{Law: g.Design, GaussianEntries: true}
	var mse []float64
	for k := range 4 {
		tr, err := simulate.TrialGLM(context.Background(), rand.New(rand.NewPCG(9, uint64(k))), d, g.Signal, g.Noise, g.Readout, g.Loss, g.Penalty, 150, simulate.SolverOptions{})
		if err != nil {
			t.Fatal(err)
		}
		got := one.PerTrial[k]
		if float64(got.MSE) != tr.MSE || float64(got.Cosine) != tr.Cosine || float64(got.TestError) != tr.TestError || !math.IsNaN(float64(got.TPP)) {
			t.Errorf("trial %d: job %+v, engine %+v", k, got, tr)
		}
		mse = append(mse, tr.MSE)
	}
	if m := simulate.Mean(mse); float64(one.MeanMSE) != m.Mean || float64(one.StdErr) != m.StdErr {
		t.Errorf("mean MSE %v ± %v, engine %v ± %v", one.MeanMSE, one.StdErr, m.Mean, m.StdErr)
	}
	if !(float64(one.TestError.Mean) > 0 && float64(one.TestError.Mean) < 0.5) || !(float64(one.Cosine.Predicted) > 0.5) {
		t.Errorf("test error %+v, cosine %+v", *one.TestError, *one.Cosine)
	}

	// The same check in two parts, merged.
	var parts []protocol.CheckResult
	for _, sp := range protocol.SplitTrials(0, 4, 2) {
		a := args
		a.First, a.Trials = sp[0], sp[1]
		last, _ := runJob(t, "check", a)
		var r protocol.CheckResult
		if err := json.Unmarshal(last.Result, &r); err != nil || last.Type != protocol.Result {
			t.Fatalf("part %v: %v %+v", sp, err, last)
		}
		parts = append(parts, r)
	}
	merged, err := protocol.MergeChecks(parts)
	if err != nil {
		t.Fatal(err)
	}
	for name, pair := range map[string][2]protocol.Num{
		"mse": {merged.MeanMSE, one.MeanMSE}, "stderr": {merged.StdErr, one.StdErr},
		"cosine": {merged.Cosine.Mean, one.Cosine.Mean}, "cosine stderr": {merged.Cosine.StdErr, one.Cosine.StdErr},
		"test error": {merged.TestError.Mean, one.TestError.Mean}, "norm ratio": {merged.NormRatio.Mean, one.NormRatio.Mean},
		"predicted test error": {merged.TestError.Predicted, one.TestError.Predicted},
	} {
		if pair[0] != pair[1] {
			t.Errorf("%s: merged %v, one job %v", name, pair[0], pair[1])
		}
	}
	if parts[0].Cosine == merged.Cosine {
		t.Error("the merged result shares its cosine with a part")
	}

	// A held matrix is for the linear model only.
	a := args
	a.Matrix = "%%MatrixMarket matrix array real general\n1 1\n1\n"
	if last, _ := runJob(t, "check", a); last.Type != protocol.Failed || !strings.Contains(last.Error, "matrix") {
		t.Errorf("a held matrix with a 1-bit readout: %+v", last)
	}
	// A linear check carries no generalized-model statistics.
	last, _ = runJob(t, "check", protocol.CheckArgs{Scenario: json.RawMessage(lassoScenario), N: 40, Trials: 2, Seed: 1})
	var lin protocol.CheckResult
	if err := json.Unmarshal(last.Result, &lin); err != nil || lin.GLM || lin.Cosine != nil || !math.IsNaN(float64(lin.PerTrial[0].Cosine)) {
		t.Errorf("linear check: %v glm %v cosine %v", err, lin.GLM, lin.Cosine)
	}
}
