package browsertest

import (
	"context"
	"fmt"
	"math"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
	"hdrisk/ui"
)

// These tests hold the page to one state: what the views show is what they compute, what a
// link carries is what the sender saw, and results say when they belong to an earlier
// scenario. Each was written against a defect of the page before it kept one copy of its
// state (issue 10).

// psChoose picks value in the menu sel as a person would (the change event fires).
func (b *browser) psChoose(t *testing.T, sel, value string) {
	t.Helper()
	var ok bool
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(fmt.Sprintf(
		`(e=>{if(!e)return false;e.value=%q;e.dispatchEvent(new Event("change",{bubbles:true}));return e.value===%q})(document.querySelector(%q))`,
		value, value, sel), &ok)); err != nil || !ok {
		t.Fatalf("choosing %q in %s: %v (found and chosen: %v)", value, sel, err, ok)
	}
}

// psSelected is the value and the shown text of the option a menu shows as chosen.
func (b *browser) psSelected(t *testing.T, sel string) (value, text string) {
	t.Helper()
	var out []string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(fmt.Sprintf(
		`(e=>e&&e.selectedIndex>=0?[e.value,e.options[e.selectedIndex].textContent]:["",""])(document.querySelector(%q))`, sel), &out)); err != nil || len(out) != 2 {
		t.Fatalf("reading the menu %s: %v", sel, err)
	}
	return out[0], out[1]
}

// psTab selects a view and waits until its panel is built.
func (b *browser) psTab(t *testing.T, name string) {
	t.Helper()
	b.studyClick(t, "#tab-"+name)
	b.shareWait(t, "the "+name+" view", fmt.Sprintf(`document.querySelector('#tab-%s').getAttribute("aria-selected")==="true" && document.querySelector('#panel-%s [data-run]') !== null`, name, name))
}

// psLink waits until the link box holds a scenario for which ok holds (the page publishes
// an edit once the typing pauses) and returns it with the link. Special cases are: a link
// that never satisfies ok fails the test with the last one seen.
func (b *browser) psLink(t *testing.T, what string, ok func(scenario.Scenario) bool) (scenario.Scenario, string) {
	t.Helper()
	var last scenario.Scenario
	var lastErr error
	var link string
	err := chromedp.Run(b.ctx, chromedp.Poll(`(e=>e&&e.value!==""?e.value:null)(document.getElementById("share-link"))`, &link,
		chromedp.WithPollingInterval(20*time.Millisecond), chromedp.WithPollingTimeout(10*time.Second)))
	for err == nil {
		last, lastErr = scenario.DecodeLink(link[strings.Index(link, "#")+1:])
		if lastErr == nil && ok(last) {
			return last, link
		}
		prev := link
		err = chromedp.Run(b.ctx, chromedp.Poll(fmt.Sprintf(`(e=>e&&e.value!==%q?e.value:null)(document.getElementById("share-link"))`, prev), &link,
			chromedp.WithPollingInterval(20*time.Millisecond), chromedp.WithPollingTimeout(10*time.Second)))
	}
	t.Fatalf("the link never held %s: last %+v (%v)", what, last, lastErr)
	return last, link
}

