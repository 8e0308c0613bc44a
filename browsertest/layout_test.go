package browsertest

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/cdproto/emulation"
	"github.com/chromedp/chromedp"
)

// layoutTabs are the views whose tabs the layout is checked on.
var layoutTabs = []string{"curve", "map", "plan", "check", "data", "share"}

// viewport sets the window's size in CSS pixels (one device pixel each) and waits for the
// page to lay itself out again.
func (b *browser) viewport(t *testing.T, w, h int64) {
	t.Helper()
	if err := chromedp.Run(b.ctx, emulation.SetDeviceMetricsOverride(w, h, 1, w < 700)); err != nil {
		t.Fatalf("viewport %dx%d: %v", w, h, err)
	}
	b.shareWait(t, fmt.Sprintf("the %dx%d layout", w, h), fmt.Sprintf(
		`new Promise(r=>requestAnimationFrame(()=>requestAnimationFrame(()=>r(innerWidth===%d))))`, w))
}

// overflow returns "" when the page fits its window's width (scrollWidth <= innerWidth) and
// nothing lies under a vertical scroll bar (scrollWidth <= clientWidth), else the widest
// elements.
func (b *browser) overflow(t *testing.T) string {
	t.Helper()
	return b.cdJS(t, `(()=>{const d=document.documentElement;if(d.scrollWidth<=innerWidth&&d.scrollWidth<=d.clientWidth)return "";
		const wide=[...document.querySelectorAll("body *")].filter(e=>e.getBoundingClientRect().right>d.clientWidth+0.5&&e.offsetParent!==null)
			.map(e=>e.tagName.toLowerCase()+(e.id?"#"+e.id:"")+(e.className&&typeof e.className==="string"?"."+e.className.split(" ").join("."):"")+" right "+Math.round(e.getBoundingClientRect().right));
		return "scrollWidth "+d.scrollWidth+", innerWidth "+innerWidth+", clientWidth "+d.clientWidth+": "+wide.slice(0,8).join("; ")})()`)
}

// covered returns the controls of the shown panel and the tabs that lie in the window but
// cannot be clicked because something else (a sticky panel) is on top of their centre.
func (b *browser) covered(t *testing.T) string {
	t.Helper()
	return b.cdJS(t, `(()=>{const out=[];
		const els=[...document.querySelectorAll(".tabs .tab, .panel:not([hidden]) button, .panel:not([hidden]) input, .panel:not([hidden]) select")];
		for(const e of els){if(e.offsetParent===null)continue;const r=e.getBoundingClientRect();
			const x=r.left+r.width/2,y=r.top+r.height/2;if(y<0||y>innerHeight||x<0||x>innerWidth)continue;
			const hit=document.elementFromPoint(x,y);if(!hit||!(hit===e||e.contains(hit)||hit.contains(e)))out.push((e.id||e.textContent.trim().slice(0,20))+" under "+(hit?hit.tagName.toLowerCase()+"."+hit.className:"nothing"))}
		return out.join("; ")})()`)
}

// seconds reads a view's data-seconds or data-figure-seconds.
func (b *browser) seconds(t *testing.T, view, attr string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(b.studyAttr(t, "[data-view="+view+"]", attr), 64)
	if err != nil {
		t.Fatalf("%s %s: %v", view, attr, err)
	}
	return v
}

