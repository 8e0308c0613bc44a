package browsertest

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	cdplog "github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/cdproto/target"
	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"hdrisk/protocol"
	"hdrisk/ui"
	"hdrisk/wasm/job"
)

// figureNames are the headline figures the page must show (contract 3 and 4).
var figureNames = []string{"mse", "nmse_db", "susceptibility", "nonzero_fraction", "converged", "iterations", "estimate_zero"}

// browser is a running headless Chromium with the page open and every request recorded.
type browser struct {
	ctx      context.Context
	context  cdp.BrowserContextID // the test's own storage, as a fresh profile
	pageURL  string
	mu       sync.Mutex
	requests []string
	console  []string
}

func (b *browser) log(list *[]string, s string) {
	b.mu.Lock()
	defer b.mu.Unlock()
	*list = append(*list, s)
}

func (b *browser) snapshot() (requests, console []string) {
	b.mu.Lock()
	defer b.mu.Unlock()
	return append([]string(nil), b.requests...), append([]string(nil), b.console...)
}

// need returns the path of what is required, or stops the test: a failure under CI=true, a
// skip otherwise (a developer without chromium can still run the native tests).
func need(t *testing.T, what, path string, err error) string {
	t.Helper()
	if err == nil {
		return path
	}
	msg := fmt.Sprintf("%s not available (%v)", what, err)
	if os.Getenv("CI") == "true" {
		t.Fatal(msg)
	}
	t.Skip(msg + "; set CI=true to make this a failure")
	return ""
}

