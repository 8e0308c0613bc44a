package ui

import (
	"bytes"
	"context"
	"encoding/csv"
	"strings"
	"testing"

	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
)

// runOne runs the first queued job that is not cancelled.
func (j *queueJobs) runOne() {
	rest := j.queue
	for len(rest) > 0 && rest[0].cancelled {
		rest = rest[1:]
	}
	if len(rest) == 0 {
		return
	}
	j.queue = rest[:1]
	tail := append([]*queued(nil), rest[1:]...)
	j.flush()
	j.queue = append(j.queue, tail...)
}

func TestMapMatchesEngineWithRidge(t *testing.T) {
	m := modelOf(t, lassoScenario)
	jobs, br := &queueJobs{}, &keepBrowser{}
	c := &Mapview{Model: m, Jobs: jobs, Browser: br}
	c.mapInit()
	if c.X().Over != "l1" || c.Y().Over != "alpha" || c.X().Points != "100" || c.Y().Points != "100" {
		t.Fatalf("proposed map: %+v %+v", c.X(), c.Y())
	}
	for k, v := range map[string]string{"x.from": "0.003", "x.to": "0.3", "x.points": "12", "y.from": "0.2", "y.to": "0.8", "y.points": "10"} {
		if err := c.Set(k, v); err != nil {
			t.Fatal(err)
		}
	}
	c.Start()
	if c.Problem() != "" || len(jobs.queue) != mapBlocksUnknown {
		t.Fatalf("problem %q, %d blocks", c.Problem(), len(jobs.queue))
	}
	jobs.flush()
	if c.Run() != RunDone {
		t.Fatalf("run %s: %s", c.Run(), c.Problem())
	}
	s, _ := scenario.Decode([]byte(lassoScenario))
	spec := study.MapSpec{X: study.Axis{Over: "l1", From: 0.003, To: 0.3, Points: 12, Log: true}, Y: study.Axis{Over: "alpha", From: 0.2, To: 0.8, Points: 10}}
	want, err := study.Map(context.Background(), s, spec, 2, nil)
	if err != nil {
		t.Fatal(err)
	}
	for k := range want.Cells {
		if c.cells[k].X != want.Cells[k].X || c.cells[k].Y != want.Cells[k].Y || c.cells[k].Result.MSE != want.Cells[k].Result.MSE {
			t.Fatalf("cell %d: view %+v, engine %+v", k, c.cells[k], want.Cells[k])
		}
	}
	rx, ry := c.Ridge()
	if len(rx) != 10 {
		t.Fatalf("ridge has %d points, want one per row", len(rx))
	}
	for j, y := range ry {
		best := -1
		for i := 0; i < 12; i++ {
			p := want.At(i, j)
			if p.OK() && (best < 0 || p.Result.MSE < want.At(best, j).Result.MSE) {
				best = i
			}
		}
		if y != want.Y[j] || rx[j] != want.X[best] {
			t.Errorf("row %d: ridge at (%g, %g), lowest MSE at (%g, %g)", j, rx[j], y, want.X[best], want.Y[j])
		}
	}
	if c.FigureURL() == "" {
		t.Fatalf("no map drawn: %s", c.FigureProblem())
	}
	if !strings.HasPrefix(c.Caption(), "White lines: NMSE (dB) = ") {
		t.Errorf("caption %q", c.Caption())
	}
	if st := m.Check().Scenario.Study; st == nil || st.View != "map" || st.Map == nil || st.Map.XPoints != 12 || st.Map.Y != "alpha" || !st.Map.XLog {
		t.Fatalf("study.map not saved: %+v", st)
	}
	fr := c.box.frame
	c.box.pointAt((fr.Left+fr.Right)/2*500, (fr.Top+fr.Bottom)/2*300, 500, 300, c.say)
	if !strings.Contains(c.box.readout, "l1 = ") || !strings.Contains(c.box.readout, "alpha = ") {
		t.Errorf("readout %q", c.box.readout)
	}
	c.Export("csv")
	rows, err := csv.NewReader(bytes.NewReader(br.files["hdrisk-map.csv"])).ReadAll()
	if err != nil || len(rows) != 121 || rows[0][0] != "l1" || rows[0][1] != "alpha" {
		t.Fatalf("CSV: %v, %d rows", err, len(rows))
	}
	ans := c.Answers()
	if len(ans) != 2 || ans[0][0] != "map_seconds" || ans[1][0] != "map_lowest" {
		t.Errorf("answers %v", ans)
	}
}

