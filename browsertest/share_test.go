package browsertest

import (
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"hdrisk/engine/scenario"
	"hdrisk/ui"
)

// goTo opens url as a new document (a fragment-only change would not reload the page) and
// waits for the first figures.
func (b *browser) shareGoTo(t *testing.T, url string) string {
	t.Helper()
	if err := chromedp.Run(b.ctx, chromedp.Navigate("about:blank"), chromedp.Navigate(url)); err != nil {
		t.Fatalf("opening %s: %v", shareClip(url, 120), err)
	}
	return b.shareSettle(t)
}

// settleShare waits until the share panel is on the page and the figures are computed.
func (b *browser) shareSettle(t *testing.T) string {
	t.Helper()
	b.shareWait(t, "the share panel", `document.querySelector('[data-view="share"]') !== null`)
	return b.settle(t)
}

// waitFor polls a JavaScript expression until it is true.
func (b *browser) shareWait(t *testing.T, what, expr string) {
	t.Helper()
	var ok bool
	if err := chromedp.Run(b.ctx, chromedp.Poll(`(function(){return (`+expr+`)?true:null})()`, &ok,
		chromedp.WithPollingInterval(20*time.Millisecond), chromedp.WithPollingTimeout(20*time.Second))); err != nil {
		t.Fatalf("waiting for %s: %v\nmessage: %s", what, err, b.text(t, `[data-share="message"]`))
	}
}

func (b *browser) shareEval(t *testing.T, expr string, out any) {
	t.Helper()
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(expr, out)); err != nil {
		t.Fatalf("%s: %v", shareClip(expr, 120), err)
	}
}

func (b *browser) sharePress(t *testing.T, sel string) {
	t.Helper()
	if err := chromedp.Run(b.ctx, chromedp.Click(sel, chromedp.ByQuery)); err != nil {
		t.Fatalf("clicking %s: %v", sel, err)
	}
}

// paste puts text into the paste box as a paste would (value set, change fired) and opens it.
func (b *browser) sharePaste(t *testing.T, text string) {
	t.Helper()
	b.shareShow(t)
	b.shareEval(t, fmt.Sprintf(`(e=>{e.value=%q;e.dispatchEvent(new Event("input",{bubbles:true}));return true})(document.getElementById("share-paste"))`, text), nil)
	b.sharePress(t, "#share-open")
}

func (b *browser) shareShow(t *testing.T) {
	t.Helper()
	b.sharePress(t, "#tab-share")
	b.shareWait(t, "the share tab", `!document.getElementById("panel-share").hidden`)
}

func (b *browser) shareLink(t *testing.T) string {
	t.Helper()
	var v string
	b.shareEval(t, `document.getElementById("share-link").value`, &v)
	return v
}

// shareTitle is the title of the open scenario, as the share panel shows it (its tab is
// selected first: a view behind another tab builds none of its markup).
func (b *browser) shareTitle(t *testing.T) string {
	t.Helper()
	b.shareShow(t)
	return b.text(t, `[data-share="title"]`)
}

// shareTitleIs is a test in the page that the share panel shows the title want; it selects
// the share tab when another view is selected (opening a scenario selects the view it was
// studied in).
func shareTitleIs(want string) string {
	return fmt.Sprintf(`((t=>t.getAttribute("aria-selected")==="true"||t.click())(document.getElementById("tab-share")),(document.querySelector('[data-share="title"]')||{}).textContent === %q)`, want)
}

func shareClip(s string, n int) string {
	if len(s) <= n {
		return s
	}
	return s[:n] + "…"
}

func shareExample(t *testing.T, name string) scenario.Scenario {
	t.Helper()
	ex, err := ui.Examples()
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ex {
		if e.Name == name {
			return e.Scenario
		}
	}
	t.Fatalf("no example %s", name)
	return scenario.Scenario{}
}

