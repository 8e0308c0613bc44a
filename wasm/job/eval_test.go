package job

import (
	"encoding/json"
	"testing"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/scenario"
)

// The eval job must hand on the engine's figures unchanged: this checks the glue, not the
// mathematics (engine/fixedpoint has its own reference tests).
func TestEvalPassesEngineFiguresThrough(t *testing.T) {
	text := []byte(`{"kind":"hdrisk.scenario","version":1,"title":"invented example",` +
		`"design":{"shape":"orthogonal","alpha":0.4,"scale":"rows"},` +
		`"signal":{"law":"bernoulli-gauss","density":0.05,"variance":1},` +
		`"noise":{"variance":0.01},"penalty":{"kind":"elastic-net","l1":0.05,"l2":0}}`)
	s, err := scenario.Decode(text)
	if err != nil {
		t.Fatal(err)
	}
	p, err := s.Problem()
	if err != nil {
		t.Fatal(err)
	}
	want, err := fixedpoint.Solve(p, fixedpoint.Options{})
	if err != nil {
		t.Fatal(err)
	}
	var replies []Reply
	args, _ := json.Marshal(EvalArgs{Scenario: text})
	Run(Request{ID: 9, Kind: "eval", Args: args}, func(r Reply) { replies = append(replies, r) })
	last := replies[len(replies)-1]
	if last.Type != Result {
		t.Fatalf("eval failed: %+v", last)
	}
	var got Figures
	if err := json.Unmarshal(last.Result, &got); err != nil {
		t.Fatal(err)
	}
	if got.MSE != want.MSE || got.NMSEdB != want.NMSEdB || got.Susceptibility != want.Susceptibility ||
		got.NonzeroFraction != want.NonZero || got.TPP != want.TPP || got.FDP != want.FDP ||
		got.TrainError != want.TrainError || got.Converged != want.Converged ||
		got.Iterations != want.Iterations || got.EstimateZero != want.EstimateZero {
		t.Errorf("eval job = %+v, engine = %+v", got, want)
	}
	if !got.Converged || got.MSE <= 0 {
		t.Errorf("the invented example should converge to a positive error: %+v", got)
	}
}
