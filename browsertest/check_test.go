package browsertest

import (
	"bufio"
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"gonum.org/v1/gonum/mat"

	"hdrisk/engine/data"
	"hdrisk/engine/scenario"
	"hdrisk/protocol"
	"hdrisk/ui"
	"hdrisk/wasm/job"
)

// cdWorkers waits for the page's compute pool.
func (b *browser) cdWorkers(t *testing.T) {
	t.Helper()
	var size int
	if err := chromedp.Run(b.ctx, chromedp.Poll(`typeof hdriskJobs === "object" && hdriskJobs.size()`, &size,
		chromedp.WithPollingTimeout(30*time.Second))); err != nil || size < 1 {
		t.Fatalf("the worker pool never appeared: %v (size %d)", err, size)
	}
}

// cdJS runs a script and returns its value as text.
func (b *browser) cdJS(t *testing.T, script string) string {
	t.Helper()
	var out any
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(script, &out)); err != nil {
		t.Fatalf("%s: %v", script, err)
	}
	if out == nil {
		return ""
	}
	return fmt.Sprint(out)
}

// cdChoose picks value in the menu sel as a person would, firing its change event.
func (b *browser) cdChoose(t *testing.T, sel, value string) {
	t.Helper()
	ok := b.cdJS(t, fmt.Sprintf(`(e=>{if(!e)return false;e.value=%q;e.dispatchEvent(new Event("change",{bubbles:true}));return e.value===%q})(document.querySelector(%q))`, value, value, sel))
	if ok != "true" {
		t.Fatalf("choosing %q in %s failed", value, sel)
	}
}

// cdClick presses a button, failing when it is missing or disabled.
func (b *browser) cdClick(t *testing.T, sel string) {
	t.Helper()
	ok := b.cdJS(t, fmt.Sprintf(`(e=>{if(!e||e.disabled)return false;e.click();return true})(document.querySelector(%q))`, sel))
	if ok != "true" {
		t.Fatalf("button %s is missing or disabled", sel)
	}
}

// cdTab opens the view's tab when the page has tabs.
func (b *browser) cdTab(t *testing.T, name string) {
	t.Helper()
	if b.cdJS(t, fmt.Sprintf(`(e=>{if(e){e.click();return true}return false})(document.getElementById("tab-%s"))`, name)) == "true" {
		b.shareWait(t, "the "+name+" tab", fmt.Sprintf(`document.getElementById("tab-%s").getAttribute("aria-selected")==="true"`, name))
	}
}

// cdWaitRun polls the data-run of sel until it leaves "running" (and idle, once started) and
// returns it with the progress lines seen on the way.
func (b *browser) cdWaitRun(t *testing.T, sel, statusSel string, timeout time.Duration) (string, []string) {
	t.Helper()
	deadline := time.Now().Add(timeout)
	var seen []string
	for time.Now().Before(deadline) {
		out := b.cdJS(t, fmt.Sprintf(`(function(){const e=document.querySelector(%q);const s=document.querySelector(%q);return (e?e.getAttribute("data-run"):"missing")+"|"+(s?s.textContent:"")})()`, sel, statusSel))
		run, status, _ := strings.Cut(out, "|")
		if status != "" && (len(seen) == 0 || seen[len(seen)-1] != status) {
			seen = append(seen, status)
		}
		if run != "running" && run != "idle" {
			return run, seen
		}
		time.Sleep(50 * time.Millisecond)
	}
	t.Fatalf("%s still running after %v; progress seen: %q", sel, timeout, seen)
	return "", nil
}

func cdNum(t *testing.T, figs map[string]string, name string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(figs[name], 64)
	if err != nil {
		t.Fatalf("figure %s = %q is not a number (figures: %v)", name, figs[name], figs)
	}
	return v
}

