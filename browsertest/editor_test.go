package browsertest

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/cdproto/emulation"
	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"hdrisk/engine/design"
	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
	"hdrisk/ui"
)

// allFigures are the names `hdrisk eval` prints that the page shows (contract 3 and 4).
var allFigures = []string{"mse", "nmse_db", "nonzero_fraction", "tpp", "fdp", "train_error", "susceptibility", "converged", "iterations", "estimate_zero"}

// nativeFigures solves the model's scenario with engine/scenario and engine/fixedpoint, as the
// command line does, and returns the figures under their data-figure names.
func nativeFigures(t *testing.T, m *ui.Model) map[string]string {
	t.Helper()
	c := m.Check()
	if c.Err != nil {
		t.Fatalf("native check: %v", c.Err)
	}
	r, err := fixedpoint.Solve(c.Problem, fixedpoint.Options{})
	if err != nil {
		t.Fatalf("native solve: %v", err)
	}
	f := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	return map[string]string{"mse": f(r.MSE), "nmse_db": f(r.NMSEdB), "nonzero_fraction": f(r.NonZero), "tpp": f(r.TPP),
		"fdp": f(r.FDP), "train_error": f(r.TrainError), "susceptibility": f(r.Susceptibility),
		"converged": strconv.FormatBool(r.Converged), "iterations": strconv.Itoa(r.Iterations), "estimate_zero": strconv.FormatBool(r.EstimateZero)}
}

// sameFigures compares every figure to 1e-12 relative (flags and counts exactly).
func sameFigures(t *testing.T, what string, got, want map[string]string) {
	t.Helper()
	for _, name := range allFigures {
		g, w := got[name], want[name]
		if g == w {
			continue
		}
		gv, err1 := strconv.ParseFloat(g, 64)
		wv, err2 := strconv.ParseFloat(w, 64)
		if err1 != nil || err2 != nil || name == "iterations" || math.Abs(gv-wv) > 1e-12*math.Abs(wv) {
			t.Errorf("%s: %s = %q in the page, %q natively", what, name, g, w)
		}
	}
}

// press types one key into the focused element, without Enter or Tab.
func (b *browser) press(t *testing.T, key string) {
	t.Helper()
	if err := chromedp.Run(b.ctx, chromedp.KeyEvent(key)); err != nil {
		t.Fatalf("key %q: %v", key, err)
	}
}

// focusEmpty focuses the input and deletes its text with the keyboard.
func (b *browser) focusEmpty(t *testing.T, sel string) {
	t.Helper()
	var ok bool
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(fmt.Sprintf(`(e=>{if(!e)return false;e.focus();e.select();return document.activeElement===e})(document.querySelector(%q))`, sel), &ok)); err != nil || !ok {
		t.Fatalf("focusing %s: %v (focused: %v)", sel, err, ok)
	}
	b.press(t, kb.Delete)
}

// viewShot saves what the window shows (not the whole page) at the given size.
func (b *browser) viewShot(t *testing.T, name string, w, h int64) {
	t.Helper()
	b.viewport(t, w, h)
	var png []byte
	if err := chromedp.Run(b.ctx, chromedp.CaptureScreenshot(&png)); err != nil {
		t.Fatalf("screenshot %s: %v", name, err)
	}
	dir := filepath.Join("..", "dist", "screenshots")
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, name), png, 0o644); err != nil {
		t.Fatal(err)
	}
	t.Logf("screenshot: %s", filepath.Join(dir, name))
}