func shareCode(t *testing.T, s scenario.Scenario) string {
	t.Helper()
	c, err := scenario.EncodeLink(s)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// TestShareHostileTitle opens a link whose title and notes hold markup and script: they must
// appear as text, create no element and run nothing.
func TestShareHostileTitle(t *testing.T) {
	b, _ := open(t)
	s := shareExample(t, "sparse-survey.json")
	s.Title = `Invented <img src=x onerror="window.pwned='img'"><script>window.pwned='title'</script>`
	s.Notes = "<script>window.pwned='notes'</script><b id=bold>bold?</b>\n<iframe src=\"javascript:window.top.pwned='frame'\"></iframe>"
	if state := b.shareGoTo(t, b.pageURL+"#"+shareCode(t, s)); state != "ready" {
		t.Fatalf("data-state=%s: %s", state, b.text(t, ".problem"))
	}
	b.shareShow(t)
	// Had an image been made, its load fails and its onerror runs before the frames after
	// the one that made it: wait for two of them, not for a time.
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(`new Promise(r=>requestAnimationFrame(()=>requestAnimationFrame(()=>setTimeout(()=>r(true)))))`, nil,
		func(p *runtime.EvaluateParams) *runtime.EvaluateParams { return p.WithAwaitPromise(true) })); err != nil {
		t.Fatal(err)
	}
	var res struct {
		Pwned             any
		Imgs, Scripts, Bs int
		Frames            int
		TitleText, Notes  string
		TitleInput        string
	}
	b.shareEval(t, `(()=>{const r=document.getElementById("hdrisk");return {
		pwned: window.pwned === undefined ? null : window.pwned,
		imgs: r.querySelectorAll('img[src="x"]').length, scripts: r.querySelectorAll("script").length,
		bs: r.querySelectorAll("#bold").length, frames: document.querySelectorAll("iframe").length,
		titleText: (document.querySelector('[data-share="title"]')||{}).textContent||"",
		notes: (document.querySelector('[data-share="notes"]')||{}).textContent||"",
		titleInput: Array.from(document.querySelectorAll("input")).map(e=>e.value).find(v=>v.includes("<img"))||""}})()`, &res)
	b.screenshot(t, "share-hostile-title.png")
	if res.Pwned != nil {
		t.Errorf("script from the link ran: window.pwned = %v", res.Pwned)
	}
	if res.Imgs+res.Scripts+res.Bs+res.Frames != 0 {
		t.Errorf("markup from the link became elements: %d img, %d script, %d b, %d iframe", res.Imgs, res.Scripts, res.Bs, res.Frames)
	}
	if res.TitleText != s.Title {
		t.Errorf("title shown as %q, want the text %q", res.TitleText, s.Title)
	}
	if res.Notes != s.Notes {
		t.Errorf("notes shown as %q, want the text %q", res.Notes, s.Notes)
	}
	t.Logf("title also in an input: %v", res.TitleInput == s.Title)
	b.checkNoNetwork(t)
}