func cdLassoPage(t *testing.T) (*browser, *ui.Model) {
	b, _ := open(t)
	if state := b.settle(t); state != "ready" {
		t.Fatalf("data-state=%s: %s", state, b.text(t, ".problem"))
	}
	b.cdWorkers(t)
	b.cdChoose(t, "#pick-penalty", "l1")
	if state := b.settle(t); state != "ready" {
		t.Fatalf("after choosing the LASSO: data-state=%s: %s", state, b.text(t, ".problem"))
	}
	m := ui.NewModel()
	if err := m.SetKind("penalty", "l1"); err != nil {
		t.Fatal(err)
	}
	return b, m
}

// TestCheckInPage runs the finite-size check of the budget (n = 500, 20 trials, LASSO) in
// the page, logs its time against the 10 s budget and the native time (a logged figure, not
// a test: the machine's load decides it), compares its numbers with the same check run
// natively, and cancels a long one midway.
func TestCheckInPage(t *testing.T) {
	b, m := cdLassoPage(t)
	b.cdTab(t, "check")
	if b.cdJS(t, `document.querySelector("[data-view=check]").getAttribute("data-run")`) != "idle" {
		t.Fatalf("the check view is not idle at start")
	}
	b.cdJS(t, `performance.mark("hdrisk:check-click"), ""`)
	start := time.Now()
	b.cdClick(t, "#check-run")
	run, seen := b.cdWaitRun(t, "[data-view=check]", "[data-view=check] [role=status]", 60*time.Second)
	elapsed := time.Since(start)
	if run != "done" {
		t.Fatalf("check ended %s: %s", run, b.text(t, "[data-view=check] .problem"))
	}
	t.Logf("finite-size check n = 500, 20 trials, LASSO (cd), in the page: %v from the click to the result (budget 10 s); progress seen: %q",
		elapsed.Round(time.Millisecond), seen)
	trialSeen := false
	for _, s := range seen {
		trialSeen = trialSeen || (strings.HasPrefix(s, "Trial ") && strings.Contains(s, " of 20"))
	}
	if !trialSeen {
		t.Errorf("no progress line like \"Trial 7 of 20\" was shown: %q", seen)
	}
	// Where the time went: the pool's marks of each job (posted, progress, end) after the click,
	// in ms from it, and the render the result waited for.
	t.Logf("page marks from the click: %s", b.cdJS(t, `(()=>{const ms=performance.getEntriesByType("mark");`+
		`const c=ms.filter(m=>m.name==="hdrisk:check-click").pop().startTime;`+
		`return ms.filter(m=>m.startTime>=c&&m.name!=="hdrisk:check-click").map(m=>m.name.replace("hdrisk:","")+" "+(m.startTime-c).toFixed(0)).join(", ")})()`))
	b.screenshot(t, "check-done.png")
	figs := b.figures(t)
	// The same check natively: identical draws (PCG seeded per trial) and the same solver.
	scen, err := m.JSON()
	if err != nil {
		t.Fatal(err)
	}
	t0 := time.Now()
	native, err := job.Check(protocol.CheckArgs{Scenario: scen, N: 500, Trials: 20, Seed: 1, Solver: "cd", Factors: "fast"}, nil)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("the same check natively in one process: %v (goal: the page within 2x); in the page %v on %s workers, %.3f s of it in the workers' jobs (summed over the parts)",
		time.Since(t0).Round(time.Millisecond), elapsed.Round(time.Millisecond), b.cdJS(t, `String(hdriskJobs.size())`), cdNum(t, figs, "check_seconds"))
	for name, w := range map[string]float64{"check_mean_mse": float64(native.MeanMSE), "check_stderr": float64(native.StdErr),
		"check_predicted_mse": float64(native.PredictedMSE), "check_tpp": float64(native.TPP.Mean), "check_predicted_fdp": float64(native.FDP.Predicted)} {
		if got := cdNum(t, figs, name); math.Abs(got-w) > 1e-6*math.Max(math.Abs(w), 1e-12) {
			t.Errorf("%s = %v in the page, %v natively", name, got, w)
		}
	}
	if figs["check_converged"] != strconv.FormatBool(native.Converged) {
		t.Errorf("check_converged = %s, natively %v", figs["check_converged"], native.Converged)
	}
	// The orthogonal design's check asked of cd runs prox matrix-free (simulate's cdNote):
	// the page shows the result's solver note, as text a reader reaches (role=note).
	if native.SolverNote == "" {
		t.Fatalf("the native check has no solver note; the test expects cd to run as prox here")
	}
	shown := b.cdJS(t, `(e=>e?e.getAttribute("role")+"|"+e.querySelector("[data-note=solver]").textContent:"missing")(document.getElementById("check-notes"))`)
	if shown != "note|Solver: "+native.SolverNote+"." {
		t.Errorf("the solver note shown is %q, natively %q", shown, native.SolverNote)
	}
	b.imageShown(t, "#check-figure")
	// The drawn figure fits a phone's width (it once kept its own width and widened the page).
	b.viewport(t, 390, 844)
	if o := b.overflow(t); o != "" {
		t.Errorf("the check view with its figure at 390 px: %s", o)
	}
	b.viewport(t, 1280, 1000)

	// A long check cancelled midway: the view says so and nothing arrives later.
	b.typeInto(t, "#check-trials", "400")
	b.cdClick(t, "#check-run")
	deadline := time.Now().Add(30 * time.Second)
	for !strings.HasPrefix(b.text(t, "[data-view=check] [role=status]"), "Trial ") {
		if time.Now().After(deadline) {
			t.Fatalf("the long check never reported a trial")
		}
		time.Sleep(50 * time.Millisecond)
	}
	b.screenshot(t, "check-running.png")
	b.cdClick(t, "#check-cancel")
	b.shareWait(t, "the check to stop", `document.querySelector("[data-view=check]").getAttribute("data-run")!=="running"`)
	if run := b.cdJS(t, `document.querySelector("[data-view=check]").getAttribute("data-run")`); run != "cancelled" {
		t.Errorf("after cancel data-run=%s", run)
	}
	if st := b.text(t, "[data-view=check] .note"); !strings.Contains(st, "Cancelled") {
		t.Errorf("the view does not say it was cancelled: %q", st)
	}
	// The scenario carries the settings of the last check (study.check).
	b.checkNoNetwork(t)
}

