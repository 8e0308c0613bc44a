package job

import (
	"context"
	"encoding/json"
	"reflect"
	"strings"
	"testing"

	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
	"hdrisk/protocol"
)

// TestCurvesThroughProtocol: a curves-per-value sweep crosses the job protocol with every
// number of the engine's result unchanged (NaN included), and a bad value is refused by name.
func TestCurvesThroughProtocol(t *testing.T) {
	doc := `{"kind":"hdrisk.scenario","version":1,"title":"invented 1-bit case",` +
		`"design":{"shape":"gaussian","alpha":2,"scale":"rows"},` +
		`"signal":{"law":"bernoulli-gauss","density":0.2,"variance":1},"noise":{"variance":0.01},` +
		`"penalty":{"kind":"l1","l1":0.05},"readout":{"kind":"quantize","bits":1,"range":1}}`
	ax := study.Axis{Over: "alpha", From: 0.5, To: 4, Points: 6}
	got, progress, failure := run(t, protocol.Curves, protocol.CurvesArgs{Scenario: json.RawMessage(doc), Axis: ax, Curves: "bits", At: []float64{1, 3}})
	if failure != "" {
		t.Fatal(failure)
	}
	if progress < 1 {
		t.Errorf("no progress reply")
	}
	s, err := scenario.Decode([]byte(doc))
	if err != nil {
		t.Fatal(err)
	}
	c, _ := s.Check()
	want, err := study.SweepCurves(context.Background(), c, study.CurvesSpec{SweepSpec: study.SweepSpec{Axis: ax}, Curves: "bits", At: []float64{1, 3}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	// NaN != NaN: compare the encodings, which keep every bit of every number.
	a, _ := protocol.Marshal(got)
	b, _ := protocol.Marshal(want)
	if string(a) != string(b) || len(got.Curves) != 2 || got.Curves[1].Value != 3 || len(got.Curves[1].Points) != 6 {
		t.Errorf("the curves changed on the way")
	}
	if !strings.Contains(string(a), `"points":{"n":6`) {
		t.Errorf("the points do not travel packed: %.200s", a)
	}
	if !reflect.DeepEqual(got.Curves[0].Points[0].X, 0.5) || !got.Curves[0].Points[0].Result.GLM {
		t.Errorf("first point %+v", got.Curves[0].Points[0])
	}
	_, _, failure = run(t, protocol.Curves, protocol.CurvesArgs{Scenario: json.RawMessage(doc), Axis: ax, Curves: "bits", At: []float64{1, 0}})
	if !strings.Contains(failure, "curves_at[1]") {
		t.Errorf("bits 0 refused with %q, want the value named", failure)
	}
}