func chromium(t *testing.T) string {
	for _, name := range []string{"/usr/bin/chromium", "chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	return need(t, "chromium", "", errors.New("not on PATH; .ci/run installs Debian's chromium"))
}

// pagePath is the built page: dist/hdrisk.html, or the file named by HDRISK_PAGE (a build of
// one's own, so that two people testing at once do not test each other's page).
func pagePath(t *testing.T) string {
	p, err := filepath.Abs(filepath.Join("..", "dist", "hdrisk.html"))
	if env := os.Getenv("HDRISK_PAGE"); env != "" {
		p, err = filepath.Abs(env)
	}
	if err == nil {
		_, err = os.Stat(p)
	}
	return need(t, "the built page", p, err)
}

// The package's tests share one Chromium process, started by the first test that needs it and
// ended by TestMain. Each open gets a browser context of its own (Target.createBrowserContext:
// its own storage, cookies and downloads, as a fresh profile has) and one tab in it, so no state
// passes from one test to the next except through what a test hands over itself, such as a link.
// One launch for the package instead of one per test also removes about 30 process starts from
// CI, each a chance for the browser to fail before the test begins.
var shared struct {
	once    sync.Once
	ctx     context.Context
	cancel  func()
	profile string
	err     error
}

// sharedBrowser starts the package's Chromium once and returns a context on it.
func sharedBrowser(t *testing.T) context.Context {
	t.Helper()
	exe := chromium(t)
	shared.once.Do(func() {
		profile, err := os.MkdirTemp("", "hdrisk-chromium-")
		if err != nil {
			shared.err = err
			return
		}
		opts := []chromedp.ExecAllocatorOption{
			chromedp.ExecPath(exe),
			chromedp.Flag("headless", true),
			chromedp.Flag("no-sandbox", true),
			chromedp.Flag("disable-gpu", true),
			chromedp.Flag("no-first-run", true),
			chromedp.Flag("disable-background-networking", true),
			chromedp.Flag("disable-component-update", true),
			chromedp.Flag("disable-sync", true),
			// Shared memory in /tmp rather than /dev/shm, which may be small in a container.
			// Debian's launcher means to add this flag when /dev/shm is small, but its test
			// breaks when findmnt reports /dev/shm twice.
			chromedp.Flag("disable-dev-shm-usage", true),
			chromedp.UserDataDir(profile),
			chromedp.WindowSize(1280, 1000),
		}
		actx, cancelA := chromedp.NewExecAllocator(context.Background(), opts...)
		ctx, cancelC := chromedp.NewContext(actx)
		shared.profile = profile
		shared.ctx = ctx
		shared.cancel = func() { cancelC(); cancelA() }
		shared.err = chromedp.Run(ctx) // starts the browser
	})
	if shared.err != nil {
		t.Fatalf("starting chromium: %v", shared.err)
	}
	return shared.ctx
}

func TestMain(m *testing.M) {
	code := m.Run()
	if shared.cancel != nil {
		shared.cancel()
		// Chromium's helper processes may still be writing the profile for a moment.
		for i := 0; i < 20 && os.RemoveAll(shared.profile) != nil; i++ {
			time.Sleep(100 * time.Millisecond)
		}
	}
	os.Exit(code)
}

// open opens a new tab in a new browser context of the shared Chromium, turns networking off
// and navigates to the page. It returns the browser and the time navigation began.
func open(t *testing.T) (*browser, time.Time) {
	t.Helper()
	page := pagePath(t)
	parent := sharedBrowser(t)
	// The context and its tab are made here rather than by chromedp.WithNewBrowserContext,
	// which asks for the tab without a window of its own; Chromium then refuses it ("no browser
	// is open") when the new context has no window yet.
	exec := cdp.WithExecutor(parent, chromedp.FromContext(parent).Browser)
	bcid, err := target.CreateBrowserContext().Do(exec)
	if err != nil {
		t.Fatalf("a browser context: %v", err)
	}
	tid, err := target.CreateTarget("about:blank").WithBrowserContextID(bcid).WithNewWindow(true).Do(exec)
	if err != nil {
		t.Fatalf("a tab: %v", err)
	}
	ctx, cancelC := chromedp.NewContext(parent, chromedp.WithTargetID(tid))
	ctx, cancelT := context.WithTimeout(ctx, 90*time.Second)
	t.Cleanup(func() {
		cancelT()
		cancelC() // detaches from the tab and closes it
		if err := target.DisposeBrowserContext(bcid).Do(exec); err != nil {
			t.Errorf("disposing of the browser context: %v", err)
		}
	})

	b := &browser{ctx: ctx, context: bcid, pageURL: "file://" + page}
	chromedp.ListenTarget(ctx, func(ev any) {
		switch e := ev.(type) {
		case *network.EventRequestWillBeSent:
			b.log(&b.requests, e.Request.URL)
		case *network.EventWebSocketCreated:
			b.log(&b.requests, e.URL)
		case *runtime.EventConsoleAPICalled:
			var parts []string
			for _, a := range e.Args {
				parts = append(parts, strings.Trim(string(a.Value), `"`))
			}
			b.log(&b.console, string(e.Type)+": "+strings.Join(parts, " "))
		case *cdplog.EventEntryAdded:
			// Policy violations and blocked loads are browser messages, not console calls.
			b.log(&b.console, string(e.Entry.Source)+" "+string(e.Entry.Level)+": "+e.Entry.Text)
		case *runtime.EventExceptionThrown:
			b.log(&b.console, "exception: "+e.ExceptionDetails.Error())
		}
	})
	// Start the browser and turn the network off before the page is opened.
	if err := chromedp.Run(ctx,
		cdplog.Enable(),
		network.Enable(),
		network.EmulateNetworkConditions(true, 0, 0, 0),
	); err != nil {
		t.Fatalf("starting chromium: %v", err)
	}
	start := time.Now()
	if err := chromedp.Run(ctx, chromedp.Navigate(b.pageURL)); err != nil {
		t.Fatalf("opening %s: %v", b.pageURL, err)
	}
	return b, start
}

// state waits until the page root's data-state is no longer "busy" and returns it.
func (b *browser) settle(t *testing.T) string {
	t.Helper()
	var state string
	err := chromedp.Run(b.ctx, chromedp.Poll(
		`(function(){const r=document.getElementById("hdrisk");const s=r&&r.getAttribute("data-state");return s&&s!=="busy"?s:null})()`,
		&state, chromedp.WithPollingInterval(10*time.Millisecond), chromedp.WithPollingTimeout(30*time.Second)))
	if err != nil {
		_, console := b.snapshot()
		t.Fatalf("page never left data-state=busy: %v\nconsole:\n%s", err, strings.Join(console, "\n"))
	}
	return state
}

func (b *browser) text(t *testing.T, sel string) string {
	t.Helper()
	var s string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(
		fmt.Sprintf(`Array.from(document.querySelectorAll(%q)).map(e=>e.textContent).join("\n")`, sel), &s)); err != nil {
		t.Fatalf("reading %s: %v", sel, err)
	}
	return s
}