// A link whose scenario carries a study opens every view as the study states, even in a
// browser whose autosave holds other settings, and the page republishes the same study.
func TestLinkWithStudyOpensEveryView(t *testing.T) {
	b, _ := open(t)
	b.shareSettle(t)
	// A browser that used the page before: it ran a plan, whose settings are autosaved.
	b.cdWorkers(t)
	b.psTab(t, "plan")
	b.typeInto(t, "#plan-target", "-10")
	b.typeInto(t, "#plan-alpha-max", "7")
	b.studyClick(t, "#plan-run")
	b.studyWait(t, "[data-view=plan]", "data-run", 60*time.Second, "done", "error")
	b.shareWait(t, "the plan settings autosaved", `(localStorage.getItem("hdrisk.autosave")||"").includes('"target_db":-10')`)

	s := shareExample(t, "sparse-survey.json")
	s.Study = &scenario.Study{View: "plan",
		Sweep: &scenario.Sweep{Over: "l1", From: 0.00143, To: 0.143, Points: 77, Log: true},
		Map:   &scenario.Map{X: "l1", XFrom: 0.002, XTo: 0.2, XPoints: 33, XLog: true, Y: "alpha", YFrom: 0.2, YTo: 1.2, YPoints: 21},
		Plan:  &scenario.Plan{TargetDB: -23, AlphaMax: 3}}
	if state := b.shareGoTo(t, b.pageURL+"#"+shareCode(t, s)); state != "ready" {
		t.Fatalf("data-state=%s: %s", state, b.text(t, ".problem"))
	}
	if sel := b.attrOf(t, "#tab-plan", "aria-selected"); sel != "true" {
		t.Errorf("the link names the plan view; its tab is selected: %s", sel)
	}
	b.psTab(t, "plan")
	if got, alpha := b.studyValue(t, "#plan-target"), b.studyValue(t, "#plan-alpha-max"); got != "-23" || alpha != "3" {
		t.Errorf("plan view: target %s, largest m/n %s; the link says -23 and 3", got, alpha)
	}
	b.psTab(t, "curve")
	for sel, want := range map[string]string{"#curve-over": "l1", "#curve-from": "0.00143", "#curve-to": "0.143", "#curve-points": "77", "#curve-log": "true"} {
		if got := b.studyValue(t, sel); got != want {
			t.Errorf("curve view: %s = %q, the link says %q", sel, got, want)
		}
	}
	b.psTab(t, "map")
	for sel, want := range map[string]string{"#map-x-over": "l1", "#map-x-from": "0.002", "#map-x-to": "0.2", "#map-x-points": "33",
		"#map-y-over": "alpha", "#map-y-from": "0.2", "#map-y-to": "1.2", "#map-y-points": "21"} {
		if got := b.studyValue(t, sel); got != want {
			t.Errorf("map view: %s = %q, the link says %q", sel, got, want)
		}
	}
	// The page republishes what it opened: the link box holds the same study.
	b.psTab(t, "plan") // the view the link names, so that study.view is the same too
	b.shareShow(t)
	back, _ := b.psLink(t, "the plan view", func(s scenario.Scenario) bool { return s.Study != nil && s.Study.View == "plan" })
	if back.Study == nil || back.Study.Sweep == nil || !reflect.DeepEqual(*back.Study.Sweep, *s.Study.Sweep) || back.Study.Map == nil ||
		*back.Study.Map != *s.Study.Map || back.Study.Plan == nil || *back.Study.Plan != *s.Study.Plan || back.Study.View != "plan" {
		t.Errorf("the republished study differs from the link's:\n got %+v\nwant %+v", back.Study, s.Study)
	}
}

// Kept curves over one number are never redrawn on the axis of another: the new sweep is
// refused with a message and the kept curve stays as it was.
func TestKeptCurvesOnAnotherAxisRefused(t *testing.T) {
	b, _ := open(t)
	b.shareSettle(t)
	b.cdWorkers(t)
	b.psTab(t, "curve")
	b.psChoose(t, "#curve-over", "alpha")
	b.typeInto(t, "#curve-points", "20")
	b.studyClick(t, "#curve-run")
	b.studyWait(t, "[data-view=curve]", "data-run", 30*time.Second, "done")
	b.studyClick(t, "#curve-keep")
	b.psKeptTravel(t)
	b.psTab(t, "curve")
	b.psChoose(t, "#curve-over", "l1")
	b.studyClick(t, "#curve-run")
	msg := b.text(t, "[data-view=curve] .problem")
	if !strings.Contains(msg, "kept curves vary") || !strings.Contains(msg, "clear them") {
		t.Errorf("a sweep over l1 beside kept curves over m/n should be refused with a message, got %q (run %s)", msg, b.studyAttr(t, "[data-view=curve]", "data-run"))
	}
	// Cleared, the sweep over l1 is drawn.
	b.studyClick(t, "#curve-clear")
	b.studyClick(t, "#curve-run")
	if got := b.studyWait(t, "[data-view=curve]", "data-run", 30*time.Second, "done", "error"); got != "done" {
		t.Errorf("after clearing, the sweep over l1 ended in %s: %s", got, b.text(t, "[data-view=curve] .problem"))
	}
}

