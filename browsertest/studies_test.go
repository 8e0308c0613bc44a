package browsertest

import (
	"context"
	"encoding/csv"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	cdpbrowser "github.com/chromedp/cdproto/browser"
	"github.com/chromedp/cdproto/input"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"

	"hdrisk/engine/study"
	"hdrisk/ui"
)

// studyWait polls until the element sel has attribute attr equal to one of want, and returns
// the value reached.
func (b *browser) studyWait(t *testing.T, sel, attr string, timeout time.Duration, want ...string) string {
	t.Helper()
	var got string
	js := fmt.Sprintf(`(function(){const e=document.querySelector(%q);const v=e&&e.getAttribute(%q);return %s.includes(v)?v:null})()`,
		sel, attr, studyList(want))
	if len(want) == 0 {
		// No values named: wait for a time to be set (anything but "0").
		js = fmt.Sprintf(`(function(){const e=document.querySelector(%q);const v=e&&e.getAttribute(%q);return v&&v!=="0"?v:null})()`, sel, attr)
	}
	if err := chromedp.Run(b.ctx, chromedp.Poll(js, &got, chromedp.WithPollingInterval(5*time.Millisecond), chromedp.WithPollingTimeout(timeout))); err != nil {
		var now string
		_ = chromedp.Run(b.ctx, chromedp.Evaluate(fmt.Sprintf(`(e=>e?e.getAttribute(%q):"no element")(document.querySelector(%q))`, attr, sel), &now))
		t.Fatalf("%s[%s] never became %v (it is %q): %v; problem: %s", sel, attr, want, now, err, b.text(t, ".problem"))
	}
	return got
}

func (b *browser) studyAttr(t *testing.T, sel, attr string) string {
	t.Helper()
	var v string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(fmt.Sprintf(`(e=>e?e.getAttribute(%q)||"":"")(document.querySelector(%q))`, attr, sel), &v)); err != nil {
		t.Fatal(err)
	}
	return v
}

func studyList(s []string) string {
	q := make([]string, len(s))
	for i, v := range s {
		q[i] = strconv.Quote(v)
	}
	return "[" + strings.Join(q, ",") + "]"
}

// studyClick clicks an enabled element through the DOM (the layout may keep a tab under a
// sticky bar, where a synthetic mouse click lands on something else).
func (b *browser) studyClick(t *testing.T, sel string) {
	t.Helper()
	var ok bool
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(fmt.Sprintf(`(e=>{if(!e||e.disabled)return false;e.click();return true})(document.querySelector(%q))`, sel), &ok)); err != nil || !ok {
		t.Fatalf("clicking %s: %v (found and enabled: %v)", sel, err, ok)
	}
}

func (b *browser) studyValue(t *testing.T, sel string) string {
	t.Helper()
	var v string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(fmt.Sprintf(`(e=>e?String(e.type==="checkbox"?e.checked:e.value):"")(document.querySelector(%q))`, sel), &v)); err != nil {
		t.Fatal(err)
	}
	return v
}

// studyLatency measures how long the page's main thread takes to run a timer and answer: a
// frozen page (work on the main thread) takes as long as the work.
func (b *browser) studyLatency(t *testing.T) time.Duration {
	t.Helper()
	var ms float64
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(`new Promise(r=>{const t0=performance.now();setTimeout(()=>r(performance.now()-t0),0)})`, &ms,
		func(p *runtime.EvaluateParams) *runtime.EvaluateParams { return p.WithAwaitPromise(true) })); err != nil {
		t.Fatal(err)
	}
	return time.Duration(ms * float64(time.Millisecond))
}

