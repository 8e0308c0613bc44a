package ui

import (
	"bytes"
	"context"
	"encoding/csv"
	"math"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
	"hdrisk/protocol"
)

// An invented 1-bit scenario: a quantizer of one bit on a sparse signal.
const oneBitCurveScenario = `{"kind":"hdrisk.scenario","version":1,"title":"invented 1-bit case",` +
	`"design":{"shape":"gaussian","alpha":2,"scale":"rows"},` +
	`"signal":{"law":"bernoulli-gauss","density":0.2,"variance":1},"noise":{"variance":0.01},` +
	`"penalty":{"kind":"l1","l1":0.05},"readout":{"kind":"quantize","bits":1,"range":1}}`

// TestCurvePerValue: "one curve per" bits with the values 1 to 4 runs one curves job per
// value, draws four named curves equal to the engine's curves-per-value study, writes the
// settings into the scenario's study (so the link carries them) and reads them back from
// it; a changed value marks the curves stale.
func TestCurvePerValue(t *testing.T) {
	m := modelOf(t, oneBitCurveScenario)
	jobs, br := &queueJobs{}, &keepBrowser{}
	c := &CurveView{Model: m, Jobs: jobs, Browser: br}
	c.curveInit()
	for _, kv := range [][2]string{{"over", "alpha"}, {"from", "0.5"}, {"to", "4"}, {"points", "8"}, {"curves", "bits"}, {"curves_at", "1, 2, 3,4"}} {
		if err := c.Set(kv[0], kv[1]); err != nil {
			t.Fatal(err)
		}
	}
	if !slicesContainName(c.curvesChoices(), "bits") || slicesContainName(c.curvesChoices(), "alpha") {
		t.Errorf("the menu should offer bits and not the varied alpha: %+v", c.curvesChoices())
	}
	c.Start()
	if c.Problem() != "" || c.Run() != RunRunning {
		t.Fatalf("run %s, problem %q", c.Run(), c.Problem())
	}
	if got := strings.Join(jobs.started, ","); got != "curves,curves,curves,curves" {
		t.Errorf("jobs started: %s (one curves job per value, no references)", got)
	}
	jobs.flush()
	if c.Run() != RunDone || c.Problem() != "" {
		t.Fatalf("run %s after the jobs, problem %q", c.Run(), c.Problem())
	}
	s, _ := scenario.Decode([]byte(oneBitCurveScenario))
	ch, _ := s.Check()
	want, err := study.SweepCurves(context.Background(), ch, study.CurvesSpec{
		SweepSpec: study.SweepSpec{Axis: study.Axis{Over: "alpha", From: 0.5, To: 4, Points: 8}}, Curves: "bits", At: []float64{1, 2, 3, 4}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for k, wc := range want.Curves {
		gc := c.current.curves[k]
		if gc.Value != wc.Value || len(gc.Points) != len(wc.Points) {
			t.Fatalf("curve %d: %g with %d points", k, gc.Value, len(gc.Points))
		}
		for i := range wc.Points {
			if gc.Points[i].X != wc.Points[i].X || gc.Points[i].Result.MSE != wc.Points[i].Result.MSE || gc.Points[i].OK() != wc.Points[i].OK() {
				t.Errorf("bits %g point %d: view %g, engine %g", wc.Value, i, gc.Points[i].Result.MSE, wc.Points[i].Result.MSE)
			}
		}
	}
	l, ok := c.figureSpec()
	if !ok || len(l.Series) != 4 || c.LineCount() != "4" {
		t.Fatalf("the figure has %d curves, want 4", len(l.Series))
	}
	for k, name := range []string{"bits = 1", "bits = 2", "bits = 3", "bits = 4"} {
		if l.Series[k].Name != name {
			t.Errorf("curve %d is named %q, want %q", k, l.Series[k].Name, name)
		}
	}
	if !reflect.DeepEqual(c.Curves(), []string{"bits = 1", "bits = 2", "bits = 3", "bits = 4"}) || !c.ListCurves() || c.CanKeep() {
		t.Errorf("curves listed %v (list %v), keep offered %v", c.Curves(), c.ListCurves(), c.CanKeep())
	}
	// The generalized model's observables can be drawn: the test error of each bit depth.
	if !slicesContainObs(c.Quantities(), "test_error") || !slicesContainObs(c.Quantities(), "cosine") {
		t.Errorf("the 1-bit scenario's quantities lack cosine or test_error")
	}
	_ = c.Set("quantity", "test_error")
	if l, ok := c.figureSpec(); !ok || l.YLabel != "test error (fresh labels)" || l.Series[2].Y[4] != want.Curves[2].Points[4].Result.TestError {
		t.Errorf("test error figure: %q, %v", l.YLabel, l.Series[2].Y[4])
	}
	_ = c.Set("quantity", "nmse_db")
	if lin := (&CurveView{Model: modelOf(t, lassoScenario)}); slicesContainObs(lin.Quantities(), "cosine") {
		t.Error("a linear scenario offers the cosine")
	}
	if c.FigureURL() == "" {
		t.Fatalf("no figure: %q", c.FigureProblem())
	}
	br.shown(t, "curve", c.FigureURL())
	data, err := c.CSV()
	if err != nil {
		t.Fatal(err)
	}
	rows, _ := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if len(rows) != 1+32 || rows[0][0] != "curve" || rows[1][0] != "bits = 1" || rows[32][0] != "bits = 4" {
		t.Errorf("CSV: %d rows, first %v", len(rows), rows[0][:2])
	}

	// The settings travel with the scenario, and a view opened on it reads them back.
	st := m.Check().Scenario.Study
	if st == nil || st.Sweep == nil || st.Sweep.Curves != "bits" || !reflect.DeepEqual(st.Sweep.CurvesAt, []float64{1, 2, 3, 4}) {
		t.Fatalf("the curves are not in the study: %+v", st)
	}
	back, err := scenario.Decode(m.Check().JSON)
	if err != nil {
		t.Fatal(err)
	}
	m2 := NewModel()
	if err := m2.Load(back); err != nil {
		t.Fatal(err)
	}
	c2 := &CurveView{Model: m2}
	c2.curveInit()
	if c2.CurvesOver() != "bits" || c2.CurvesAt() != "1, 2, 3, 4" || c2.Axis().Points != "8" {
		t.Errorf("the reopened view: curves %q at %q, axis %+v", c2.CurvesOver(), c2.CurvesAt(), c2.Axis())
	}

	if c.Stale() {
		t.Error("fresh curves marked stale")
	}
	_ = c.Set("curves_at", "1, 2")
	if !c.Stale() {
		t.Error("other values should mark the curves stale")
	}
	// A value the field refuses is an error naming it, and no job starts.
	_ = c.Set("curves_at", "1, 0")
	jobs.started = nil
	c.Start()
	jobs.flush()
	if !strings.Contains(c.Problem(), "curves_at[1]") && !strings.Contains(c.Problem(), "bits") {
		t.Errorf("bits 0: problem %q", c.Problem())
	}
	// Varying the number that set the curves returns to one curve, with a note.
	_ = c.Set("curves_at", "1, 2")
	_ = c.Set("over", "bits")
	if c.CurvesOver() != "" || len(m.Views().Notes) == 0 {
		t.Errorf("varying bits kept the curves per bits (%q), notes %v", c.CurvesOver(), m.Views().Notes)
	}
}

func slicesContainName(ps []pathChoice, name string) bool {
	for _, p := range ps {
		if p.Name == name {
			return true
		}
	}
	return false
}

func slicesContainObs(os []study.Observable, name string) bool {
	for _, o := range os {
		if o.Name == name {
			return true
		}
	}
	return false
}

// TestCurvePerValueSharedInBlocks: over several workers each curve of a family goes out in
// blocks of points (familyBlocks, two a worker), so that a slow curve does not hold one
// worker while the others idle; the curves put together are the engine's SweepCurves to the
// fixed point's tolerance (each block starts cold where the whole curve is warm-started, for
// the 1-bit model as for a linear one; 1e-9 relative, as for a plain sweep shared out).
func TestCurvePerValueSharedInBlocks(t *testing.T) {
	for _, tc := range []struct {
		name, scen, over, from, to, curves, at string
		points, workers, jobs                  int
	}{
		{"bits", oneBitCurveScenario, "alpha", "0.5", "4", "bits", "1, 2, 3, 4", 30, 2, 16},
		{"l1", lassoScenario, "alpha", "0.2", "0.9", "l1", "0.01, 0.1", 40, 3, 12},
	} {
		t.Run(tc.name, func(t *testing.T) {
			m := modelOf(t, tc.scen)
			jobs := &poolJobs{workers: tc.workers}
			c := &CurveView{Model: m, Jobs: jobs, Browser: &keepBrowser{}}
			c.curveInit()
			for _, kv := range [][2]string{{"over", tc.over}, {"from", tc.from}, {"to", tc.to}, {"points", strconv.Itoa(tc.points)},
				{"log", "false"}, {"curves", tc.curves}, {"curves_at", tc.at}} {
				if err := c.Set(kv[0], kv[1]); err != nil {
					t.Fatal(err)
				}
			}
			c.Start()
			if c.Problem() != "" || len(jobs.queue) != tc.jobs {
				t.Fatalf("problem %q, %d jobs, want %d", c.Problem(), len(jobs.queue), tc.jobs)
			}
			covered := map[float64]int{}
			for _, q := range jobs.queue {
				a := q.args.(protocol.CurvesArgs)
				if q.kind != "curves" || len(a.At) != 1 || a.PointTo-a.PointFrom < minFamilyBlock {
					t.Fatalf("job %s %+v", q.kind, a)
				}
				covered[a.At[0]] += a.PointTo - a.PointFrom
			}
			for v, n := range covered {
				if n != tc.points {
					t.Errorf("the blocks of the curve at %g cover %d points, not %d", v, n, tc.points)
				}
			}
			jobs.flush()
			if c.Run() != RunDone || c.Problem() != "" {
				t.Fatalf("run %s, problem %q", c.Run(), c.Problem())
			}
			s, _ := scenario.Decode([]byte(tc.scen))
			ch, _ := s.Check()
			ax := c.axis
			want, err := study.SweepCurves(context.Background(), ch, study.CurvesSpec{SweepSpec: study.SweepSpec{Axis: ax},
				Curves: tc.curves, At: c.current.at}, nil)
			if err != nil {
				t.Fatal(err)
			}
			worst := 0.0
			for k, wc := range want.Curves {
				gc := c.current.curves[k]
				if gc.Value != wc.Value || len(gc.Points) != tc.points {
					t.Fatalf("curve %d: %g with %d points", k, gc.Value, len(gc.Points))
				}
				for i, w := range wc.Points {
					p := gc.Points[i]
					d := math.Abs(p.Result.MSE-w.Result.MSE) / w.Result.MSE
					worst = math.Max(worst, d)
					if p.X != w.X || p.OK() != w.OK() || !w.OK() || d > 1e-9 {
						t.Errorf("%s %g point %d: view (%v, %v, %s), engine (%v, %v, %s)", tc.curves, wc.Value, i, p.X, p.Result.MSE, p.Status(), w.X, w.Result.MSE, w.Status())
					}
				}
			}
			t.Logf("largest relative difference of the MSE from the unsplit curves: %.3g", worst)
			if l, ok := c.figureSpec(); !ok || len(l.Series) != len(want.Curves) {
				t.Errorf("the figure has %d curves, want %d", len(l.Series), len(want.Curves))
			}
		})
	}
	// One worker, or too few points to share: one job per curve, as before.
	if b := (&CurveView{Jobs: &queueJobs{}}).familyBlocks(4, 200); len(b) != 1 {
		t.Errorf("one worker: blocks %v", b)
	}
	if b := (&CurveView{Jobs: &poolJobs{workers: 8}}).familyBlocks(2, 9); len(b) != 1 {
		t.Errorf("9 points: blocks %v", b)
	}
	if b := (&CurveView{Jobs: &poolJobs{workers: 8}}).familyBlocks(8, 200); len(b) != familyMaxJobs/8 {
		t.Errorf("8 curves on 8 workers: %d blocks a curve, want %d (the cap)", len(b), familyMaxJobs/8)
	}
}