// TestFigureLayoutAndViewports draws a 200-point curve, a 100 x 100 map and a plan (with its
// figure of the target), logs
// the views' own timings, and checks the layout at three window sizes: no tab scrolls
// sideways, the tabs and controls are clickable wherever the page is scrolled, the figures'
// text is at least 10 pixels tall, the pointer readout names what it reads (by touch too),
// and the curve's SVG saved from the page is the one the command line draws for the same
// scenario and study. Screenshots of every view at every size go to dist/screenshots.
func TestFigureLayoutAndViewports(t *testing.T) {
	b, _ := open(t)
	if state := b.settle(t); state != "ready" {
		t.Fatalf("data-state=%s: %s", state, b.text(t, ".problem"))
	}
	b.cdWorkers(t)
	dir := b.downloadsTo(t)
	b.viewport(t, 1366, 768)

	b.studyClick(t, "#tab-curve")
	b.studyWait(t, "[data-view=curve]", "data-run", 5*time.Second, "idle")
	if p := b.studyValue(t, "#curve-points"); p != "200" {
		b.typeInto(t, "#curve-points", "200")
	}
	b.studyClick(t, "#curve-run")
	if got := b.studyWait(t, "[data-view=curve]", "data-run", 60*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the sweep ended in %s: %s", got, b.text(t, "[data-view=curve] .problem"))
	}
	b.studyWait(t, "[data-view=curve]", "data-figure-seconds", 10*time.Second)
	cs, cf := b.seconds(t, "curve", "data-seconds"), b.seconds(t, "curve", "data-figure-seconds")
	t.Logf("200-point sweep: numbers %.3f s after the click, figure %.3f s (%.3f s after the numbers)", cs, cf, cf-cs)
	b.imageShown(t, "#curve-figure")

	// The saved SVG is the command line's for the scenario and study the page saves.
	_, svg := b.studyDownload(t, dir, "#curve-svg")
	b.studyClick(t, "#tab-share")
	b.shareWait(t, "the share view", `document.getElementById("share-save")!==null`)
	_, scen := b.studyDownload(t, dir, "#share-save")
	cli := hdriskCommand(t)
	sf := filepath.Join(t.TempDir(), "scenario.json")
	if err := os.WriteFile(sf, scen, 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(t.TempDir(), "cli.svg")
	if msg, err := exec.Command(cli, "sweep", sf, "--figure", out).CombinedOutput(); err != nil {
		t.Fatalf("hdrisk sweep --figure: %v\n%.500s", err, msg)
	}
	want, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	keep(t, "exported-curve.svg", svg)
	keep(t, "cli-curve.svg", want)
	if !bytes.Equal(svg, want) {
		t.Errorf("the page's SVG (%d bytes) differs from the command line's (%d bytes) for the same scenario and study", len(svg), len(want))
	}

	b.studyClick(t, "#tab-map")
	b.studyWait(t, "[data-view=map]", "data-run", 5*time.Second, "idle")
	b.typeInto(t, "#map-x-points", "100")
	b.typeInto(t, "#map-y-points", "100")
	b.studyClick(t, "#map-run")
	if got := b.studyWait(t, "[data-view=map]", "data-run", 80*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the map ended in %s: %s", got, b.text(t, "[data-view=map] .problem"))
	}
	b.studyWait(t, "[data-view=map]", "data-figure-seconds", 20*time.Second)
	ms, mf := b.seconds(t, "map", "data-seconds"), b.seconds(t, "map", "data-figure-seconds")
	t.Logf("100 x 100 map: numbers %.3f s after the click, figure %.3f s (%.3f s after the numbers)", ms, mf, mf-ms)
	b.imageShown(t, "#map-figure")

	b.studyClick(t, "#tab-plan")
	b.studyClick(t, "#plan-run")
	if got := b.studyWait(t, "[data-view=plan]", "data-run", 60*time.Second, "done", "error"); got != "done" {
		t.Fatalf("the plan ended in %s: %s", got, b.text(t, "[data-view=plan] .problem"))
	}
	b.imageShown(t, "#plan-figure")

	for _, vp := range [][2]int64{{1366, 768}, {1366, 900}, {820, 1180}, {390, 844}} {
		b.viewport(t, vp[0], vp[1])
		for _, tab := range layoutTabs {
			b.studyClick(t, "#tab-"+tab)
			b.shareWait(t, tab+" shown", fmt.Sprintf(`!document.getElementById("panel-%s").hidden`, tab))
			// The curve and map redraw for the new width when their tab is chosen.
			b.shareWait(t, "layout", `new Promise(r=>requestAnimationFrame(()=>requestAnimationFrame(()=>r(true))))`)
			if o := b.overflow(t); o != "" {
				t.Errorf("%dx%d, %s tab: %s", vp[0], vp[1], tab, o)
			}
			for _, y := range []string{"0", "innerHeight/2", "document.getElementById('panel-" + tab + "').getBoundingClientRect().top+scrollY-40"} {
				b.cdJS(t, "(scrollTo(0,"+y+"),'')")
				b.shareWait(t, "scrolled", `new Promise(r=>requestAnimationFrame(()=>r(true)))`)
				if c := b.covered(t); c != "" {
					t.Errorf("%dx%d, %s tab scrolled to %s: covered: %s", vp[0], vp[1], tab, y, c)
				}
			}
			b.cdJS(t, "(scrollTo(0,0),'')")
			if tab == "curve" || tab == "map" || tab == "plan" {
				b.screenshot(t, fmt.Sprintf("view-%s-%dx%d.png", tab, vp[0], vp[1]))
			}
		}
		// The figures' text: the displayed width against the drawn one gives its size on screen
		// (8 points of drawn text are 10.7 CSS pixels at the natural size).
		for _, fig := range []string{"curve", "map"} {
			b.studyClick(t, "#tab-"+fig)
			b.shareWait(t, fig+" figure", fmt.Sprintf(`(e=>e&&e.complete&&e.naturalWidth>0)(document.getElementById("%s-figure"))`, fig))
			r := b.cdJS(t, fmt.Sprintf(`(e=>String(e.getBoundingClientRect().width/e.naturalWidth))(document.getElementById("%s-figure"))`, fig))
			scale, _ := strconv.ParseFloat(r, 64)
			if px := 8 * 4.0 / 3 * scale; px < 10 {
				t.Errorf("%dx%d: the %s figure's smallest text shows %.1f px tall (scale %.2f)", vp[0], vp[1], fig, px, scale)
			}
		}
	}

	// The readout by touch, on the phone layout: it names the curve and draws the crosshair.
	b.studyClick(t, "#tab-curve")
	b.shareWait(t, "curve figure", `(e=>e&&e.complete&&e.naturalWidth>0)(document.getElementById("curve-figure"))`)
	b.cdJS(t, `(()=>{const o=document.querySelector("[data-view=curve] .figure-overlay");o.scrollIntoView({block:"center"});
		const r=o.getBoundingClientRect();
		o.dispatchEvent(new PointerEvent("pointerdown",{bubbles:true,pointerType:"touch",clientX:r.left+r.width*0.55,clientY:r.top+r.height*0.5}));return ""})()`)
	if err := chromedp.Run(b.ctx, chromedp.Poll(`document.getElementById("curve-readout").textContent.startsWith("this scenario: nearest computed point l1 = ")`, nil,
		chromedp.WithPollingTimeout(5*time.Second))); err != nil {
		t.Fatalf("a touch on the figure gave the readout %q: %v", b.text(t, "#curve-readout"), err)
	}
	b.shareWait(t, "the crosshair", `document.querySelectorAll("[data-view=curve] .crosshair.on").length===2`)
	cross := b.cdJS(t, `(()=>{const v=document.getElementById("curve-cross-v"),h=document.getElementById("curve-cross-h");
		return getComputedStyle(v).display+" "+v.style.left+" "+getComputedStyle(h).display+" "+h.style.top})()`)
	if f := strings.Fields(cross); len(f) != 4 || f[0] != "block" || f[2] != "block" || !strings.HasSuffix(f[1], "%") || !strings.HasSuffix(f[3], "%") {
		t.Errorf("the crosshair is not placed: %q", cross)
	}
	t.Logf("crosshair: %s", cross)
	t.Logf("touch readout: %s", b.text(t, "#curve-readout"))
	b.screenshot(t, "view-curve-touch-390x844.png")
	b.alive(t, "after the layout checks")
}

// hdriskCommand builds the command line into a temporary folder.
func hdriskCommand(t *testing.T) string {
	t.Helper()
	exe := filepath.Join(t.TempDir(), "hdrisk")
	cmd := exec.Command("go", "build", "-o", exe, "./engine/cmd/hdrisk")
	cmd.Dir = ".."
	if msg, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("building hdrisk: %v\n%s", err, strings.TrimSpace(string(msg)))
	}
	return exe
}
