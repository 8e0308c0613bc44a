package job

import (
	"testing"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
	"hdrisk/protocol"
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
	got, _, fail := run(t, protocol.Eval, protocol.EvalArgs{Scenario: text})
	if fail != "" {
		t.Fatalf("eval failed: %s", fail)
	}
	if !samePoint(study.Point{Result: got}, study.Point{Result: want}) {
		t.Errorf("eval job = %+v, engine = %+v", got, want)
	}
	if !got.Converged || got.MSE <= 0 {
		t.Errorf("the invented example should converge to a positive error: %+v", got)
	}
}