// figures reads every data-figure on the page.
func (b *browser) figures(t *testing.T) map[string]string {
	t.Helper()
	var pairs [][]string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(
		`Array.from(document.querySelectorAll("[data-figure]")).map(e=>[e.getAttribute("data-figure"), e.getAttribute("data-value")])`,
		&pairs)); err != nil {
		t.Fatalf("reading figures: %v", err)
	}
	m := map[string]string{}
	for _, p := range pairs {
		if len(p) == 2 {
			m[p[0]] = p[1]
		}
	}
	return m
}

// checkNoNetwork fails if anything other than the page itself, data: or blob: was requested,
// or if the browser reported a blocked load or policy violation on the console.
func (b *browser) checkNoNetwork(t *testing.T) {
	t.Helper()
	requests, console := b.snapshot()
	for _, u := range requests {
		if u == b.pageURL || strings.HasPrefix(u, "data:") || strings.HasPrefix(u, "blob:") {
			continue
		}
		t.Errorf("the page made a request: %s", u)
	}
	seen := false
	for _, u := range requests {
		seen = seen || u == b.pageURL
	}
	if !seen {
		t.Errorf("the network domain did not record the page itself; the request check saw nothing (requests: %q)", requests)
	}
	if violations(console) > 0 {
		t.Errorf("the browser reported blocked loads or policy violations:\n%s", strings.Join(console, "\n"))
	}
	for _, c := range console {
		t.Logf("browser: %s", c)
	}
}

func (b *browser) screenshot(t *testing.T, name string) {
	t.Helper()
	var png []byte
	if err := chromedp.Run(b.ctx, chromedp.FullScreenshot(&png, 100)); err != nil {
		t.Fatalf("screenshot: %v", err)
	}
	dir := filepath.Join("..", "dist", "screenshots")
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, name)
	if err := os.WriteFile(path, png, 0o644); err != nil {
		t.Fatal(err)
	}
	t.Logf("screenshot: %s", path)
}

func number(t *testing.T, figs map[string]string, name string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(figs[name], 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		t.Fatalf("figure %s: data-value %q is not a finite number", name, figs[name])
	}
	return v
}