// TestShareLinkTravels opens a link, changes a field, copies the link from the page, opens it
// in a fresh browser context (storage of its own: nothing shared but the link) and finds the same
// figures; then reopens the page without a link and finds the autosaved scenario.
func TestShareLinkTravels(t *testing.T) {
	b, _ := open(t)
	s := shareExample(t, "sparse-survey.json")
	if state := b.shareGoTo(t, b.pageURL+"#"+shareCode(t, s)); state != "ready" {
		t.Fatalf("data-state=%s: %s", state, b.text(t, ".problem"))
	}
	if got := b.shareTitle(t); got != s.Title {
		t.Fatalf("the link opened %q, want %q", got, s.Title)
	}
	b.typeThen(t, `[data-path="penalty.l1"]`, "0.08", kb.Enter)
	b.shareShow(t)
	b.shareWait(t, "the link to follow the edit", `document.getElementById("share-link").value.length > 0 && location.hash.length > 4`)
	if state := b.settle(t); state != "ready" {
		t.Fatalf("after the edit: data-state=%s: %s", state, b.text(t, ".problem"))
	}
	figs := b.figures(t)
	b.sharePress(t, "#share-copy")
	b.shareWait(t, "the copy to finish", `(t=>t&&t!=="Copying…")(document.querySelector('[data-share="copied"]').textContent)`)
	t.Logf("copy: %s", b.text(t, `[data-share="copied"]`))
	b.screenshot(t, "share-panel.png")
	link := b.shareLink(t)
	var here string
	b.shareEval(t, `location.href`, &here)
	if link != here {
		t.Errorf("the link box %q is not the page's address %q", shareClip(link, 80), shareClip(here, 80))
	}
	got, err := scenario.DecodeLink(link)
	if err != nil || got.Penalty.Params["l1"] != 0.08 {
		t.Fatalf("the copied link does not hold the edit: %v %v", err, got.Penalty.Params)
	}
	t.Logf("link after the edit: %d characters", len(link))

	fresh, _ := open(t)
	if state := fresh.shareGoTo(t, link); state != "ready" {
		t.Fatalf("fresh page: data-state=%s: %s", state, fresh.text(t, ".problem"))
	}
	if again := fresh.figures(t); !reflect.DeepEqual(again, figs) {
		t.Errorf("the fresh page shows other figures:\n got %v\nwant %v", again, figs)
	}
	if fresh.shareTitle(t) != s.Title {
		t.Errorf("fresh page title %q", fresh.shareTitle(t))
	}

	// Reopened without the link, the first page restores its autosaved work.
	if state := b.shareGoTo(t, b.pageURL); state != "ready" {
		t.Fatalf("reopened: data-state=%s: %s", state, b.text(t, ".problem"))
	}
	if again := b.figures(t); !reflect.DeepEqual(again, figs) {
		t.Errorf("the reopened page shows other figures:\n got %v\nwant %v", again, figs)
	}
	b.shareShow(t)
	var l1 string
	b.shareEval(t, `document.querySelector('[data-path="penalty.l1"]').value`, &l1)
	if l1 != "0.08" || !strings.Contains(b.text(t, `[data-share="notice"]`), "Restored") {
		t.Errorf("reopened: l1 box %q, notice %q", l1, b.text(t, `[data-share="notice"]`))
	}
	b.checkNoNetwork(t)
}

// TestShareBackForward opens two examples from the menu and moves between them with the
// browser's Back and Forward.
func TestShareBackForward(t *testing.T) {
	b, _ := open(t)
	b.shareSettle(t)
	ex, err := ui.Examples()
	if err != nil || len(ex) < 2 {
		t.Fatalf("examples: %v", err)
	}
	pick := func(i int) map[string]string {
		b.shareShow(t)
		b.shareEval(t, fmt.Sprintf(`(e=>{e.value="%d";e.dispatchEvent(new Event("change",{bubbles:true}));return true})(document.getElementById("share-example"))`, i), nil)
		b.shareWait(t, "example "+ex[i].Name, shareTitleIs(ex[i].Title))
		b.settle(t)
		b.shareShow(t)
		// The menu is back at its prompt, so picking the same example again opens it again.
		b.shareWait(t, "the examples menu at its prompt", `document.getElementById("share-example").value === ""`)
		return b.figures(t)
	}
	first, second := pick(0), pick(1)
	if reflect.DeepEqual(first, second) {
		t.Fatalf("two examples with the same figures: the test cannot tell them apart")
	}
	if err := chromedp.Run(b.ctx, chromedp.NavigateBack()); err != nil {
		t.Fatal(err)
	}
	b.shareWait(t, "Back", shareTitleIs(ex[0].Title))
	b.settle(t)
	if got := b.figures(t); !reflect.DeepEqual(got, first) {
		t.Errorf("after Back: %v, want %v", got, first)
	}
	if err := chromedp.Run(b.ctx, chromedp.NavigateForward()); err != nil {
		t.Fatal(err)
	}
	b.shareWait(t, "Forward", shareTitleIs(ex[1].Title))
	b.settle(t)
	if got := b.figures(t); !reflect.DeepEqual(got, second) {
		t.Errorf("after Forward: %v, want %v", got, second)
	}
	b.checkNoNetwork(t)
}