// cdGaussianCSV writes an m x n matrix of independent N(0, 1) entries as CSV and returns it.
func cdGaussianCSV(t *testing.T, dir string, m, n int) (string, *mat.Dense) {
	rng := rand.New(rand.NewPCG(11, 12))
	a := mat.NewDense(m, n, nil)
	path := filepath.Join(dir, fmt.Sprintf("invented-gaussian-%dx%d.csv", m, n))
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	w := bufio.NewWriter(f)
	for i := range m {
		for j := range n {
			// 9 significant digits keep the file at about 30 MB; the entries used natively
			// are the ones written, read back the same way.
			s := strconv.FormatFloat(rng.NormFloat64(), 'e', 8, 64)
			v, _ := strconv.ParseFloat(s, 64)
			a.Set(i, j, v)
			if j > 0 {
				w.WriteByte(',')
			}
			w.WriteString(s)
		}
		w.WriteByte('\n')
	}
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	return path, a
}

// TestDataInPage loads a 500 x 1000 matrix through the file box, logs the time of its
// singular values in the page, uses it as the design and checks the page's figures against
// the native engine for the same empirical-sv scenario.
func TestDataInPage(t *testing.T) {
	dir := t.TempDir()
	path, a := cdGaussianCSV(t, dir, 500, 1000)
	info, _ := os.Stat(path)
	b, m := cdLassoPage(t)
	b.cdTab(t, "data")
	before := b.figures(t)

	start := time.Now()
	if err := chromedp.Run(b.ctx, chromedp.SetUploadFiles("#data-design-file", []string{path}, chromedp.ByQuery)); err != nil {
		t.Fatal(err)
	}
	run, seen := b.cdWaitRun(t, "[data-part=design]", "[data-part=design] [role=status]", 120*time.Second)
	elapsed := time.Since(start)
	if run != "done" {
		t.Fatalf("reading the matrix ended %s: %s", run, b.text(t, "[data-part=design] .problem"))
	}
	figs := b.figures(t)
	t.Logf("500 x 1000 Gaussian matrix (%.1f MB of CSV) in the page: %v from choosing the file to the summary (%s); progress seen: %q",
		float64(info.Size())/1e6, elapsed.Round(time.Millisecond), b.text(t, "[data-figure=data_svd_seconds]"), seen)
	b.screenshot(t, "data-matrix.png")

	sv, err := data.SingularValues(context.Background(), a, nil)
	if err != nil {
		t.Fatal(err)
	}
	if figs["data_rows"] != "500" || figs["data_alpha"] != "0.5" || figs["data_rank"] != "500" {
		t.Errorf("summary rows %s alpha %s rank %s", figs["data_rows"], figs["data_alpha"], figs["data_rank"])
	}
	if got, want := cdNum(t, figs, "data_condition"), sv[0]/sv[len(sv)-1]; math.Abs(got-want) > 1e-9*want {
		t.Errorf("condition %v in the page, %v natively (gonum SVD)", got, want)
	}

	b.cdClick(t, "#data-design-use")
	if state := b.settle(t); state != "ready" {
		t.Fatalf("after using the matrix: data-state=%s: %s", state, b.text(t, ".problem"))
	}
	after := b.figures(t)
	if after["mse"] == before["mse"] {
		t.Errorf("the figures did not change with the design (mse %s)", after["mse"])
	}
	ch := m.Check()
	if ch.Err != nil {
		t.Fatal(ch.Err)
	}
	// The values the editor now holds (full precision, or rounded so that its box can show
	// them, as the view says) are within rounding of the native singular values, and the
	// figures equal the native engine's for that same scenario.
	t.Logf("the view says: %s", b.text(t, "[data-part=design] [role=status]"))
	var used []float64
	for _, w := range strings.Split(b.cdJS(t, `document.getElementById("in-design-empirical-sv-values").value`), ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(w), 64)
		if err != nil {
			t.Fatalf("the editor's list of singular values holds %q", w)
		}
		used = append(used, v)
	}
	if len(used) != len(sv) {
		t.Fatalf("the editor holds %d singular values, the matrix has %d", len(used), len(sv))
	}
	for i := range sv {
		if math.Abs(used[i]-sv[i]) > 1e-6*sv[i] {
			t.Fatalf("singular value %d: %v in the editor, %v natively", i, used[i], sv[i])
		}
	}
	s := ch.Scenario
	s.Design = scenario.Design{Shape: "empirical-sv", Alpha: 0.5, Scale: s.Design.Scale, Lists: map[string][]float64{"values": used}}
	if err := m.Load(s); err != nil {
		t.Fatal(err)
	}
	b.compareNative(t, "design from a 500 x 1000 matrix", m, after)
	b.screenshot(t, "data-used.png")
	b.checkNoNetwork(t)
}