func TestMapCancelMidway(t *testing.T) {
	m := modelOf(t, lassoScenario)
	jobs, br := &queueJobs{}, &keepBrowser{}
	c := &Mapview{Model: m, Jobs: jobs, Browser: br}
	for k, v := range map[string]string{"x.points": "8", "y.points": "40"} {
		_ = c.Set(k, v)
	}
	c.Start()
	if len(jobs.queue) != mapBlocksUnknown {
		t.Fatalf("40 rows should go out in %d blocks, not %d", mapBlocksUnknown, len(jobs.queue))
	}
	jobs.runOne()
	jobs.runOne()
	if c.Run() != RunRunning {
		t.Fatalf("run %s", c.Run())
	}
	done, total := c.Progress()
	if done == 0 || done >= total {
		t.Errorf("progress %d of %d after two blocks", done, total)
	}
	c.Cancel()
	if c.Run() != RunCancelled || jobs.flush() != 0 {
		t.Fatalf("after cancel: run %s", c.Run())
	}
	if !strings.Contains(c.Status(), "Cancelled after") {
		t.Errorf("status %q", c.Status())
	}
	c.Start()
	jobs.flush()
	if c.Run() != RunDone || c.FigureURL() == "" {
		t.Fatalf("a new map after a cancel: %s %q %q", c.Run(), c.Problem(), c.FigureProblem())
	}
	br.shown(t, "map", c.FigureURL())
	_ = c.Set("y.over", "l1")
	c.Start()
	if !strings.Contains(c.Problem(), "two different") {
		t.Errorf("the same number on both axes: %q", c.Problem())
	}
}

// TestMapGLMQuantities: for a 1-bit scenario the map offers the generalized model's
// observables, as the curve view does, and colours its cells by them: the test error of
// each cell is the engine's map's, and the best cell of the cosine is its highest.
func TestMapGLMQuantities(t *testing.T) {
	m := modelOf(t, oneBitCurveScenario)
	jobs, br := &queueJobs{}, &keepBrowser{}
	c := &Mapview{Model: m, Jobs: jobs, Browser: br}
	c.mapInit()
	for _, name := range []string{"cosine", "test_error", "norm_ratio", "train_misfit", "train_loss"} {
		if !slicesContainObs(c.Quantities(), name) {
			t.Errorf("the 1-bit scenario's map does not offer %s", name)
		}
	}
	if lin := (&Mapview{Model: modelOf(t, lassoScenario)}); slicesContainObs(lin.Quantities(), "cosine") {
		t.Error("a linear scenario's map offers the cosine")
	}
	for _, kv := range [][2]string{{"x.over", "l1"}, {"x.from", "0.01"}, {"x.to", "0.3"}, {"x.points", "4"}, {"x.log", "true"},
		{"y.over", "alpha"}, {"y.from", "1"}, {"y.to", "3"}, {"y.points", "3"}, {"y.log", "false"}, {"quantity", "test_error"}} {
		if err := c.Set(kv[0], kv[1]); err != nil {
			t.Fatal(err)
		}
	}
	c.Start()
	jobs.flush()
	if c.Run() != RunDone {
		t.Fatalf("run %s: %s", c.Run(), c.Problem())
	}
	s, _ := scenario.Decode([]byte(oneBitCurveScenario))
	spec := study.MapSpec{X: study.Axis{Over: "l1", From: 0.01, To: 0.3, Points: 4, Log: true}, Y: study.Axis{Over: "alpha", From: 1, To: 3, Points: 3}}
	want, err := study.Map(context.Background(), s, spec, 1, nil)
	if err != nil {
		t.Fatal(err)
	}
	h := c.figure().Heat()
	lo, hi := 1e300, -1e300
	for k, w := range want.Cells {
		if !w.OK() || !w.Result.GLM {
			t.Fatalf("cell %d of the engine's map: %s, GLM %v", k, w.Status(), w.Result.GLM)
		}
		if h.Z[k] != w.Result.TestError {
			t.Errorf("cell %d: test error shown %v, engine %v", k, h.Z[k], w.Result.TestError)
		}
		lo, hi = min(lo, w.Result.TestError), max(hi, w.Result.Cosine)
	}
	if h.ZLabel != "test error (fresh labels)" || !h.MarkLowest || c.box.spec.Heat == nil || c.box.spec.Heat.ZLabel != h.ZLabel {
		t.Errorf("heat labelled %q (mark lowest %v), drawn %+v", h.ZLabel, h.MarkLowest, c.box.spec.Heat)
	}
	ans := map[string]string{}
	for _, a := range c.Answers() {
		ans[a[0]] = a[1]
	}
	if ans["map_lowest"] != full(lo) {
		t.Errorf("lowest test error %q, engine %v", ans["map_lowest"], lo)
	}
	_ = c.Set("quantity", "cosine")
	ans = map[string]string{}
	for _, a := range c.Answers() {
		ans[a[0]] = a[1]
	}
	if h := c.figure().Heat(); h.MarkLowest || ans["map_highest"] != full(hi) || ans["map_lowest"] != "" {
		t.Errorf("cosine: mark lowest %v, answers %v, highest cosine %v", h.MarkLowest, ans, hi)
	}
	if c.FigureURL() == "" {
		t.Fatalf("no map drawn: %s", c.FigureProblem())
	}
}
