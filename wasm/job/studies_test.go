package job

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"hdrisk/engine/plot"
	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
	"hdrisk/protocol"
)

// These tests check the glue of the study kinds: that the numbers of engine/study cross the
// protocol unchanged. The mathematics is tested in engine/study.

const studyScenario = `{"kind":"hdrisk.scenario","version":1,"title":"invented example",` +
	`"design":{"shape":"gaussian","alpha":0.5,"scale":"rows"},` +
	`"signal":{"law":"bernoulli-gauss","density":0.1,"variance":1},` +
	`"noise":{"variance":0.01},"penalty":{"kind":"elastic-net","l1":0.1,"l2":0}}`

func decoded(t *testing.T) scenario.Scenario {
	t.Helper()
	s, err := scenario.Decode([]byte(studyScenario))
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// run sends args through the job protocol and decodes the result; it returns the number of
// progress replies seen, or the error text of a failed job.
func run[A, R any](t *testing.T, k protocol.Kind[A, R], args A) (out R, progress int, failure string) {
	t.Helper()
	raw, err := k.EncodeArgs(args)
	if err != nil {
		t.Fatal(err)
	}
	var last protocol.Reply
	Run(protocol.Request{ID: 1, Kind: k.Name, Args: raw}, func(r protocol.Reply) {
		if r.Type == protocol.Progress {
			progress++
		}
		last = r
	})
	if last.Type == protocol.Failed {
		return out, progress, last.Error
	}
	if last.Type != protocol.Result {
		t.Fatalf("%s ended with %+v", k.Name, last)
	}
	if out, err = k.DecodeResult(last.Result); err != nil {
		t.Fatal(err)
	}
	return out, progress, ""
}

func samePoint(a, b study.Point) bool {
	eq := func(x, y float64) bool { return x == y || (math.IsNaN(x) && math.IsNaN(y)) }
	ra, rb := a.Result, b.Result
	return eq(a.X, b.X) && eq(a.Y, b.Y) && a.Failed == b.Failed && eq(ra.MSE, rb.MSE) && eq(ra.NMSE, rb.NMSE) &&
		eq(ra.NMSEdB, rb.NMSEdB) && eq(ra.Susceptibility, rb.Susceptibility) && eq(ra.G1, rb.G1) &&
		eq(ra.T1, rb.T1) && eq(ra.G2, rb.G2) && eq(ra.NonZero, rb.NonZero) && eq(ra.TPP, rb.TPP) &&
		eq(ra.FDP, rb.FDP) && eq(ra.TrainError, rb.TrainError) && ra.Iterations == rb.Iterations &&
		ra.Converged == rb.Converged && eq(ra.Residual, rb.Residual) && ra.EstimateZero == rb.EstimateZero
}

func TestSweepJobMatchesEngine(t *testing.T) {
	ax := study.Axis{Over: "l1", From: 1e-3, To: 10, Points: 40, Log: true}
	want, err := study.Sweep(context.Background(), decoded(t), study.SweepSpec{Axis: ax}, nil)
	if err != nil {
		t.Fatal(err)
	}
	got, _, fail := run(t, protocol.Sweep, protocol.SweepArgs{Scenario: json.RawMessage(studyScenario), Axis: ax})
	if fail != "" {
		t.Fatal(fail)
	}
	if len(got.Points) != len(want) {
		t.Fatalf("%d points, want %d", len(got.Points), len(want))
	}
	for i := range want {
		if p := got.Points[i]; !samePoint(p, want[i]) {
			t.Errorf("point %d: job %+v, engine %+v", i, p, want[i])
		}
	}
	// Two blocks swept apart: the same x values, numbers within the solver's tolerance.
	var joined []study.Point
	for _, b := range [][2]int{{0, 25}, {25, 40}} {
		part, _, fail := run(t, protocol.Sweep, protocol.SweepArgs{Scenario: json.RawMessage(studyScenario), Axis: ax, PointFrom: b[0], PointTo: b[1]})
		if fail != "" {
			t.Fatal(fail)
		}
		joined = append(joined, part.Points...)
	}
	for i := range want {
		p := joined[i]
		if p.X != want[i].X || p.OK() != want[i].OK() || math.Abs(p.Result.MSE-want[i].Result.MSE) > 1e-9*want[i].Result.MSE {
			t.Errorf("block point %d: (%v, %v), whole sweep (%v, %v)", i, p.X, p.Result.MSE, want[i].X, want[i].Result.MSE)
		}
	}
	if _, _, fail := run(t, protocol.Sweep, protocol.SweepArgs{Scenario: json.RawMessage(studyScenario), Axis: ax, PointFrom: 30, PointTo: 41}); !strings.Contains(fail, "point") {
		t.Errorf("a block past the last point should be refused: %q", fail)
	}
	if _, _, fail := run(t, protocol.Sweep, protocol.SweepArgs{Scenario: json.RawMessage(studyScenario), Axis: study.Axis{Over: "nothing", From: 1, To: 2, Points: 3}}); !strings.Contains(fail, "nothing") {
		t.Errorf("an unknown field should be named: %q", fail)
	}
}

// Blocks of rows computed apart must put together the map that study.Map computes at once.
func TestMapBlocksAssembleEngineMap(t *testing.T) {
	x := study.Axis{Over: "l1", From: 1e-2, To: 1, Points: 7, Log: true}
	y := study.Axis{Over: "alpha", From: 0.2, To: 1.5, Points: 5}
	want, err := study.Map(context.Background(), decoded(t), study.MapSpec{X: x, Y: y}, 1, nil)
	if err != nil {
		t.Fatal(err)
	}
	var cells []study.Point
	for _, b := range [][2]int{{0, 2}, {2, 3}, {3, 5}} {
		got, n, fail := run(t, protocol.MapRows, protocol.MapArgs{Scenario: json.RawMessage(studyScenario), X: x, Y: y, RowFrom: b[0], RowTo: b[1]})
		if fail != "" {
			t.Fatal(fail)
		}
		if got.RowFrom != b[0] || got.RowTo != b[1] || len(got.Cells) != (b[1]-b[0])*7 || n < 1 {
			t.Fatalf("block %v: rows %d..%d, %d cells, %d progress replies", b, got.RowFrom, got.RowTo, len(got.Cells), n)
		}
		cells = append(cells, got.Cells...)
	}
	for k, c := range cells {
		if !samePoint(c, want.Cells[k]) {
			t.Errorf("cell %d: job %+v, engine %+v", k, c, want.Cells[k])
		}
	}
	if _, _, fail := run(t, protocol.MapRows, protocol.MapArgs{Scenario: json.RawMessage(studyScenario), X: x, Y: y, RowFrom: 3, RowTo: 9}); !strings.Contains(fail, "rows") {
		t.Errorf("a block past the last row should be refused naming the rows: %q", fail)
	}
}

func TestBestPlanBayesJobsMatchEngine(t *testing.T) {
	s := decoded(t)
	wb, err := study.Best(context.Background(), s, study.BestSpec{Over: "l1"})
	if err != nil {
		t.Fatal(err)
	}
	b, _, fail := run(t, protocol.Best, protocol.BestArgs{Scenario: json.RawMessage(studyScenario), Over: "l1"})
	if fail != "" {
		t.Fatal(fail)
	}
	if b.Value != wb.Value || b.MSE != wb.MSE || !samePoint(study.Point{Result: b.Result}, study.Point{Result: wb.Result}) || b.AtBound != wb.AtBound || b.Solves != wb.Solves {
		t.Errorf("best job %+v, engine %+v", b, wb)
	}

	wp, err := study.Plan(context.Background(), s, study.PlanSpec{Target: -15, AlphaMax: 3})
	if err != nil {
		t.Fatal(err)
	}
	p, _, fail := run(t, protocol.Plan, protocol.PlanArgs{Scenario: json.RawMessage(studyScenario), Target: -15, AlphaMax: 3})
	if fail != "" {
		t.Fatal(fail)
	}
	if p.Alpha != wp.Alpha || p.Reached != wp.Reached || p.Reason != wp.Reason || p.Best.Value != wp.Best.Value {
		t.Errorf("plan job %+v, engine %+v", p, wp)
	}
	if !p.Reached {
		t.Errorf("the invented example should reach -15 dB below alpha = 3: %s", p.Reason)
	}
	far, _, fail := run(t, protocol.Plan, protocol.PlanArgs{Scenario: json.RawMessage(studyScenario), Target: -80, AlphaMax: 0.3})
	if fail != "" {
		t.Fatal(fail)
	}
	if far.Reached || far.Reason == "" {
		t.Errorf("-80 dB below alpha 0.3 with noise 0.01 should not be reached, and say why: %+v", far)
	}

	pr, _ := s.Problem()
	wy, err := study.Bayes(pr)
	if err != nil {
		t.Fatal(err)
	}
	y, _, fail := run(t, protocol.Bayes, protocol.BayesArgs{Scenario: json.RawMessage(studyScenario)})
	if fail != "" {
		t.Fatal(fail)
	}
	if y.Uninformed.MSE != wy.Uninformed.MSE || y.Informed.NMSEdB != wy.Informed.NMSEdB || y.Differ != wy.Differ ||
		y.Optimal != wy.Optimal || y.OptimalStart != wy.OptimalStart {
		t.Errorf("bayes job %+v, engine %+v", y, wy)
	}
	lap := strings.Replace(studyScenario, `"law":"bernoulli-gauss","density":0.1,"variance":1`, `"law":"laplace","scale":1`, 1)
	// A Laplace signal has a Bayes reference through its numerical posterior mean.
	if yl, _, fail := run(t, protocol.Bayes, protocol.BayesArgs{Scenario: json.RawMessage(lap)}); fail != "" || !yl.Uninformed.Converged || yl.Informed.MSE > yl.Uninformed.MSE {
		t.Errorf("a Laplace signal: %+v, %q", yl, fail)
	}
}

// The figure kind must draw what plot draws: the same SVG and frame, with NaN gaps kept.
func TestFigureJobMatchesPlot(t *testing.T) {
	l := plot.Line{Title: "t", XLog: true, Series: []plot.Series{{Name: "a", X: []float64{1, 2, 3, 4}, Y: []float64{1, math.NaN(), 2, 3},
		Missing: []float64{2}}}, VLines: []plot.Mark{{At: 2.5, Label: "best"}, {At: math.NaN()}}}
	want, err := l.Build()
	if err != nil {
		t.Fatal(err)
	}
	wsvg, _ := want.SVG()
	got, _, fail := run(t, protocol.Figure, protocol.FigureArgs{Line: &l})
	if fail != "" {
		t.Fatal(fail)
	}
	if !bytes.Equal(got.Data, wsvg) || got.Frame != want.Frame() {
		t.Errorf("figure job differs from plot: frame %+v vs %+v", got.Frame, want.Frame())
	}
	h := plot.Heat{X: []float64{1, 2, 3}, Y: []float64{1, 2}, Z: []float64{1, 2, math.NaN(), 4, 5, 6}}
	hf, err := h.Build()
	if err != nil {
		t.Fatal(err)
	}
	hsvg, _ := hf.SVG()
	if got, _, fail = run(t, protocol.Figure, protocol.FigureArgs{Heat: &h}); fail != "" {
		t.Fatal(fail)
	}
	if !bytes.Equal(got.Data, hsvg) || got.Frame != hf.Frame() {
		t.Errorf("heat figure job differs from plot: frame %+v vs %+v", got.Frame, hf.Frame())
	}
	if _, _, fail := run(t, protocol.Figure, protocol.FigureArgs{}); !strings.Contains(fail, "exactly one") {
		t.Errorf("no figure: %q", fail)
	}
}
