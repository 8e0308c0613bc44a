package browsertest

import (
	"context"
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

	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"
)

// figureNames are the headline figures the page must show (contract 3 and 4).
var figureNames = []string{"mse", "nmse_db", "susceptibility", "nonzero_fraction", "converged", "iterations", "estimate_zero"}

// browser is a running headless Chromium with the page open and every request recorded.
type browser struct {
	ctx      context.Context
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

func pagePath(t *testing.T) string {
	p, err := filepath.Abs(filepath.Join("..", "dist", "hdrisk.html"))
	if err == nil {
		_, err = os.Stat(p)
	}
	return need(t, "the built page", p, err)
}

// open starts Chromium with networking emulated off and navigates to the page. It returns the
// browser and the time navigation began.
func open(t *testing.T) (*browser, time.Time) {
	t.Helper()
	exe, page := chromium(t), pagePath(t)
	opts := []chromedp.ExecAllocatorOption{
		chromedp.ExecPath(exe),
		chromedp.Flag("headless", true),
		chromedp.Flag("no-sandbox", true),
		chromedp.Flag("disable-gpu", true),
		chromedp.Flag("no-first-run", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(1280, 1000),
	}
	actx, cancelA := chromedp.NewExecAllocator(context.Background(), opts...)
	ctx, cancelC := chromedp.NewContext(actx)
	ctx, cancelT := context.WithTimeout(ctx, 90*time.Second)
	t.Cleanup(func() { cancelT(); cancelC(); cancelA() })

	b := &browser{ctx: ctx, pageURL: "file://" + page}
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
		case *runtime.EventExceptionThrown:
			b.log(&b.console, "exception: "+e.ExceptionDetails.Error())
		}
	})
	// Start the browser and turn the network off before the page is opened.
	if err := chromedp.Run(ctx,
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
	for _, c := range console {
		if strings.Contains(c, "Content Security Policy") || strings.Contains(c, "Refused to") {
			t.Errorf("policy violation: %s", c)
		}
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
	b.checkNoNetwork(t)
}