// TestPageOffline opens the page with the network off, waits for the first result, checks the
// figures and that no request was made, and logs the budgets of architecture.md: page size
// (<= 10 MB) and time to first result (<= 4 s).
func TestPageOffline(t *testing.T) {
	b, start := open(t)
	state := b.settle(t)
	elapsed := time.Since(start)
	b.screenshot(t, "first-result.png")
	if state != "ready" {
		_, console := b.snapshot()
		t.Fatalf("data-state=%s; the page says: %s\nconsole:\n%s", state, b.text(t, ".problem"), strings.Join(console, "\n"))
	}
	info, err := os.Stat(pagePath(t))
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("page size: %d bytes (%.2f MB, budget 10 MB)", info.Size(), float64(info.Size())/1e6)
	t.Logf("time from navigation to first result: %v (budget 4 s)", elapsed.Round(time.Millisecond))
	var marks string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(
		`performance.getEntriesByType("mark").map(m=>m.name+" "+m.startTime.toFixed(0)+" ms").join(", ")`, &marks)); err == nil {
		t.Logf("start-up marks (from navigation start): %s", marks)
	}
	if info.Size() > 10_000_000 {
		t.Errorf("page is %d bytes, over the 10 MB budget", info.Size())
	}

	figs := b.figures(t)
	for _, name := range figureNames {
		if _, ok := figs[name]; !ok {
			t.Errorf("figure %s is missing (have %v)", name, figs)
		}
	}
	if t.Failed() {
		return
	}
	if mse := number(t, figs, "mse"); mse < 0 {
		t.Errorf("mse = %g < 0", mse)
	}
	number(t, figs, "nmse_db")
	if v := number(t, figs, "nonzero_fraction"); v < 0 || v > 1 {
		t.Errorf("nonzero_fraction = %g outside [0, 1]", v)
	}
	if it := number(t, figs, "iterations"); it < 1 || it != math.Trunc(it) {
		t.Errorf("iterations = %v, want a positive integer", figs["iterations"])
	}
	for _, name := range []string{"converged", "estimate_zero"} {
		if figs[name] != "true" && figs[name] != "false" {
			t.Errorf("%s = %q, want true or false", name, figs[name])
		}
	}
	if !strings.Contains(b.text(t, ".assumptions"), "no network requests") {
		t.Errorf("the assumptions do not state that the page makes no network requests")
	}
	b.checkLabels(t)

	// The page's figures are the engine's: the same scenario solved natively must agree.
	m := ui.NewModel()
	b.compareNative(t, "first result", m, figs)

	// An edit confirmed with Enter, as the page's hint says: the figures follow.
	b.typeThen(t, "#in-penalty-elastic-net-l1", "0.2", kb.Enter)
	if state := b.settle(t); state != "ready" {
		t.Fatalf("after l1 = 0.2: data-state=%s: %s", state, b.text(t, ".problem"))
	}
	if err := m.SetText("in-penalty-elastic-net-l1", "0.2"); err != nil {
		t.Fatal(err)
	}
	b.compareNative(t, "after l1 = 0.2", m, b.figures(t))

	// Text that is not a number: an error naming the field and no figures.
	b.typeInto(t, "#in-noise-variance", "lots")
	if state := b.settle(t); state != "error" {
		t.Errorf("noise variance \"lots\": data-state=%s, want error", state)
	}
	if msg := b.text(t, ".problem"); !strings.Contains(msg, "noise.variance") {
		t.Errorf("the message %q does not name noise.variance", msg)
	}
	// The last valid figures stay, marked as such (the page keeps working).
	if figs := b.figures(t); figs["mse"] == "" || b.attrOf(t, ".results", "data-stale") != "true" {
		t.Errorf("after an invalid entry: figures %v, data-stale %q; want the last valid figures, marked stale", figs, b.attrOf(t, ".results", "data-stale"))
	}
	b.screenshot(t, "invalid-input.png")
	b.checkNoNetwork(t)
}