// psKeptTravel checks that the curve just kept travels in the link, as its settings, and
// that the link brings it back, swept again and drawn, in a browser that never saw it.
func (b *browser) psKeptTravel(t *testing.T) {
	t.Helper()
	b.shareShow(t)
	sent, _ := b.psLink(t, "the kept curve", func(s scenario.Scenario) bool { return s.Study != nil && len(s.Study.Kept) == 1 })
	k := sent.Study.Kept[0]
	if k.Sweep.Over != "alpha" || k.Sweep.Points != 20 || k.Label == "" {
		t.Errorf("the link carries the kept curve as %+v; it was kept over alpha with 20 points", k.Sweep)
	}
	fresh, _ := open(t)
	if state := fresh.shareGoTo(t, fresh.pageURL+"#"+shareCode(t, sent)); state != "ready" {
		t.Fatalf("data-state=%s: %s", state, fresh.text(t, ".problem"))
	}
	fresh.cdWorkers(t)
	fresh.psTab(t, "curve")
	if got := fresh.studyWait(t, "[data-view=curve]", "data-run", 30*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the kept curve of the link ended in %s: %s", got, fresh.text(t, "[data-view=curve] .problem"))
	}
	if got := fresh.text(t, "#curve-series"); !strings.Contains(got, k.Label) {
		t.Errorf("the curves a fresh browser draws after opening the link (%q) miss its kept curve %q", got, k.Label)
	}
	fresh.shareShow(t)
	back, _ := fresh.psLink(t, "the kept curve republished", func(s scenario.Scenario) bool { return s.Study != nil && len(s.Study.Kept) == 1 })
	if got := back.Study.Kept[0]; !reflect.DeepEqual(got.Sweep, k.Sweep) || got.Label != k.Label {
		t.Errorf("the fresh browser republishes the kept curve as %+v, the link had %+v", got, k)
	}
}

// A menu shows the choice in force. Switching the penalty to ridge replaces the curve's and
// the map's l1 and the planner's tuned l1 by l2, visibly, with a note; the menus show l2 and
// the views run over l2.
func TestMenusShowTheChoiceInForce(t *testing.T) {
	b, _ := open(t)
	b.shareSettle(t)
	b.cdWorkers(t)
	b.psTab(t, "plan")
	ws := b.psOptions(t, "#plan-over")
	if v, _ := b.psSelected(t, "#plan-over"); v != "l1" || strings.Contains(strings.Join(ws, "|"), "main weight") {
		t.Errorf("the LASSO's Tune menu shows %q among %q; it should show l1, the weight tuned, and no vague choice", v, ws)
	}
	b.psTab(t, "map")
	b.psChoose(t, "#map-x-over", "l1")
	b.psChoose(t, "#pick-penalty", "ridge")
	b.settle(t)
	b.shareWait(t, "the note on the replaced settings", `(document.getElementById("setting-notes")||{textContent:""}).textContent.includes("it now varies l2")`)
	notes := b.text(t, "#setting-notes")
	if !strings.Contains(notes, "map's x axis varied l1") || !strings.Contains(notes, "tuned l1") {
		t.Errorf("the notes should name each replaced setting: %q", notes)
	}
	if v, text := b.psSelected(t, "#map-x-over"); v != "l2" || !strings.Contains(text, "l2") {
		t.Errorf("after ridge, the map's x menu shows %q (%q); the map holds l2", v, text)
	}
	b.typeInto(t, "#map-x-points", "6")
	b.typeInto(t, "#map-y-points", "5")
	b.studyClick(t, "#map-run")
	if got := b.studyWait(t, "[data-view=map]", "data-run", 30*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the map over l2 ended in %s: %s", got, b.text(t, "[data-view=map] .problem"))
	}
	if ans := b.text(t, `[data-figure="map_lowest"]`); !strings.Contains(ans, "l2 = ") {
		t.Errorf("the map ran over something else than its menu shows: %q", ans)
	}
	b.psTab(t, "curve")
	if v, _ := b.psSelected(t, "#curve-over"); v != "l2" {
		t.Errorf("after ridge, the curve's Vary menu shows %q", v)
	}
	b.typeInto(t, "#curve-points", "20")
	b.studyClick(t, "#curve-run")
	if got := b.studyWait(t, "[data-view=curve]", "data-run", 30*time.Second, "done", "error"); got != "done" {
		t.Errorf("Draw the curve after switching to ridge ended in %s: %s", got, b.text(t, "[data-view=curve] .problem"))
	}
	b.psTab(t, "plan")
	if v, _ := b.psSelected(t, "#plan-over"); v != "l2" {
		t.Errorf("after ridge, the Tune menu shows %q", v)
	}
}

// psOptions lists the shown texts of a menu's options.
func (b *browser) psOptions(t *testing.T, sel string) []string {
	t.Helper()
	var out []string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(fmt.Sprintf(`Array.from(document.querySelectorAll(%q)).map(o=>o.textContent)`, sel+" option"), &out)); err != nil {
		t.Fatal(err)
	}
	return out
}

