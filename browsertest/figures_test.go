package browsertest

import (
	"bytes"
	"fmt"
	"image/color"
	"image/png"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"time"

	cdpbrowser "github.com/chromedp/cdproto/browser"
	"github.com/chromedp/chromedp"

	"hdrisk/engine/plot"
	"hdrisk/engine/scenario"
	"hdrisk/ui"
)

// imageShown waits until the <img> matched by sel shows a loaded image from a blob: URL
// (every figure of the page goes through one, never through a long data: URL) and returns
// its natural width in CSS pixels.
func (b *browser) imageShown(t *testing.T, sel string) int {
	t.Helper()
	var w int
	err := chromedp.Run(b.ctx, chromedp.Poll(fmt.Sprintf(
		`(e=>e&&e.complete&&e.naturalWidth>0&&e.getAttribute("src").startsWith("blob:")?e.naturalWidth:null)(document.querySelector(%q))`, sel),
		&w, chromedp.WithPollingInterval(20*time.Millisecond), chromedp.WithPollingTimeout(10*time.Second)))
	if err != nil {
		t.Fatalf("%s shows no loaded blob: image: %v (src starts %q)", sel, err,
			b.cdJS(t, fmt.Sprintf(`(e=>e?String(e.getAttribute("src")).slice(0,30):"no element")(document.querySelector(%q))`, sel)))
	}
	return w
}

// longSpectrum is an invented scenario: the sparse survey example with a measured-looking
// design of 2000 distinct singular values at full precision (about 40,000 characters as
// text, far over the renderer's 16 KB buffer) and a 400-point sweep over l1.
func longSpectrum(t *testing.T) scenario.Scenario {
	t.Helper()
	s := shareExample(t, "sparse-survey.json")
	rng := rand.New(rand.NewPCG(7, 8))
	sv := make([]float64, 2000)
	for i := range sv {
		sv[i] = 0.1 + 2*rng.Float64()
	}
	s.Title = "Invented example: 2000 measured singular values"
	s.Design = scenario.Design{Shape: "empirical-sv", Alpha: 0.5, Scale: scenario.ScaleRows, Lists: map[string][]float64{"values": sv}}
	s.Study = &scenario.Study{View: "curve", Sweep: &scenario.Sweep{Over: "l1", From: 1e-3, To: 1, Points: 400, Log: true}}
	if err := s.Validate(); err != nil {
		t.Fatal(err)
	}
	return s
}

// downloadsTo has the test's browser context save downloads in a new folder, with events, and
// returns it.
func (b *browser) downloadsTo(t *testing.T) string {
	t.Helper()
	dir, err := os.MkdirTemp("", "hdrisk-downloads-")
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { os.RemoveAll(dir) })
	if err := chromedp.Run(b.ctx, cdpbrowser.SetDownloadBehavior(cdpbrowser.SetDownloadBehaviorBehaviorAllowAndName).
		WithDownloadPath(dir).WithEventsEnabled(true).
		WithBrowserContextID(b.context)); err != nil {
		t.Fatalf("download folder: %v", err)
	}
	return dir
}

// alive fails the test when the page root says error or the console holds an error: the
// renderer stopping on a long text logs one and leaves the page dead.
func (b *browser) alive(t *testing.T, when string) {
	t.Helper()
	if state := b.attrOf(t, "#hdrisk", "data-state"); state == "error" || state == "" {
		t.Fatalf("%s: data-state=%q: %s", when, state, b.text(t, ".problem"))
	}
	_, console := b.snapshot()
	for _, c := range console {
		if strings.HasPrefix(c, "error:") || strings.HasPrefix(c, "exception:") || strings.Contains(c, " error: ") {
			t.Fatalf("%s: the console holds an error:\n%s", when, strings.Join(console, "\n"))
		}
	}
}

// keep writes a downloaded file beside the screenshots, to be looked at.
func keep(t *testing.T, name string, data []byte) {
	t.Helper()
	dir := filepath.Join("..", "dist", "screenshots")
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, name), data, 0o644); err != nil {
		t.Fatal(err)
	}
}

// pngOf decodes a downloaded PNG and counts its pixels near col.
func pngOf(t *testing.T, what string, data []byte, col color.RGBA) (w, h, near int) {
	t.Helper()
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatalf("%s is not a PNG: %v", what, err)
	}
	r := img.Bounds()
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			cr, cg, cb, _ := img.At(x, y).RGBA()
			d := func(a uint32, b uint8) bool { return max(int(a>>8), int(b))-min(int(a>>8), int(b)) < 16 }
			if d(cr, col.R) && d(cg, col.G) && d(cb, col.B) {
				near++
			}
		}
	}
	return r.Dx(), r.Dy(), near
}