// TestWorkersAgreeWithEngine runs the "eval" job on the page's worker pool through the
// hdriskJobs hook, cancels one job mid-flight, and checks that the workers keep answering
// with the native engine's figures.
func TestWorkersAgreeWithEngine(t *testing.T) {
	b, start := open(t)
	if state := b.settle(t); state != "ready" {
		t.Fatalf("data-state=%s: %s", state, b.text(t, ".problem"))
	}
	m := ui.NewModel()
	scen, err := m.JSON()
	if err != nil {
		t.Fatal(err)
	}
	args := fmt.Sprintf(`{"scenario":%s}`, scen)
	var size int
	if err := chromedp.Run(b.ctx, chromedp.Poll(`typeof hdriskJobs === "object" && hdriskJobs.size()`, &size,
		chromedp.WithPollingTimeout(30*time.Second))); err != nil {
		t.Fatalf("the worker pool never appeared: %v", err)
	}
	if size < 1 {
		t.Fatalf("the pool has %d workers", size)
	}
	// One job cancelled as soon as it is posted (its worker is terminated and replaced), then
	// twice as many jobs as workers, all of which must finish.
	script := fmt.Sprintf(`(async function(){
		const args = %q;
		const one = () => new Promise((resolve) => hdriskJobs.start("eval", args, null, (e, r) => resolve({e, r})));
		let late = false;
		const id = hdriskJobs.start("eval", args, null, () => { late = true; });
		hdriskJobs.cancel(id);
		const all = await Promise.all(Array.from({length: %d}, one));
		// A worker answers in order: once every worker has answered a job posted after the
		// cancel, no answer of the cancelled one can still be on its way.
		await Promise.all(Array.from({length: hdriskJobs.size()}, one));
		return JSON.stringify({late, all, size: hdriskJobs.size()});
	})()`, args, 2*size)
	var out string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(script, &out, func(p *runtime.EvaluateParams) *runtime.EvaluateParams {
		return p.WithAwaitPromise(true)
	})); err != nil {
		t.Fatalf("running jobs: %v", err)
	}
	t.Logf("%d workers; %d eval jobs done %v after navigation", size, 2*size, time.Since(start).Round(time.Millisecond))
	var res struct {
		Late bool
		All  []struct{ E, R string }
		Size int
	}
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatalf("%v: %s", err, out)
	}
	if res.Late {
		t.Errorf("a cancelled job still reported back")
	}
	if res.Size != size {
		t.Errorf("pool has %d workers after a cancel, had %d", res.Size, size)
	}
	for i, r := range res.All {
		if r.E != "" {
			t.Errorf("job %d: %s", i, r.E)
			continue
		}
		res, err := protocol.Eval.DecodeResult([]byte(r.R))
		if err != nil {
			t.Fatal(err)
		}
		named, _ := json.Marshal(ui.FiguresOf(res))
		var f map[string]any
		if err := json.Unmarshal(named, &f); err != nil {
			t.Fatal(err)
		}
		figs := map[string]string{}
		for k, v := range f {
			figs[k] = fmt.Sprint(v)
		}
		b.compareNative(t, fmt.Sprintf("worker job %d", i), m, figs)
	}
	b.checkNoNetwork(t)

	// The violation check must be able to fail: provoke one and look for it.
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(`(new Image()).src = "https://example.invalid/probe.png"; true`, nil)); err != nil {
		t.Fatal(err)
	}
	deadline := time.Now().Add(5 * time.Second)
	for {
		_, console := b.snapshot()
		if violations(console) > 0 {
			break
		}
		if time.Now().After(deadline) {
			t.Errorf("a blocked image load was not reported; the policy check is blind:\n%s", strings.Join(console, "\n"))
			break
		}
		time.Sleep(50 * time.Millisecond)
	}
}

// violations counts the browser's messages about the page policy or blocked loads.
func violations(console []string) int {
	n := 0
	for _, c := range console {
		if strings.Contains(c, "Content Security Policy") || strings.Contains(c, "Refused to") {
			n++
		}
	}
	return n
}