// TestEditorFollowsTyping types into the editor key by key, never pressing Enter or leaving
// the box, and checks after every key that the figures are the native engine's to 1e-12;
// then an out-of-range entry is marked beside its input while the last valid figures stay.
func TestEditorFollowsTyping(t *testing.T) {
	b, _ := open(t)
	if state := b.settle(t); state != "ready" {
		t.Fatalf("data-state=%s: %s", state, b.text(t, ".problem"))
	}
	m := ui.NewModel()
	sameFigures(t, "first result", b.figures(t), nativeFigures(t, m))
	b.viewShot(t, "editor-1366x768.png", 1366, 768)

	// Every kind of the engine's registries is in its menu, and the menu offers nothing
	// else: the lists come from the engine, not from the page's own tables, which the page
	// could drop a kind from.
	var options []string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(`Array.from(document.querySelectorAll("#pick-design option, #pick-signal option, #pick-penalty option")).map(o=>o.parentElement.id+"="+o.value)`, &options)); err != nil {
		t.Fatal(err)
	}
	var want []string
	for _, k := range design.Shapes() {
		want = append(want, "pick-design="+k.Name)
	}
	for _, k := range signal.Laws() {
		want = append(want, "pick-signal="+k.Name)
	}
	for _, k := range penalty.Kinds() {
		want = append(want, "pick-penalty="+k.Name)
	}
	slices.Sort(options)
	slices.Sort(want)
	if !slices.Equal(options, want) {
		t.Errorf("the menus offer %v; the engine's registries hold %v", options, want)
	}

	// alpha: 0.4 -> "2" -> "2." -> "2.5", one key at a time.
	const alpha = "#in-design-alpha"
	b.focusEmpty(t, alpha)
	b.settle(t)
	before := b.figures(t)
	text := ""
	for _, key := range []string{"2", ".", "5"} {
		start := time.Now()
		b.keyWatch(t)
		b.profile(t, "key-"+key, func() { b.press(t, key) })
		text += key
		state := b.settle(t)
		seen := time.Since(start)
		k := b.keyRead(t)
		t.Logf("alpha %q: key to settled figures (design plot redrawn) in the page %.0f ms, next frame %.0f ms, %d renders; %v seen by the test, its round trips included",
			text, k.DOM, k.Painted, k.Renders, seen.Round(time.Millisecond))
		if state != "ready" {
			t.Fatalf("alpha %q: data-state=%s: %s", text, state, b.text(t, ".problem"))
		}
		if err := m.SetText("in-design-alpha", text); err != nil {
			t.Fatal(err)
		}
		got := b.figures(t)
		sameFigures(t, "alpha "+text, got, nativeFigures(t, m))
		if key == "2" && got["mse"] == before["mse"] {
			t.Errorf("the figures did not change when alpha went to 2")
		}
	}
	var focused string
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(`document.activeElement && document.activeElement.id`, &focused)); err != nil || focused != "in-design-alpha" {
		t.Errorf("focus left the box while typing: %q", focused)
	}
	good := b.figures(t)

	// An out-of-range density: marked in place, the rest keeps working.
	const density = "#in-signal-bernoulli-gauss-density"
	b.focusEmpty(t, density)
	for _, key := range []string{"1", ".", "5"} {
		b.press(t, key)
	}
	if state := b.settle(t); state != "error" {
		t.Errorf("density 1.5: data-state=%s, want error", state)
	}
	msg := b.text(t, "#err-in-signal-bernoulli-gauss-density")
	if !strings.Contains(msg, "signal.density") || !strings.Contains(msg, "out of range") {
		t.Errorf("message beside the density: %q", msg)
	}
	if v := b.attrOf(t, density, "aria-invalid"); v != "true" {
		t.Errorf("aria-invalid=%q on the density", v)
	}
	if v := b.attrOf(t, alpha, "aria-invalid"); v != "false" {
		t.Errorf("aria-invalid=%q on alpha, which is fine", v)
	}
	if v := b.attrOf(t, ".results", "data-stale"); v != "true" {
		t.Errorf("results data-stale=%q, want true", v)
	}
	if s := b.text(t, ".results .summary"); !strings.Contains(s, "Last valid scenario") || !strings.Contains(s, "m/n = 2.5") {
		t.Errorf("the kept figures are not labelled as the last valid scenario's: %q", s)
	}
	// Typing "1.5" passed through "1" and "1.", a valid density of 1: that is the last valid
	// scenario now, and its figures are the ones kept.
	_ = m.SetText("in-signal-bernoulli-gauss-density", "1")
	kept := nativeFigures(t, m)
	sameFigures(t, "kept after a bad density", b.figures(t), kept)
	if kept["mse"] == good["mse"] {
		t.Errorf("density 1 gave the same mse as 0.05; the check above proves nothing")
	}
	b.viewShot(t, "editor-invalid-1366x768.png", 1366, 768)

	// Another input still works while the density is wrong: it is marked too, nothing breaks.
	b.focusEmpty(t, "#in-noise-variance")
	b.press(t, "x")
	b.settle(t)
	if v := b.attrOf(t, "#in-noise-variance", "aria-invalid"); v != "true" {
		t.Errorf("second bad input not marked: %q", v)
	}
	if v := b.attrOf(t, density, "aria-invalid"); v != "true" {
		t.Errorf("first bad input lost its mark: %q", v)
	}
	b.press(t, kb.Backspace)
	for _, key := range []string{"0", ".", "0", "2"} {
		b.press(t, key)
	}
	b.focusEmpty(t, density)
	for _, key := range []string{"0", ".", "1"} {
		b.press(t, key)
	}
	if state := b.settle(t); state != "ready" {
		t.Fatalf("after fixing: data-state=%s: %s", state, b.text(t, ".problem"))
	}
	_ = m.SetText("in-signal-bernoulli-gauss-density", "0.1")
	_ = m.SetText("in-noise-variance", "0.02")
	sameFigures(t, "after fixing", b.figures(t), nativeFigures(t, m))
	if v := b.attrOf(t, ".results", "data-stale"); v != "false" {
		t.Errorf("results still stale after the fix: %q", v)
	}

	// Noise as an SNR in dB.
	if err := chromedp.Run(b.ctx, chromedp.SetValue("#pick-noise", "snr_db", chromedp.ByQuery),
		chromedp.Evaluate(`document.querySelector("#pick-noise").dispatchEvent(new Event("change")); true`, nil)); err != nil {
		t.Fatal(err)
	}
	b.settle(t)
	b.focusEmpty(t, "#in-noise-snr_db")
	for _, key := range []string{"1", "5"} {
		b.press(t, key)
	}
	if state := b.settle(t); state != "ready" {
		t.Fatalf("SNR 15 dB: data-state=%s: %s", state, b.text(t, ".problem"))
	}
	_ = m.SetKind("noise", "snr_db")
	_ = m.SetText("in-noise-snr_db", "15")
	sameFigures(t, "SNR 15 dB", b.figures(t), nativeFigures(t, m))

	// Tabs are real buttons and the assumptions are one click away.
	if err := chromedp.Run(b.ctx, chromedp.Click(".offline .linkish", chromedp.ByQuery)); err != nil {
		t.Fatal(err)
	}
	if v := b.attrOf(t, "#tab-about", "aria-selected"); v != "true" {
		t.Errorf("assumptions tab aria-selected=%q after the masthead button", v)
	}
	if s := b.text(t, "#panel-about"); !strings.Contains(s, "rotationally invariant") || !strings.Contains(s, "no network requests") {
		t.Errorf("assumptions panel: %q", s)
	}
	b.viewShot(t, "editor-800x1100.png", 800, 1100)

	// Print: no controls; the figures, the scenario in words and the cautions remain.
	if err := chromedp.Run(b.ctx, emulation.SetEmulatedMedia().WithMedia("print")); err != nil {
		t.Fatal(err)
	}
	var shown map[string]bool
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(`(()=>{const vis=s=>{const e=document.querySelector(s);return !!e&&getComputedStyle(e).display!=="none"&&e.getClientRects().length>0};
		return {input: vis("#in-design-alpha"), tabs: vis(".tabs"), figures: vis("[data-figure=mse]"), summary: vis(".results .summary"), cautions: vis("#panel-about"), plot: vis(".law-plot img")}})()`, &shown)); err != nil {
		t.Fatal(err)
	}
	if shown["input"] || shown["tabs"] || !shown["figures"] || !shown["summary"] || !shown["cautions"] || !shown["plot"] {
		t.Errorf("print view shows %v; want no inputs or tabs, and the figures, summary, cautions and law plots", shown)
	}
	b.viewShot(t, "editor-print.png", 1000, 1300)
	if err := chromedp.Run(b.ctx, emulation.SetEmulatedMedia().WithMedia("")); err != nil {
		t.Fatal(err)
	}
	b.checkLabels(t)
	b.checkNoNetwork(t)
}