// studyDownload clicks sel and returns the suggested name and the bytes of the file the
// browser then downloads into dir (Browser.setDownloadBehavior with events).
func (b *browser) studyDownload(t *testing.T, dir, sel string) (string, []byte) {
	t.Helper()
	type done struct{ guid, name string }
	begun := make(chan done, 4)
	finished := make(chan string, 4)
	ctx, cancel := context.WithCancel(b.ctx)
	defer cancel()
	chromedp.ListenTarget(ctx, func(ev any) {
		switch e := ev.(type) {
		case *cdpbrowser.EventDownloadWillBegin:
			begun <- done{e.GUID, e.SuggestedFilename}
		case *cdpbrowser.EventDownloadProgress:
			if e.State == cdpbrowser.DownloadProgressStateCompleted {
				finished <- e.GUID
			}
		}
	})
	b.studyClick(t, sel)
	var d done
	select {
	case d = <-begun:
	case <-time.After(10 * time.Second):
		t.Fatalf("clicking %s started no download; problem: %s", sel, b.text(t, ".problem"))
	}
	select {
	case g := <-finished:
		if g != d.guid {
			t.Fatalf("another download (%s) finished instead of %s", g, d.name)
		}
	case <-time.After(10 * time.Second):
		t.Fatalf("the download of %s never finished", d.name)
	}
	data, err := os.ReadFile(filepath.Join(dir, d.guid))
	if err != nil {
		t.Fatal(err)
	}
	return d.name, data
}

// studyWarm runs two eval jobs per worker to the end, so that timings measure the work and
// not the workers' start (each compiles the page's module when the page opens).
func (b *browser) studyWarm(t *testing.T, size int) time.Duration {
	t.Helper()
	args, err := ui.NewModel().JSON()
	if err != nil {
		t.Fatal(err)
	}
	t0 := time.Now()
	script := fmt.Sprintf(`(async function(){
		const args = JSON.stringify({scenario: %s});
		const one = () => new Promise((resolve) => hdriskJobs.start("eval", args, null, (e) => resolve(e || "")));
		return (await Promise.all(Array.from({length: %d}, one))).join("");
	})()`, args, 2*size)
	var out string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(script, &out, func(p *runtime.EvaluateParams) *runtime.EvaluateParams {
		return p.WithAwaitPromise(true)
	})); err != nil || out != "" {
		t.Fatalf("warming the workers: %v %s", err, out)
	}
	return time.Since(t0)
}

func studyRel(a, b float64) float64 {
	if a == b {
		return 0
	}
	return math.Abs(a-b) / math.Max(math.Abs(a), math.Abs(b))
}