// compareNative solves the model's scenario with the engine natively and compares the figures
// the browser reported. WebAssembly uses the same IEEE arithmetic, but Go's math package has
// assembly versions of some functions on amd64, so agreement is asked to 1e-9 relative.
func (b *browser) compareNative(t *testing.T, what string, m *ui.Model, figs map[string]string) {
	t.Helper()
	data, err := m.JSON()
	if err != nil {
		t.Fatal(err)
	}
	res, err := job.Eval(protocol.EvalArgs{Scenario: data})
	if err != nil {
		t.Fatalf("%s: native engine: %v", what, err)
	}
	want := ui.FiguresOf(res)
	for name, w := range map[string]float64{
		"mse": want.MSE, "nmse_db": want.NMSEdB, "susceptibility": want.Susceptibility,
		"nonzero_fraction": want.NonzeroFraction,
	} {
		got := number(t, figs, name)
		if math.Abs(got-w) > 1e-9*math.Max(1, math.Abs(w)) {
			t.Errorf("%s: %s = %v in the browser, %v natively", what, name, got, w)
		}
	}
	if figs["converged"] != strconv.FormatBool(want.Converged) || figs["estimate_zero"] != strconv.FormatBool(want.EstimateZero) {
		t.Errorf("%s: flags converged=%s estimate_zero=%s, natively %v %v", what, figs["converged"], figs["estimate_zero"], want.Converged, want.EstimateZero)
	}
}

// typeInto replaces the text of an input as a person would, ending with Tab (leaving the box)
// so that the change event fires.
func (b *browser) typeInto(t *testing.T, sel, text string) {
	t.Helper()
	b.typeThen(t, sel, text, kb.Tab)
}

// typeThen replaces the text of an input and then presses key.
func (b *browser) typeThen(t *testing.T, sel, text, key string) {
	t.Helper()
	var ok bool
	if err := chromedp.Run(b.ctx,
		chromedp.Evaluate(fmt.Sprintf(`(e=>{if(!e)return false;e.focus();e.select();return document.activeElement===e})(document.querySelector(%q))`, sel), &ok),
	); err != nil || !ok {
		t.Fatalf("focusing %s: %v (found and focused: %v)", sel, err, ok)
	}
	// The whole text at full speed, as a quick typist would, then a wait until the page
	// has taken in every key: the box shows the text once the page has rendered what the
	// keys did (it is not busy). No key may be lost to a redraw, so nothing is typed twice.
	if err := chromedp.Run(b.ctx, chromedp.KeyEvent(text)); err != nil {
		t.Fatalf("typing into %s: %v", sel, err)
	}
	var shown bool
	if err := chromedp.Run(b.ctx, chromedp.Poll(
		fmt.Sprintf(`(e=>e&&e.value===%q&&document.getElementById("hdrisk").getAttribute("data-state")!=="busy"?true:null)(document.querySelector(%q))`, text, sel),
		&shown, chromedp.WithPollingTimeout(10*time.Second))); err != nil {
		var got string
		_ = chromedp.Run(b.ctx, chromedp.Evaluate(fmt.Sprintf(`(e=>e?e.value:"(missing)")(document.querySelector(%q))`, sel), &got))
		t.Fatalf("typed %q into %s at full speed; the box holds %q: a key was lost", text, sel, got)
	}
	if err := chromedp.Run(b.ctx, chromedp.KeyEvent(key)); err != nil {
		t.Fatalf("typing into %s: %v", sel, err)
	}
}

// checkLabels fails for any input or menu without a label (a button: without text or
// aria-label), or one taken out of the tab order.
func (b *browser) checkLabels(t *testing.T) {
	t.Helper()
	var bad []string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(
		`Array.from(document.querySelectorAll("input,select,textarea,button")).filter(e=>!(e.labels&&e.labels.length||e.tagName==="BUTTON"&&(e.textContent.trim()||e.getAttribute("aria-label")))||e.tabIndex<0).map(e=>e.id||e.outerHTML.slice(0,60))`,
		&bad)); err != nil {
		t.Fatal(err)
	}
	for _, x := range bad {
		t.Errorf("control without a label or out of the tab order: %s", x)
	}
}

// attrOf reads one attribute of the first element matching sel ("(missing)" if none).
func (b *browser) attrOf(t *testing.T, sel, name string) string {
	t.Helper()
	var s string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(fmt.Sprintf(`(e=>e?e.getAttribute(%q)||"":"(missing)")(document.querySelector(%q))`, name, sel), &s)); err != nil {
		t.Fatal(err)
	}
	return s
}