// TestSpectrumInPage1500x3000 reads the size the issue measured (1500 x 3000, about 70 MB of
// CSV) through the file box and logs the time of each step the page shows, beside the same
// singular values computed natively; the summary must match them. It is a benchmark of
// minutes on a loaded machine, run when HDRISK_BENCH=1 is set (the other data tests cover
// the same path at a smaller size).
func TestSpectrumInPage1500x3000(t *testing.T) {
	if os.Getenv("HDRISK_BENCH") != "1" {
		t.Skip("a benchmark: set HDRISK_BENCH=1 to run it")
	}
	dir := t.TempDir()
	path, a := cdGaussianCSV(t, dir, 1500, 3000)
	info, _ := os.Stat(path)
	t0 := time.Now()
	sv, err := data.SingularValues(context.Background(), a, nil)
	if err != nil {
		t.Fatal(err)
	}
	nativeTime := time.Since(t0)
	b, _ := cdLassoPage(t)
	b.cdTab(t, "data")
	start := time.Now()
	if err := chromedp.Run(b.ctx, chromedp.SetUploadFiles("#data-design-file", []string{path}, chromedp.ByQuery)); err != nil {
		t.Fatal(err)
	}
	var steps []string
	deadline := time.Now().Add(170 * time.Second)
	for {
		out := b.cdJS(t, `(function(){const e=document.querySelector("[data-part=design]");const s=document.querySelector("[data-part=design] [role=status]");return e.getAttribute("data-run")+"|"+(s?s.textContent:"")})()`)
		run, status, _ := strings.Cut(out, "|")
		if status != "" && (len(steps) == 0 || !strings.HasPrefix(steps[len(steps)-1], status)) {
			steps = append(steps, fmt.Sprintf("%s at %.1f s", status, time.Since(start).Seconds()))
		}
		if run != "running" && run != "idle" {
			if run != "done" {
				t.Fatalf("reading the matrix ended %s: %s", run, b.text(t, "[data-part=design] .problem"))
			}
			break
		}
		if time.Now().After(deadline) {
			t.Fatalf("still running after 170 s: %q", steps)
		}
		time.Sleep(100 * time.Millisecond)
	}
	figs := b.figures(t)
	t.Logf("1500 x 3000 Gaussian matrix (%.1f MB of CSV): %v in the page from choosing the file to the summary (%s; goal 20 s), %v natively for the singular values alone; steps shown: %q",
		float64(info.Size())/1e6, time.Since(start).Round(time.Millisecond), b.text(t, "[data-figure=data_svd_seconds]"), nativeTime.Round(time.Millisecond), steps)
	if figs["data_rows"] != "1500" || figs["data_rank"] != "1500" {
		t.Errorf("summary rows %s rank %s", figs["data_rows"], figs["data_rank"])
	}
	if got, want := cdNum(t, figs, "data_condition"), sv[0]/sv[len(sv)-1]; math.Abs(got-want) > 1e-9*want {
		t.Errorf("condition %v in the page, %v natively", got, want)
	}
	b.checkNoNetwork(t)
}