// TestLongListFromFile opens a scenario file holding 2000 full-precision singular values:
// it opens and evaluates, the editor states the list in one line with its box locked, the
// design plot shows, the link is refused as too long and the scenario saves back as a file
// holding every value exactly.
func TestLongListFromFile(t *testing.T) {
	b, _ := open(t)
	b.shareSettle(t)
	dir := b.downloadsTo(t)
	s := longSpectrum(t)
	data, err := s.Encode()
	if err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(t.TempDir(), "long-spectrum.json")
	if err := os.WriteFile(file, data, 0o644); err != nil {
		t.Fatal(err)
	}
	b.shareShow(t)
	if err := chromedp.Run(b.ctx, chromedp.SetUploadFiles("#share-file", []string{file}, chromedp.ByQuery)); err != nil {
		t.Fatal(err)
	}
	b.shareWait(t, "the file opened", `document.querySelector('[data-share="title"]').textContent.includes("2000 measured")`)
	if state := b.settle(t); state != "ready" {
		t.Fatalf("data-state=%s: %s", state, b.text(t, ".problem"))
	}
	b.alive(t, "after opening the file")
	m := ui.NewModel()
	if err := m.Load(s); err != nil {
		t.Fatal(err)
	}
	b.compareNative(t, "2000 singular values", m, b.figures(t))

	const box = "in-design-empirical-sv-values"
	if n := b.attrOf(t, "#sum-"+box, "data-list-count"); n != "2000" {
		t.Errorf("the editor states %q values, want 2000", n)
	}
	summary := b.text(t, "#sum-"+box)
	var value string
	var locked bool
	b.shareEval(t, `document.getElementById("`+box+`").value`, &value)
	b.shareEval(t, `document.getElementById("`+box+`").readOnly`, &locked)
	if value != "" || !locked || !strings.HasPrefix(summary, "2000 values, from 0.1") {
		t.Errorf("the long list: box %.40q, locked %v, summary %q", value, locked, summary)
	}
	t.Logf("the editor says: %s", summary)
	b.imageShown(t, `[data-group="design"] .law-plot img`)

	if st := b.attrOf(t, `[data-view="share"]`, "data-link"); st != "too-long" || !strings.Contains(b.text(t, `[data-share="nolink"]`), "file") {
		t.Errorf("data-link=%q: %q", st, b.text(t, `[data-share="nolink"]`))
	}
	name, saved := b.studyDownload(t, dir, "#share-save")
	back, err := scenario.Decode(saved)
	if err != nil || !reflect.DeepEqual(back.Design, s.Design) {
		t.Errorf("the saved file %s does not hold the 2000 values exactly: %v", name, err)
	}
	b.viewShot(t, "long-list-1366x768.png", 1366, 768)

	// Replace the list: the box opens empty, and a short list put into it is the design.
	b.sharePress(t, "#replace-"+box)
	b.shareWait(t, "the box unlocked", `!document.getElementById("`+box+`").readOnly`)
	// The new list arrives as a paste does, in one input event.
	b.shareEval(t, `(e=>{e.focus();e.value="1, 0.8, 0.6";e.dispatchEvent(new Event("input",{bubbles:true}));return true})(document.getElementById("`+box+`"))`, nil)
	if err := m.SetText(box, "1, 0.8, 0.6"); err != nil {
		t.Fatal(err)
	}
	// The event reaches the page's Go code after the browser has taken it: wait for the
	// figures of the new list, then compare them all.
	want := nativeFigures(t, m)
	wmse, _ := strconv.ParseFloat(want["mse"], 64)
	start := time.Now()
	for ; ; time.Sleep(50 * time.Millisecond) {
		if state := b.settle(t); state != "ready" {
			t.Fatalf("after a short list: data-state=%s: %s", state, b.text(t, ".problem"))
		}
		gmse, _ := strconv.ParseFloat(b.figures(t)["mse"], 64)
		if math.Abs(gmse-wmse) <= 1e-12*wmse || time.Since(start) > 10*time.Second {
			break
		}
	}
	t.Logf("the figures of the new list came %v after it", time.Since(start).Round(time.Millisecond))
	sameFigures(t, "the list replaced", b.figures(t), want)
	if n := b.cdJS(t, `String(document.querySelectorAll("#sum-`+box+`").length)`); n != "0" {
		t.Errorf("the short list is still summed up instead of shown in its box")
	}
	b.alive(t, "after replacing the list")
	b.checkNoNetwork(t)
}