// TestShareBadInput pastes each kind of bad input and opens a bad link: each gets a message
// naming the problem, and the figures stay.
func TestShareBadInput(t *testing.T) {
	b, _ := open(t)
	b.shareSettle(t)
	want := b.figures(t)
	good := shareCode(t, shareExample(t, "ridge-threshold.json"))
	file, err := shareExample(t, "ridge-threshold.json").Encode()
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct{ name, text, want string }{
		{"empty", "", "empty"},
		{"truncated", good[:len(good)/2], "cut off"},
		{"wrong version", "s9." + good[3:], "version"},
		{"not base64", "s1.<b>not*base64</b>", "not base64url"},
		{"not deflate", "s1.aGVsbG8gdGhlcmUgZnJpZW5kcw", "not deflate"},
		{"out of range", strings.Replace(string(file), `"alpha": 1.05`, `"alpha": 1000`, 1), "design.alpha"},
		{"unknown field", strings.Replace(string(file), `"law": "gauss",`, `"law": "gauss", "shade": 3,`, 1), "shade"},
	} {
		b.sharePaste(t, tc.text)
		b.shareWait(t, tc.name+" refused", fmt.Sprintf(`((document.querySelector('[data-share="message"]')||{}).textContent||"").includes(%q)`, tc.want))
		if got := b.figures(t); !reflect.DeepEqual(got, want) {
			t.Errorf("%s: the figures changed", tc.name)
		}
	}
	// 10 MB, made in the page: refused as it enters the box, before the browser lays it out
	// (which takes it seconds), and the box is left empty.
	start := time.Now()
	var inputMS float64
	b.shareEval(t, `(e=>{const t=performance.now();e.value="A".repeat(10*1024*1024);e.dispatchEvent(new Event("input",{bubbles:true}));return performance.now()-t})(document.getElementById("share-paste"))`, &inputMS)
	b.shareWait(t, "the 10 MB text refused", `(document.querySelector('[data-share="message"]')||{}).textContent.includes("10485760 characters")`)
	t.Logf("10 MB put in the paste box: refused %v later, as seen by the test (the input event took %.0f ms in the page)",
		time.Since(start).Round(time.Millisecond), inputMS)
	var left int
	b.shareEval(t, `document.getElementById("share-paste").textLength`, &left)
	if left != 0 {
		t.Errorf("the paste box still holds %d characters after the refusal", left)
	}
	// A paste of 5 MB: stopped before it enters the box (a paste event carries the
	// clipboard's text; dispatchEvent reports whether its default action, the insertion,
	// was let through).
	start = time.Now()
	var inserted bool
	b.shareEval(t, `(e=>{const d=new DataTransfer();d.setData("text/plain","B".repeat(5*1024*1024));e.focus();return e.dispatchEvent(new ClipboardEvent("paste",{clipboardData:d,bubbles:true,cancelable:true}))})(document.getElementById("share-paste"))`, &inserted)
	b.shareWait(t, "the 5 MB paste refused", `(document.querySelector('[data-share="message"]')||{}).textContent.includes("5242880 characters")`)
	t.Logf("5 MB pasted: refused %v later, as seen by the test", time.Since(start).Round(time.Millisecond))
	if inserted {
		t.Errorf("the 5 MB paste was let into the box (its default action was not prevented)")
	}
	b.sharePress(t, "#share-open")
	b.shareWait(t, "the empty box said", `(document.querySelector('[data-share="message"]')||{}).textContent.includes("empty")`)
	b.screenshot(t, "share-bad-paste.png")
	if got := b.figures(t); !reflect.DeepEqual(got, want) {
		t.Errorf("10 MB paste: the figures changed")
	}

	// A bad link on load: the message is shown, the starting scenario computed.
	bad, _ := open(t)
	if state := bad.shareGoTo(t, bad.pageURL+"#s1.AAAA"); state != "ready" {
		t.Fatalf("bad link on load: data-state=%s: %s", state, bad.text(t, ".problem"))
	}
	bad.shareWait(t, "the bad-link message", `(document.querySelector('[data-share="message"]')||{}).textContent.includes("could not be opened")`)
	var hidden bool
	bad.shareEval(t, `document.getElementById("panel-share").hidden`, &hidden)
	if hidden {
		t.Errorf("the bad-link message is on a hidden panel")
	}
	if got := bad.figures(t); !reflect.DeepEqual(got, want) {
		t.Errorf("bad link on load: figures %v, want the starting scenario's %v", got, want)
	}
	bad.screenshot(t, "share-bad-link.png")
	b.checkNoNetwork(t)
}

