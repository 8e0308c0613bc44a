package browsertest

import (
	"context"
	"encoding/csv"
	"math"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
	"hdrisk/protocol"
	"hdrisk/ui"
	"hdrisk/wasm/job"
)

// TestOneBitInPage builds a 1-bit scenario in the editor (a quantizer of one bit), checks its
// headline figures (cosine and test error among them) against the engine, draws the error
// over m/n for 1, 2, 3 and 4 bits (one row of the map per bit depth, each a curve over m/n)
// and compares every cell with the engine's map, draws the same as four curves in the curve
// view (one per bit depth, compared with the engine's curves through the saved CSV), logs the
// page's time for a 200-point sweep, then opens the page's link in a fresh browser and finds
// the same scenario, figures and four curves.
func TestOneBitInPage(t *testing.T) {
	b, _ := open(t)
	if state := b.settle(t); state != "ready" {
		t.Fatalf("data-state=%s: %s", state, b.text(t, ".problem"))
	}
	b.cdWorkers(t)

	b.cdChoose(t, "#pick-readout", "quantize")
	b.typeInto(t, `[data-path="readout.bits"]`, "1")
	b.typeInto(t, `[data-path="readout.range"]`, "1")
	if state := b.settle(t); state != "ready" {
		t.Fatalf("after the edit: data-state=%s: %s", state, b.text(t, ".problem"))
	}
	m := ui.NewModel()
	if err := m.SetKind("readout", "quantize"); err != nil {
		t.Fatal(err)
	}
	for _, f := range m.Fields("readout") {
		if err := m.SetText(f.ID, "1"); err != nil {
			t.Fatal(err)
		}
	}
	c := m.Check()
	if c.Err != nil {
		t.Fatal(c.Err)
	}
	ch, err := c.Scenario.Check()
	if err != nil {
		t.Fatal(err)
	}
	g, ok := ch.GLM()
	if !ok {
		t.Fatal("the 1-bit scenario is not a generalized model")
	}
	want, err := fixedpoint.SolveGLM(g, fixedpoint.Options{})
	if err != nil {
		t.Fatal(err)
	}
	figs := b.figures(t)
	for name, v := range map[string]float64{"mse": want.MSE, "cosine": want.Cosine, "test_error": want.TestError} {
		got, err := strconv.ParseFloat(figs[name], 64)
		if err != nil || math.Abs(got-v) > 1e-12*math.Abs(v) {
			t.Errorf("%s = %q in the page, %v natively", name, figs[name], v)
		}
	}

	// The map: m/n from 0.5 to 4 (8 points) against 1 to 4 bits.
	b.studyClick(t, "#tab-map")
	b.studyWait(t, "[data-view=map]", "data-run", 5*time.Second, "idle")
	b.cdChoose(t, "#map-x-over", "alpha")
	b.typeInto(t, "#map-x-from", "0.5")
	b.typeInto(t, "#map-x-to", "4")
	b.typeInto(t, "#map-x-points", "8")
	b.cdChoose(t, "#map-y-over", "bits")
	b.typeInto(t, "#map-y-from", "1")
	b.typeInto(t, "#map-y-to", "4")
	b.typeInto(t, "#map-y-points", "4")
	b.studyClick(t, "#map-run")
	if got := b.studyWait(t, "[data-view=map]", "data-run", 60*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the map ended in %s: %s", got, b.text(t, "[data-view=map] .problem"))
	}
	b.studyWait(t, "[data-view=map]", "data-figure-seconds", 10*time.Second)
	if p := b.text(t, "[data-view=map] .problem"); p != "" {
		t.Fatalf("the map drew with a problem: %s", p)
	}
	b.imageShown(t, "#map-figure")
	grid, err := study.Map(context.Background(), c.Scenario, study.MapSpec{
		X: study.Axis{Over: "alpha", From: 0.5, To: 4, Points: 8}, Y: study.Axis{Over: "bits", From: 1, To: 4, Points: 4}}, 1, nil)
	if err != nil {
		t.Fatal(err)
	}
	cells := grid.Cells
	perBits := map[float64]int{}
	for _, p := range cells {
		if p.OK() && p.Result.GLM {
			perBits[p.Y]++
		}
	}
	for bits := 1.0; bits <= 4; bits++ {
		if perBits[bits] != 8 {
			t.Errorf("%g bits: %d of 8 points of its curve solved", bits, perBits[bits])
		}
	}
	// map_lowest is the lowest of the quantity the colours show, by default nmse_db.
	lowest := math.Inf(1)
	for _, p := range cells {
		if p.OK() {
			lowest = math.Min(lowest, p.Result.NMSEdB)
		}
	}
	if got, err := strconv.ParseFloat(b.figures(t)["map_lowest"], 64); err != nil || math.Abs(got-lowest) > 1e-9*math.Abs(lowest) {
		t.Errorf("map_lowest %q in the page, %v dB natively", b.figures(t)["map_lowest"], lowest)
	}

	// The curve view: first a 200-point sweep over m/n, timed by the page's own marks
	// (logged, not asserted), then m/n from 0.5 to 4 (8 points) drawn once per bit depth.
	downloads := b.downloadsTo(t)
	b.studyClick(t, "#tab-curve")
	b.studyWait(t, "[data-view=curve]", "data-run", 5*time.Second, "idle")
	b.cdChoose(t, "#curve-over", "alpha")
	b.typeInto(t, "#curve-from", "0.5")
	b.typeInto(t, "#curve-to", "4")
	b.typeInto(t, "#curve-points", "200")
	b.studyClick(t, "#curve-run")
	if got := b.studyWait(t, "[data-view=curve]", "data-run", 60*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the 200-point sweep ended in %s: %s", got, b.text(t, "[data-view=curve] .problem"))
	}
	b.studyWait(t, "[data-view=curve]", "data-figure-seconds", 10*time.Second)
	t.Logf("budget: 200-point sweep of the 1-bit scenario over m/n in the page: %s s from the click to the numbers, %s s to the figure (goal 0.5 s)",
		b.studyAttr(t, "[data-view=curve]", "data-seconds"), b.studyAttr(t, "[data-view=curve]", "data-figure-seconds"))

	b.typeInto(t, "#curve-points", "8")
	b.cdChoose(t, "#curve-curves", "bits")
	b.typeInto(t, "#curve-curves-at", "1, 2, 3, 4")
	b.studyClick(t, "#curve-run")
	if got := b.studyWait(t, "[data-view=curve]", "data-run", 60*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the curves ended in %s: %s", got, b.text(t, "[data-view=curve] .problem"))
	}
	b.studyWait(t, "[data-view=curve]", "data-figure-seconds", 10*time.Second)
	t.Logf("4 curves of 8 points in the page: %s s from the click to the numbers", b.studyAttr(t, "[data-view=curve]", "data-seconds"))
	b.imageShown(t, "#curve-figure")
	bitsCurves := []string{"bits = 1", "bits = 2", "bits = 3", "bits = 4"}
	b.curvesDrawn(t, bitsCurves)
	ch, err = c.Scenario.Check()
	if err != nil {
		t.Fatal(err)
	}
	family, err := study.SweepCurves(context.Background(), ch, study.CurvesSpec{
		SweepSpec: study.SweepSpec{Axis: study.Axis{Over: "alpha", From: 0.5, To: 4, Points: 8}}, Curves: "bits", At: []float64{1, 2, 3, 4}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	_, data := b.studyDownload(t, downloads, "#curve-csv")
	rows, err := csv.NewReader(strings.NewReader(string(data))).ReadAll()
	if err != nil || len(rows) != 1+32 || rows[0][0] != "curve" || rows[0][1] != "alpha" || rows[0][2] != "mse" {
		t.Fatalf("downloaded CSV: %v, %d rows", err, len(rows))
	}
	for k, cv := range family.Curves {
		for i, p := range cv.Points {
			row := rows[1+8*k+i]
			mse, err := strconv.ParseFloat(row[2], 64)
			// The page shares each curve out in blocks that start cold, where the engine's
			// whole curve is warm-started: equal to the fixed point's tolerance (1e-9 relative).
			if row[0] != bitsCurves[k] || !p.OK() || err != nil || math.Abs(mse-p.Result.MSE) > 1e-9*math.Abs(p.Result.MSE) {
				t.Errorf("%s, point %d: page %q mse %q, engine %v (ok %v)", bitsCurves[k], i, row[0], row[2], p.Result.MSE, p.OK())
			}
		}
	}

	// The finite-size check of the 1-bit scenario, its trials shared between the workers: the
	// cosine and the test error beside their predictions, the same numbers as natively.
	b.studyClick(t, "#tab-check")
	b.studyWait(t, "[data-view=check]", "data-run", 5*time.Second, "idle")
	b.typeInto(t, "#check-n", "200")
	b.typeInto(t, "#check-trials", "4")
	b.typeInto(t, "#check-seed", "3")
	b.studyClick(t, "#check-run")
	if got := b.studyWait(t, "[data-view=check]", "data-run", 120*time.Second, "done", "error", "cancelled"); got != "done" {
		t.Fatalf("the check ended in %s: %s", got, b.text(t, "[data-view=check] .problem"))
	}
	scen, err := m.JSON()
	if err != nil {
		t.Fatal(err)
	}
	native, err := job.Check(protocol.CheckArgs{Scenario: scen, N: 200, Trials: 4, Seed: 3}, nil)
	if err != nil || !native.GLM || native.TestError == nil {
		t.Fatalf("the native check: %v (glm %v)", err, native.GLM)
	}
	cf := b.figures(t)
	for name, w := range map[string]protocol.Num{"check_mean_mse": native.MeanMSE, "check_cosine": native.Cosine.Mean,
		"check_predicted_cosine": native.Cosine.Predicted, "check_test_error": native.TestError.Mean,
		"check_predicted_test_error": native.TestError.Predicted, "check_stderr": native.StdErr} {
		got, err := strconv.ParseFloat(cf[name], 64)
		if err != nil || math.Abs(got-float64(w)) > 1e-12*math.Abs(float64(w)) {
			t.Errorf("%s = %q in the page, %v natively", name, cf[name], w)
		}
	}
	if v := float64(native.TestError.Predicted); v != want.TestError {
		t.Errorf("the check's predicted test error %v, the fixed point's %v", v, want.TestError)
	}
	t.Logf("1-bit check n = 200, 4 trials: MSE %s (predicted %s), cosine %s (predicted %s), test error %s (predicted %s)",
		cf["check_mean_mse"], cf["check_predicted_mse"], cf["check_cosine"], cf["check_predicted_cosine"], cf["check_test_error"], cf["check_predicted_test_error"])

	// The link, opened again in a fresh browser.
	b.studyClick(t, "#tab-share")
	b.shareWait(t, "the share tab", `!document.getElementById("panel-share").hidden`)
	b.shareWait(t, "the link", `document.getElementById("share-link").value.length > 0`)
	link := b.shareLink(t)
	s, err := scenario.DecodeLink(link)
	if err != nil || s.Readout == nil || s.Readout.Kind != "quantize" || s.Readout.Params["bits"] != 1 {
		t.Fatalf("the link does not hold the 1-bit readout: %v %+v", err, s.Readout)
	}
	fresh, _ := open(t)
	if state := fresh.shareGoTo(t, link); state != "ready" {
		t.Fatalf("fresh page: data-state=%s: %s", state, fresh.text(t, ".problem"))
	}
	again := fresh.figures(t)
	for _, name := range []string{"mse", "cosine", "test_error"} {
		if again[name] != figs[name] {
			t.Errorf("the reopened link shows %s = %q, the first page %q", name, again[name], figs[name])
		}
	}
	if !reflect.DeepEqual(fresh.studyValue(t, "#pick-readout"), "quantize") {
		t.Errorf("the reopened page's readout menu shows %q", fresh.studyValue(t, "#pick-readout"))
	}
	if sw := s.Study.Sweep; sw == nil || sw.Curves != "bits" || !reflect.DeepEqual(sw.CurvesAt, []float64{1, 2, 3, 4}) || sw.Points != 8 {
		t.Fatalf("the link does not hold the curves per bit depth: %+v", sw)
	}
	// The reopened curve view holds the same settings and draws the same four curves.
	fresh.cdWorkers(t)
	fresh.psTab(t, "curve")
	for sel, want := range map[string]string{"#curve-over": "alpha", "#curve-from": "0.5", "#curve-to": "4", "#curve-points": "8",
		"#curve-curves": "bits", "#curve-curves-at": "1, 2, 3, 4"} {
		if got := fresh.studyValue(t, sel); got != want {
			t.Errorf("reopened curve view: %s = %q, the link says %q", sel, got, want)
		}
	}
	fresh.studyClick(t, "#curve-run")
	if got := fresh.studyWait(t, "[data-view=curve]", "data-run", 60*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the reopened curves ended in %s: %s", got, fresh.text(t, "[data-view=curve] .problem"))
	}
	fresh.studyWait(t, "[data-view=curve]", "data-figure-seconds", 10*time.Second)
	fresh.imageShown(t, "#curve-figure")
	fresh.curvesDrawn(t, bitsCurves)
}

// curvesDrawn checks that the curve view's figure holds the named curves, in order: its
// data-curves hook counts them and its list of curves names them.
func (b *browser) curvesDrawn(t *testing.T, want []string) {
	t.Helper()
	if n := b.studyAttr(t, "[data-view=curve]", "data-curves"); n != strconv.Itoa(len(want)) {
		t.Errorf("the figure holds %s curves, want %d", n, len(want))
	}
	var names []string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(`Array.from(document.querySelectorAll("#curve-series li")).map(e=>e.textContent)`, &names)); err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(names, want) {
		t.Errorf("the curves listed are %q, want %q", names, want)
	}
}