// TestLargeFiguresInPage runs the long spectrum's 400-point sweep and a map, whose figures
// are far over the renderer's 16 KB as data: URLs: the page stays alive, every figure shows
// through a blob: URL, and the PNG the browser draws from the SVG is the figure at 192 dpi
// (two pixels per CSS pixel) with its colours.
func TestLargeFiguresInPage(t *testing.T) {
	b, _ := open(t)
	b.shareSettle(t)
	dir := b.downloadsTo(t)
	s := longSpectrum(t)
	text, err := s.Encode()
	if err != nil {
		t.Fatal(err)
	}
	b.sharePaste(t, string(text))
	b.shareWait(t, "the pasted file opened", `document.querySelector('[data-share="title"]').textContent.includes("2000 measured")`)
	if state := b.settle(t); state != "ready" {
		t.Fatalf("data-state=%s: %s", state, b.text(t, ".problem"))
	}
	b.cdWorkers(t)
	b.imageShown(t, `[data-group="design"] .law-plot img`)

	b.studyClick(t, "#tab-curve")
	b.studyWait(t, "[data-view=curve]", "data-run", 5*time.Second, "idle")
	if p := b.studyValue(t, "#curve-points"); p != "400" {
		b.typeInto(t, "#curve-points", "400")
	}
	b.studyClick(t, "#curve-run")
	if got := b.studyWait(t, "[data-view=curve]", "data-run", 40*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the sweep ended in %s: %s", got, b.text(t, "[data-view=curve] .problem"))
	}
	b.studyWait(t, "[data-view=curve]", "data-figure-seconds", 10*time.Second)
	if w := b.imageShown(t, "#curve-figure"); w != 640 {
		t.Errorf("the curve is %d CSS pixels wide, want 640 (480 pt)", w)
	}
	b.alive(t, "after the sweep")
	// The same 400-point curve for every other design shape beside it. The view may still read
	// "done" from the single curve for a moment after the click, so wait for the comparison's
	// own figure (a new image URL) before reading the run's end.
	var before string
	b.shareEval(t, `document.querySelector("#curve-figure").src`, &before)
	b.studyClick(t, "#curve-compare")
	b.shareWait(t, "the comparison's figure", fmt.Sprintf(
		`document.querySelector("#curve-figure") && document.querySelector("#curve-figure").src !== %q`, before))
	if got := b.studyWait(t, "[data-view=curve]", "data-run", 40*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the comparison ended in %s: %s", got, b.text(t, "[data-view=curve] .problem"))
	}
	b.studyWait(t, "[data-view=curve]", "data-figure-seconds", 10*time.Second)
	b.imageShown(t, "#curve-figure")
	b.alive(t, "after the comparison")
	_, svg := b.studyDownload(t, dir, "#curve-svg")
	dataURL := 4*((len(svg)+2)/3) + len("data:image/svg+xml;base64,")
	t.Logf("the curves' SVG: %d bytes, %d as a data: URL", len(svg), dataURL)
	if dataURL <= 16384 {
		t.Errorf("the figure (%d bytes as a data: URL) does not test the renderer's 16 KB buffer", dataURL)
	}
	name, data := b.studyDownload(t, dir, "#curve-png")
	keep(t, "exported-curve.png", data)
	// A legend too wide to stand beside the data goes under it and makes the figure taller.
	w, h, orange := pngOf(t, name, data, plot.Palette[0])
	if name != "hdrisk-curve.png" || w != 1280 || h < 800 || orange < 500 {
		t.Errorf("%s: %d x %d pixels, %d of the first series' orange; want 1280 wide, 800 or more high, and the curve drawn", name, w, h, orange)
	}

	// A map: its SVG holds the heat map as an embedded raster, which the canvas must draw.
	b.studyClick(t, "#tab-map")
	b.studyWait(t, "[data-view=map]", "data-run", 5*time.Second, "idle")
	b.typeInto(t, "#map-x-points", "16")
	b.typeInto(t, "#map-y-points", "12")
	b.studyClick(t, "#map-run")
	if got := b.studyWait(t, "[data-view=map]", "data-run", 60*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the map ended in %s: %s", got, b.text(t, "[data-view=map] .problem"))
	}
	b.studyWait(t, "[data-view=map]", "data-figure-seconds", 10*time.Second)
	b.imageShown(t, "#map-figure")
	_, svg = b.studyDownload(t, dir, "#map-svg")
	t.Logf("the map's SVG: %d bytes", len(svg))
	name, data = b.studyDownload(t, dir, "#map-png")
	keep(t, "exported-map.png", data)
	mw, mh, _ := pngOf(t, name, data, color.RGBA{})
	img, _ := png.Decode(bytes.NewReader(data))
	colours := map[color.RGBA]bool{}
	for y := 0; y < mh; y += 4 {
		for x := 0; x < mw; x += 4 {
			r, g, bl, _ := img.At(x, y).RGBA()
			colours[color.RGBA{uint8(r >> 12), uint8(g >> 12), uint8(bl >> 12), 0}] = true
		}
	}
	if mw != 1280 || mh != 800 || len(colours) < 20 {
		t.Errorf("%s: %d x %d pixels in %d colours; want 1280 x 800 with the heat map's colours", name, mw, mh, len(colours))
	}
	b.screenshot(t, "large-figures-map.png")
	b.alive(t, "after the map")
	b.checkNoNetwork(t)
}