// TestDataErrorsAndSignalInPage feeds a bad file (the message names the line and the open
// scenario stays) and then fits pasted samples and uses the fit as the signal. It is apart
// from TestDataInPage so that each stays well inside the browser's time limit.
func TestDataErrorsAndSignalInPage(t *testing.T) {
	dir := t.TempDir()
	b, _ := cdLassoPage(t)
	b.cdTab(t, "data")
	after := b.figures(t)

	// A file with a short row on line 3: the message names the line, the scenario stays.
	bad := filepath.Join(dir, "invented-bad.csv")
	if err := os.WriteFile(bad, []byte("1,2,3\n4,5,6\n7,8\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := chromedp.Run(b.ctx, chromedp.SetUploadFiles("#data-design-file", []string{bad}, chromedp.ByQuery)); err != nil {
		t.Fatal(err)
	}
	run, _ := b.cdWaitRun(t, "[data-part=design]", "[data-part=design] [role=status]", 20*time.Second)
	msg := b.text(t, "[data-part=design] .problem")
	if run != "error" || !strings.Contains(msg, "line 3") || !strings.Contains(msg, "invented-bad.csv") {
		t.Errorf("bad file: data-run=%s message %q", run, msg)
	}
	if figs := b.figures(t); figs["mse"] != after["mse"] {
		t.Errorf("a bad file changed the scenario's figures: mse %s, was %s", figs["mse"], after["mse"])
	}
	b.screenshot(t, "data-bad-file.png")

	// Pasted samples fitted by a two-component mixture become the signal.
	var samples strings.Builder
	rng := rand.New(rand.NewPCG(13, 14))
	for range 400 {
		v := 0.1 * rng.NormFloat64()
		if rng.Float64() < 0.2 {
			v = 2 + rng.NormFloat64()
		}
		fmt.Fprintf(&samples, "%v\n", v)
	}
	b.cdChoose(t, "#data-method", "gauss-mixture")
	if err := chromedp.Run(b.ctx, chromedp.SetValue("#data-signal-text", samples.String(), chromedp.ByQuery)); err != nil {
		t.Fatal(err)
	}
	b.cdJS(t, `document.getElementById("data-signal-text").dispatchEvent(new Event("change",{bubbles:true}));true`)
	b.cdClick(t, "#data-signal-read")
	run, _ = b.cdWaitRun(t, "[data-part=signal]", "[data-part=signal] [role=status]", 30*time.Second)
	if run != "done" {
		t.Fatalf("fitting the samples ended %s: %s", run, b.text(t, "[data-part=signal] .problem"))
	}
	if figs := b.figures(t); figs["data_samples"] != "400" || figs["data_components"] != "2" {
		t.Errorf("samples %s, components %s", figs["data_samples"], figs["data_components"])
	}
	b.cdClick(t, "#data-signal-use")
	if state := b.settle(t); state != "ready" {
		t.Fatalf("after using the fitted signal: data-state=%s: %s", state, b.text(t, ".problem"))
	}
	if law := b.cdJS(t, `document.getElementById("pick-signal").value`); law != "gauss-mixture" {
		t.Errorf("the signal menu shows %q after using the fit", law)
	}
	b.screenshot(t, "data-signal.png")
	b.checkNoNetwork(t)
}

// cdMatrixMarket writes an invented m x n matrix with correlated columns (an AR(1) recursion
// along each row) in Matrix Market array format and returns its path and text.
func cdMatrixMarket(t *testing.T, dir string, m, n int) (string, string) {
	rng := rand.New(rand.NewPCG(21, 22))
	a := make([]float64, m*n) // column-major, as the format lists entries
	for i := 0; i < m; i++ {
		prev := rng.NormFloat64()
		for j := 0; j < n; j++ {
			if j > 0 {
				prev = 0.7*prev + math.Sqrt(1-0.49)*rng.NormFloat64()
			}
			a[j*m+i] = prev / math.Sqrt(float64(m))
		}
	}
	var b strings.Builder
	fmt.Fprintf(&b, "%%%%MatrixMarket matrix array real general\n%% invented for a browser test\n%d %d\n", m, n)
	for _, v := range a {
		fmt.Fprintf(&b, "%.8g\n", v)
	}
	path := filepath.Join(dir, fmt.Sprintf("invented-ar1-%dx%d.mtx", m, n))
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return path, b.String()
}

// TestMatrixCheckInPage uploads a matrix through the data tab, uses it as the design (m/n is
// then locked to its shape), runs the check with the matrix itself to the end on the page's
// workers, and compares the verdict with the same check run natively.
func TestMatrixCheckInPage(t *testing.T) {
	dir := t.TempDir()
	const m, n, trials = 60, 120, 40
	path, text := cdMatrixMarket(t, dir, m, n)
	b, model := cdLassoPage(t)
	b.cdTab(t, "data")
	if err := chromedp.Run(b.ctx, chromedp.SetUploadFiles("#data-design-file", []string{path}, chromedp.ByQuery)); err != nil {
		t.Fatal(err)
	}
	if run, _ := b.cdWaitRun(t, "[data-part=design]", "[data-part=design] [role=status]", 30*time.Second); run != "done" {
		t.Fatalf("reading the matrix ended %s: %s", run, b.text(t, "[data-part=design] .problem"))
	}
	b.cdClick(t, "#data-design-use")
	if state := b.settle(t); state != "ready" {
		t.Fatalf("after using the matrix: data-state=%s: %s", state, b.text(t, ".problem"))
	}
	if got := b.cdJS(t, `(e=>e?e.readOnly+"|"+e.value:"missing")(document.getElementById("in-design-alpha"))`); got != "true|0.5" {
		t.Errorf("m/n after using the matrix: readOnly|value = %s, want locked at 0.5", got)
	}
	if figs := b.figures(t); figs["data_alpha_locked"] != "true" {
		t.Errorf("the data tab does not show m/n locked: %v", figs["data_alpha_locked"])
	}
	var used []float64
	for _, w := range strings.Split(b.cdJS(t, `document.getElementById("in-design-empirical-sv-values").value`), ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(w), 64)
		if err != nil {
			t.Fatalf("the editor's list of singular values holds %q", w)
		}
		used = append(used, v)
	}

	b.cdTab(t, "check")
	if got := b.cdJS(t, `(c=>c?String(c.checked):"missing")(document.getElementById("check-with-matrix"))+"|"+document.getElementById("check-n").value`); got != "true|120" {
		t.Fatalf("check view with the matrix: checked|n = %s", got)
	}
	b.typeInto(t, "#check-trials", strconv.Itoa(trials))
	b.cdJS(t, `performance.mark("hdrisk:check-click"), ""`)
	start := time.Now()
	b.cdClick(t, "#check-run")
	run, seen := b.cdWaitRun(t, "[data-view=check]", "[data-view=check] [role=status]", 120*time.Second)
	if run != "done" {
		t.Fatalf("check ended %s: %s", run, b.text(t, "[data-view=check] .problem"))
	}
	t.Logf("check with a %d x %d matrix, %d trials (each with the matrix and with random rotations): %v in the page on %s workers; progress seen: %q",
		m, n, trials, time.Since(start).Round(time.Millisecond), b.cdJS(t, `String(hdriskJobs.size())`), seen)
	b.screenshot(t, "check-matrix.png")
	figs := b.figures(t)
	if figs["check_agrees"] != "true" && figs["check_agrees"] != "false" {
		t.Fatalf("no verdict shown: %v", figs)
	}
	t.Logf("verdict: %s", b.text(t, "[data-figure=check_agrees]"))

	ch := model.Check()
	if ch.Err != nil {
		t.Fatal(ch.Err)
	}
	s := ch.Scenario
	s.Design = scenario.Design{Shape: "empirical-sv", Alpha: 0.5, Scale: s.Design.Scale, Lists: map[string][]float64{"values": used}}
	if err := model.Load(s); err != nil {
		t.Fatal(err)
	}
	scen, err := model.JSON()
	if err != nil {
		t.Fatal(err)
	}
	native, err := job.Check(protocol.CheckArgs{Scenario: scen, N: n, Trials: trials, Seed: 1, Solver: "cd", Factors: "fast", Matrix: text}, nil)
	if err != nil {
		t.Fatal(err)
	}
	k := native.Comparison
	for name, w := range map[string]float64{"check_matrix_mean_mse": float64(k.MatrixMeanMSE), "check_rotated_mean_mse": float64(k.RotatedMeanMSE),
		"check_z": float64(k.Z), "check_mean_mse": float64(native.MeanMSE)} {
		if got := cdNum(t, figs, name); math.Abs(got-w) > 1e-6*math.Max(math.Abs(w), 1e-12) {
			t.Errorf("%s = %v in the page, %v natively", name, got, w)
		}
	}
	if figs["check_agrees"] != strconv.FormatBool(k.Agrees) {
		t.Errorf("check_agrees = %s in the page, %v natively", figs["check_agrees"], k.Agrees)
	}
	b.checkNoNetwork(t)
}