// The map's lowest-point line reports the lowest of the quantity the colours show, at the
// cell where the engine's own map has it.
func TestMapLowestOfTheQuantityShown(t *testing.T) {
	b, _ := open(t)
	b.shareSettle(t)
	b.cdWorkers(t)
	b.psTab(t, "map")
	b.psChoose(t, "#map-x-over", "noise")
	b.typeInto(t, "#map-x-from", "0.0001")
	b.typeInto(t, "#map-x-to", "0.1")
	b.typeInto(t, "#map-x-points", "6")
	b.psChoose(t, "#map-y-over", "density")
	b.typeInto(t, "#map-y-from", "0.01")
	b.typeInto(t, "#map-y-to", "0.5")
	b.typeInto(t, "#map-y-points", "5")
	b.psChoose(t, "#map-quantity", "nmse_db")
	b.studyClick(t, "#map-run")
	if got := b.studyWait(t, "[data-view=map]", "data-run", 30*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the map ended in %s: %s", got, b.text(t, "[data-view=map] .problem"))
	}
	s := shareModelScenario(t)
	xlog := b.studyValue(t, "#map-x-log") == "true"
	ylog := b.studyValue(t, "#map-y-log") == "true"
	g, err := study.Map(context.Background(), s, study.MapSpec{X: study.Axis{Over: "noise", From: 0.0001, To: 0.1, Points: 6, Log: xlog},
		Y: study.Axis{Over: "density", From: 0.01, To: 0.5, Points: 5, Log: ylog}}, 1, nil)
	if err != nil {
		t.Fatal(err)
	}
	lo, loMSE := math.Inf(1), math.Inf(1)
	for _, p := range g.Cells {
		if p.OK() {
			lo, loMSE = math.Min(lo, p.Result.NMSEdB), math.Min(loMSE, p.Result.MSE)
		}
	}
	got, err := strconv.ParseFloat(b.attrOf(t, `[data-figure="map_lowest"]`, "data-value"), 64)
	if err != nil || studyRel(got, lo) > 1e-9 {
		t.Errorf("lowest on the map: page %v, the engine's lowest NMSE %v dB (its lowest MSE %v): %v", got, lo, loMSE, err)
	}
	t.Logf("lowest NMSE on the map: %v dB; %s", got, b.text(t, `[data-figure="map_lowest"]`))
}

// shareModelScenario is the page's starting scenario.
func shareModelScenario(t *testing.T) scenario.Scenario {
	t.Helper()
	ch := ui.NewModel().Check()
	if ch.Err != nil {
		t.Fatal(ch.Err)
	}
	s := ch.Scenario
	s.Study = nil
	return s
}

// A curve drawn for one scenario is marked once the scenario changes, and one click draws it
// again for the scenario now open.
func TestStaleResultMarked(t *testing.T) {
	b, _ := open(t)
	b.shareSettle(t)
	b.cdWorkers(t)
	b.psTab(t, "curve")
	b.typeInto(t, "#curve-points", "20")
	b.studyClick(t, "#curve-run")
	b.studyWait(t, "[data-view=curve]", "data-run", 30*time.Second, "done")
	b.studyWait(t, "#curve-figure", "data-stale", 10*time.Second, "false")
	if b.text(t, "#curve-stale") != "" {
		t.Errorf("a fresh curve is marked stale")
	}
	b.typeInto(t, "#in-design-alpha", "0.7")
	b.settle(t)
	b.studyWait(t, "#curve-figure", "data-stale", 10*time.Second, "true")
	if msg := b.text(t, "#curve-stale"); !strings.Contains(msg, "another scenario") {
		t.Errorf("the stale curve's mark says %q", msg)
	}
	b.studyClick(t, "#curve-recompute")
	b.studyWait(t, "[data-view=curve]", "data-run", 30*time.Second, "done")
	b.studyWait(t, "#curve-figure", "data-stale", 10*time.Second, "false")
}