// TestStudiesInPage runs the curve, the map (cancelled midway, then to the end) and the
// planner in the page, checks their numbers against the native engine, saves a curve's data
// through a real download, and logs the budgets of architecture.md: a 200-point sweep within
// 0.25 s and a 100 x 100 map within 3 s, both with the page studyLatency.
func TestStudiesInPage(t *testing.T) {
	b, _ := open(t)
	if state := b.settle(t); state != "ready" {
		t.Fatalf("data-state=%s: %s", state, b.text(t, ".problem"))
	}
	var size int
	if err := chromedp.Run(b.ctx, chromedp.Poll(`typeof hdriskJobs === "object" && hdriskJobs.size()`, &size,
		chromedp.WithPollingTimeout(30*time.Second))); err != nil {
		t.Fatalf("the worker pool never appeared: %v", err)
	}
	downloads := b.downloadsTo(t)
	t.Logf("workers ready for work %v after the pool appeared", b.studyWarm(t, size).Round(time.Millisecond))
	ch := ui.NewModel().Check()
	if ch.Err != nil {
		t.Fatal(ch.Err)
	}
	s := ch.Scenario

	// The curve: the proposed 200-point sweep of the penalty weight.
	b.studyClick(t, "#tab-curve")
	b.studyWait(t, "[data-view=curve]", "data-run", 5*time.Second, "idle")
	over, from, to, points, logs := b.studyValue(t, "#curve-over"), b.studyValue(t, "#curve-from"), b.studyValue(t, "#curve-to"), b.studyValue(t, "#curve-points"), b.studyValue(t, "#curve-log")
	if points != "200" {
		t.Fatalf("the curve should propose 200 points, not %s", points)
	}
	// The menu names the varied number as the editor does, its explanation on hover.
	var vary []string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(`(o=>o?[o.textContent,o.title]:[])(document.querySelector("#curve-over option[value=l1]"))`, &vary)); err != nil || len(vary) != 2 ||
		vary[0] != "L1 weight (l1)" || !strings.Contains(vary[1], "absolute-value") {
		t.Errorf("the Vary menu shows l1 as %q: %v", vary, err)
	}
	// The bare job, timed in the page: what the sweep itself costs on a worker.
	var bare float64
	sweepArgs := fmt.Sprintf(`{"scenario":%s,"axis":{"Over":%q,"From":%s,"To":%s,"Points":200,"Log":%s}}`, ch.JSON, over, from, to, logs)
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(fmt.Sprintf(`new Promise((resolve)=>{const t0=performance.now();
		hdriskJobs.start("sweep", %q, null, (e)=>resolve(e ? -1 : performance.now()-t0))})`, sweepArgs), &bare,
		func(p *runtime.EvaluateParams) *runtime.EvaluateParams { return p.WithAwaitPromise(true) })); err != nil || bare < 0 {
		t.Fatalf("a bare sweep job failed: %v", err)
	}
	t.Logf("a bare 200-point sweep job: %.0f ms from start to result in the page", bare)
	t0 := time.Now()
	b.studyClick(t, "#curve-run")
	if got := b.studyWait(t, "[data-view=curve]", "data-run", 20*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the sweep ended in %s: %s", got, b.text(t, "[data-view=curve] .problem"))
	}
	wall := time.Since(t0)
	secs := b.figures(t)["curve_seconds"]
	b.studyWait(t, "[data-view=curve]", "data-figure-seconds", 10*time.Second)
	t.Logf("budget: 200-point sweep of %s in the page: %s s from the click to the numbers, %s s to the figure (budget 0.25 s; %v seen by the test, polling included; %d workers)",
		over, secs, b.studyAttr(t, "[data-view=curve]", "data-figure-seconds"), wall.Round(time.Millisecond), size)
	if v, err := strconv.ParseFloat(secs, 64); err != nil || v <= 0 {
		t.Errorf("curve_seconds = %q", secs)
	}
	lo, _ := strconv.ParseFloat(from, 64)
	hi, _ := strconv.ParseFloat(to, 64)
	want, err := study.Sweep(context.Background(), s, study.SweepSpec{Axis: study.Axis{Over: over, From: lo, To: hi, Points: 200, Log: logs == "true"}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	wb, err := study.Best(context.Background(), s, study.BestSpec{Over: over})
	if err != nil {
		t.Fatal(err)
	}
	figs := b.figures(t)
	if d := studyRel(number(t, figs, "curve_best_value"), wb.Value); d > 1e-9 {
		t.Errorf("best %s: page %s, engine %v (relative gap %.2g)", over, figs["curve_best_value"], wb.Value, d)
	}
	b.screenshot(t, "studies-curve.png")

	// The readout: the pointer over the middle of the figure reads the values there.
	var box []float64
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(`(e=>{e.scrollIntoView();const r=e.getBoundingClientRect();return [r.left,r.top,r.width,r.height]})(document.querySelector("#curve-figure ~ .figure-overlay"))`, &box)); err != nil || len(box) != 4 {
		t.Fatalf("the figure's overlay: %v %v", err, box)
	}
	before := b.text(t, "#curve-readout")
	if err := chromedp.Run(b.ctx, chromedp.MouseEvent(input.MouseMoved, box[0]+box[2]/2, box[1]+box[3]/2)); err != nil {
		t.Fatal(err)
	}
	var readout string
	if err := chromedp.Run(b.ctx, chromedp.Poll(fmt.Sprintf(`(e=>e&&e.textContent!==%q&&e.textContent.includes(%q)?e.textContent:null)(document.getElementById("curve-readout"))`, before, over+" = "),
		&readout, chromedp.WithPollingTimeout(5*time.Second))); err != nil {
		t.Errorf("no readout under the pointer: %v (%q)", err, b.text(t, "#curve-readout"))
	}
	t.Logf("readout at the middle of the curve: %s", readout)

	// Save the curve's data through the browser's own download and compare points.
	name, data := b.studyDownload(t, downloads, "#curve-csv")
	if name != "hdrisk-curve.csv" {
		t.Errorf("the download is called %q", name)
	}
	rows, err := csv.NewReader(strings.NewReader(string(data))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 201 || rows[0][1] != over || rows[0][2] != "mse" {
		t.Fatalf("downloaded CSV: %d rows, header %q", len(rows), rows[0])
	}
	for _, k := range []int{0, 57, 123, 199} {
		x, _ := strconv.ParseFloat(rows[k+1][1], 64)
		if !want[k].OK() {
			if rows[k+1][2] != "" {
				t.Errorf("point %d has no converged value natively but the page wrote %q", k, rows[k+1][2])
			}
			continue
		}
		mse, err := strconv.ParseFloat(rows[k+1][2], 64)
		if err != nil || studyRel(x, want[k].X) > 1e-12 || studyRel(mse, want[k].Result.MSE) > 1e-9 {
			t.Errorf("point %d: page (%s, %s), engine (%v, %v)", k, rows[k+1][1], rows[k+1][2], want[k].X, want[k].Result.MSE)
		}
	}

	// The map: start a 100 x 100 map, cancel it midway, check the page answers at once, then
	// run it to the end.
	b.studyClick(t, "#tab-map")
	b.studyWait(t, "[data-view=map]", "data-run", 5*time.Second, "idle")
	if x, y := b.studyValue(t, "#map-x-points"), b.studyValue(t, "#map-y-points"); x != "100" || y != "100" {
		t.Fatalf("the map should propose 100 x 100, not %s x %s", x, y)
	}
	// A larger map for the cancel, so that it is surely still running.
	b.typeInto(t, "#map-x-points", "400")
	b.studyClick(t, "#map-run")
	b.studyWait(t, "[data-view=map]", "data-run", 5*time.Second, "running")
	// Cancel once some rows are in and others are not: a wait on the count of rows done.
	var done int
	if err := chromedp.Run(b.ctx, chromedp.Poll(`(e=>{const d=+e.getAttribute("data-done"),n=+e.getAttribute("data-total");return d>0&&d<n?d:null})(document.querySelector("[data-view=map]"))`,
		&done, chromedp.WithPollingInterval(2*time.Millisecond), chromedp.WithPollingTimeout(60*time.Second))); err != nil {
		t.Fatalf("the 400 x 100 map never stood part-way: %v", err)
	}
	b.studyClick(t, "#map-cancel")
	b.studyWait(t, "[data-view=map]", "data-run", 2*time.Second, "cancelled")
	stopped := b.studyAttr(t, "[data-view=map]", "data-done")
	if d, _ := strconv.Atoi(stopped); d < done || d >= 100 {
		t.Errorf("cancelled with %s of 100 rows done (%d seen before the click): not part-way", stopped, done)
	}
	if st := b.text(t, "[data-view=map] [role=status]"); !strings.Contains(st, "Cancelled after "+stopped+" of 100 rows") {
		t.Errorf("the status after the cancel says %q, with %s rows done", st, stopped)
	}
	// What remains: the workers take new work at once (the cancelled ones were replaced),
	// and no row of the cancelled map arrives after it.
	var after float64
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(fmt.Sprintf(`new Promise((resolve)=>{const t0=performance.now();
		hdriskJobs.start("eval", %q, null, (e)=>resolve(e ? -1 : performance.now()-t0))})`, fmt.Sprintf(`{"scenario":%s}`, ch.JSON)), &after,
		func(p *runtime.EvaluateParams) *runtime.EvaluateParams { return p.WithAwaitPromise(true) })); err != nil || after < 0 {
		t.Fatalf("a job after the cancel failed: %v", err)
	}
	if now := b.studyAttr(t, "[data-view=map]", "data-done"); now != stopped || b.studyAttr(t, "[data-view=map]", "data-run") != "cancelled" {
		t.Errorf("after the cancel the map went on: %s rows (had %s), run %s", now, stopped, b.studyAttr(t, "[data-view=map]", "data-run"))
	}
	t.Logf("map cancelled after %s of 100 rows; a job right after the cancel took %.0f ms", stopped, after)
	b.screenshot(t, "studies-map-cancelled.png")
	b.studyClick(t, "#tab-curve")
	b.studyWait(t, "#tab-curve", "aria-selected", 3*time.Second, "true")
	b.studyClick(t, "#tab-map")
	b.studyWait(t, "#tab-map", "aria-selected", time.Second, "true")

	// The 100 x 100 map to the end. The main thread's stalls are recorded by the browser
	// itself (long tasks, 50 ms and more) while it runs, and logged beside the budget.
	b.typeInto(t, "#map-x-points", "100")
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(`(()=>{window.hdriskLong=[];if(window.hdriskLongObs)window.hdriskLongObs.disconnect();
		window.hdriskLongObs=new PerformanceObserver(l=>{for(const e of l.getEntries())window.hdriskLong.push(e.duration)});
		window.hdriskLongObs.observe({type:"longtask"});return true})()`, nil)); err != nil {
		t.Fatal(err)
	}
	b.studyClick(t, "#map-run")
	if got := b.studyWait(t, "[data-view=map]", "data-run", 60*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the map ended in %s: %s", got, b.text(t, "[data-view=map] .problem"))
	}
	figs = b.figures(t)
	b.studyWait(t, "[data-view=map]", "data-figure-seconds", 10*time.Second)
	var long []float64
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(`(()=>{window.hdriskLongObs.disconnect();return window.hdriskLong})()`, &long)); err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for _, l := range long {
		worst = math.Max(worst, l)
	}
	t.Logf("budget: 100 x 100 map in the page: %s s to the numbers, %s s to the drawn map, over %d workers (budget 3 s); "+
		"longest main-thread stall %.0f ms (goal under 100 ms), %d long tasks: %v",
		figs["map_seconds"], b.studyAttr(t, "[data-view=map]", "data-figure-seconds"), size, worst, len(long), long)
	if _, ok := figs["map_lowest"]; !ok {
		t.Error("the map states no lowest error")
	}
	b.screenshot(t, "studies-map.png")

	// The planner.
	b.studyClick(t, "#tab-plan")
	b.studyWait(t, "[data-view=plan]", "data-run", 5*time.Second, "idle")
	b.typeInto(t, "#plan-target", "-15")
	b.typeInto(t, "#plan-alpha-max", "3")
	b.studyClick(t, "#plan-run")
	if got := b.studyWait(t, "[data-view=plan]", "data-run", 60*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the planner ended in %s: %s", got, b.text(t, "[data-view=plan] .problem"))
	}
	wp, err := study.Plan(context.Background(), s, study.PlanSpec{Target: -15, AlphaMax: 3})
	if err != nil {
		t.Fatal(err)
	}
	figs = b.figures(t)
	if !wp.Reached {
		if figs["plan_alpha"] != "not reached" {
			t.Errorf("natively not reached (%s); the page says %s", wp.Reason, figs["plan_alpha"])
		}
	} else if d := studyRel(number(t, figs, "plan_alpha"), wp.Alpha); d > 1e-9 {
		t.Errorf("plan: page alpha %s, engine %v (relative gap %.2g)", figs["plan_alpha"], wp.Alpha, d)
	}
	t.Logf("planner: m/n %s for -15 dB (engine %v); answers for %d designs", figs["plan_alpha"], wp.Alpha, strings.Count(b.text(t, ".plan-table tbody th"), "\n")+1)
	b.screenshot(t, "studies-plan.png")
	b.checkNoNetwork(t)
}