// TestShareLongSpectrum: a 2000-value empirical spectrum. At full precision it is more text
// than the editor's box can show: the page opens it anyway, states the list in one line,
// computes, and offers a file since the link would be too long. Rounded to two decimals it
// opens, computes, and gives a working link or says that the link is too long.
func TestShareLongSpectrum(t *testing.T) {
	b, _ := open(t)
	b.shareSettle(t)
	want := b.figures(t)
	rng := rand.New(rand.NewPCG(3, 4))
	withSpectrum := func(decimals float64) (scenario.Scenario, string) {
		s := shareExample(t, "sparse-survey.json")
		sv := make([]float64, 2000)
		for i := range sv {
			sv[i] = math.Round((0.1+rng.Float64())*decimals) / decimals
		}
		s.Design = scenario.Design{Shape: "empirical-sv", Alpha: 0.5, Scale: scenario.ScaleRows, Lists: map[string][]float64{"values": sv}}
		s.Study = nil
		data, err := s.Encode()
		if err != nil {
			t.Fatal(err)
		}
		return s, string(data)
	}

	_, full := withSpectrum(1e15)
	b.sharePaste(t, full)
	b.shareWait(t, "the full-precision spectrum opened", `document.querySelector('[data-share="notice"]') !== null && document.querySelector('[data-view="share"]').getAttribute("data-link") === "too-long"`)
	if state := b.settle(t); state != "ready" || reflect.DeepEqual(b.figures(t), want) {
		t.Errorf("after opening it: data-state=%s (%s), figures unchanged: %v", state, b.text(t, ".problem"), reflect.DeepEqual(b.figures(t), want))
	}
	if n := b.attrOf(t, "#sum-in-design-empirical-sv-values", "data-list-count"); n != "2000" {
		t.Errorf("the editor states %q values, want 2000", n)
	}
	t.Logf("full precision: %s", b.text(t, "#sum-in-design-empirical-sv-values"))

	s, short := withSpectrum(100)
	b.sharePaste(t, short)
	b.shareWait(t, "the rounded spectrum", `document.querySelector('[data-share="notice"]') !== null && document.querySelector('[data-view="share"]').getAttribute("data-link") !== "none"`)
	if state := b.settle(t); state != "ready" {
		t.Fatalf("data-state=%s: %s", state, b.text(t, ".problem"))
	}
	var state string
	b.shareEval(t, `document.querySelector('[data-view="share"]').getAttribute("data-link")`, &state)
	switch state {
	case "ok":
		link := b.shareLink(t)
		got, err := scenario.DecodeLink(link)
		if err != nil || !reflect.DeepEqual(got.Design, s.Design) {
			t.Errorf("the link of 2000 values does not hold them: %v", err)
		}
		t.Logf("2000 values at two decimals: a working link of %d characters", len(link))
	case "too-long":
		msg := b.text(t, `[data-share="nolink"]`)
		if !strings.Contains(msg, "too long") || !strings.Contains(msg, "file") {
			t.Errorf("no 'too long, save the file' message: %q", msg)
		}
		var disabled bool
		b.shareEval(t, `document.getElementById("share-copy").disabled`, &disabled)
		if !disabled {
			t.Errorf("Copy link is offered without a link")
		}
	default:
		t.Errorf("data-link=%q", state)
	}
	b.screenshot(t, "share-long-spectrum.png")
	b.checkNoNetwork(t)
}