// The title and the notes are edited on the page, checked against the file's limits, shown
// as text and carried by the link.
func TestTitleAndNotesEditedAndCarried(t *testing.T) {
	b, _ := open(t)
	b.shareSettle(t)
	title := `Survey <b>7</b> & "friends"`
	notes := "Line one <script>window.pwned=1</script>"
	b.typeInto(t, "#scenario-title", title)
	b.typeInto(t, "#scenario-notes", notes)
	b.settle(t)
	b.shareShow(t)
	if got := b.text(t, `[data-share="title"]`); got != title {
		t.Errorf("the share panel shows the title %q", got)
	}
	_, link := b.psLink(t, "the new title and notes", func(s scenario.Scenario) bool { return s.Title == title && s.Notes == notes })
	var made int
	b.shareEval(t, `document.querySelectorAll('[data-share] b, [data-share] script').length + (window.pwned ? 100 : 0)`, &made)
	if made != 0 {
		t.Errorf("the title or notes made elements or ran: %d", made)
	}
	// Opened elsewhere, the link shows them in the boxes.
	if state := b.shareGoTo(t, link); state != "ready" {
		t.Fatalf("data-state=%s", state)
	}
	if got := b.studyValue(t, "#scenario-title"); got != title {
		t.Errorf("the title box holds %q after the link", got)
	}
	if got := b.studyValue(t, "#scenario-notes"); got != notes {
		t.Errorf("the notes box holds %q after the link", got)
	}
	// Past the file's limit, the title is refused, naming it.
	long := strings.Repeat("t", scenario.MaxTitle+1)
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(fmt.Sprintf(`(e=>{e.value=%q;e.dispatchEvent(new Event("input",{bubbles:true}));return true})(document.getElementById("scenario-title"))`, long), nil)); err != nil {
		t.Fatal(err)
	}
	b.shareWait(t, "the title refused", `document.getElementById("err-scenario-title") !== null`)
	if msg := b.text(t, "#err-scenario-title"); !strings.Contains(msg, "title") {
		t.Errorf("the refusal of a long title says %q", msg)
	}
}

// An autosave the page cannot read is kept aside and offered for download, not overwritten.
func TestUnreadableAutosaveKeptAside(t *testing.T) {
	b, _ := open(t)
	b.shareSettle(t)
	const bad = `{"kind":"hdrisk.autosave","version":9,"scenario":{"kind":"hdrisk.scenario"}}`
	b.shareEval(t, fmt.Sprintf(`localStorage.setItem("hdrisk.autosave", %q), true`, bad), nil)
	if state := b.shareGoTo(t, b.pageURL); state != "ready" {
		t.Fatalf("data-state=%s", state)
	}
	b.shareShow(t)
	if msg := b.text(t, `[data-share="message"]`); !strings.Contains(msg, "another version") || !strings.Contains(msg, "kept aside") {
		t.Errorf("the message about the autosave says %q", msg)
	}
	b.shareWait(t, "the starting scenario autosaved", `(localStorage.getItem("hdrisk.autosave")||"").includes("hdrisk.scenario\",\"version\":1") || (localStorage.getItem("hdrisk.autosave")||"").includes('"version":1,"engine"')`)
	var kept string
	b.shareEval(t, `localStorage.getItem("hdrisk.autosave.unreadable")||""`, &kept)
	if kept != bad {
		t.Errorf("the unreadable autosave was not kept as it was: %q", kept)
	}
	dir := b.downloadsTo(t)
	name, data := b.studyDownload(t, dir, "#share-unreadable")
	if name != "hdrisk-unreadable-autosave.json" || string(data) != bad {
		t.Errorf("downloaded %s: %q", name, data)
	}
}

// Text pasted in the data tab survives a switch to another tab and back: the box shows it
// again, and reading it reads that text.
func TestPastedDataSurvivesATabSwitch(t *testing.T) {
	b, _ := open(t)
	b.shareSettle(t)
	b.cdWorkers(t)
	b.studyClick(t, "#tab-data")
	b.shareWait(t, "the data view", `document.getElementById("data-signal-text") !== null`)
	samples := "0 0 0 1.5 -2 0 0 0.5 0 0 3 0"
	if err := chromedp.Run(b.ctx, chromedp.SetValue("#data-signal-text", samples, chromedp.ByQuery)); err != nil {
		t.Fatal(err)
	}
	b.cdJS(t, `document.getElementById("data-signal-text").dispatchEvent(new Event("change",{bubbles:true}));true`)
	b.psTab(t, "curve")
	b.studyClick(t, "#tab-data")
	b.shareWait(t, "the pasted samples back in their box", fmt.Sprintf(`(e=>e!==null&&e.value===%q)(document.getElementById("data-signal-text"))`, samples))
	b.studyClick(t, "#data-signal-read")
	if got := b.studyWait(t, `[data-part=signal]`, "data-run", 30*time.Second, "done", "error"); got != "done" {
		t.Errorf("reading the samples pasted before the tab switch ended in %s: %s", got, b.text(t, "[data-part=signal] .problem"))
	}
}
