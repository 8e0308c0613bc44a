package ui

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"math"
	"reflect"
	"strings"
	"testing"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/plot"
	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
	"hdrisk/protocol"
	"hdrisk/wasm/job"
)

// queueJobs is a fake ui.Jobs that queues jobs like the worker pool and runs them natively
// (the code a worker runs) when flushed, so that tests can cancel jobs still queued.
type queueJobs struct {
	queue   []*queued
	started []string
}

type queued struct {
	kind      string
	args      any
	progress  func(int, int)
	done      func([]byte, error)
	cancelled bool
}

func (j *queueJobs) Start(kind string, args any, progress func(int, int), done func([]byte, error)) func() {
	q := &queued{kind: kind, args: args, progress: progress, done: done}
	j.queue = append(j.queue, q)
	j.started = append(j.started, kind)
	return func() { q.cancelled = true }
}

// flush runs the queued jobs in order, including jobs they queue, and returns how many ran.
func (j *queueJobs) flush() int {
	n := 0
	for len(j.queue) > 0 {
		q := j.queue[0]
		j.queue = j.queue[1:]
		if q.cancelled {
			continue
		}
		n++
		raw, err := json.Marshal(q.args)
		if err != nil {
			q.done(nil, err)
			continue
		}
		var last protocol.Reply
		job.Run(protocol.Request{Kind: q.kind, Args: raw}, func(r protocol.Reply) {
			if r.Type == protocol.Progress && q.progress != nil && !q.cancelled {
				q.progress(r.Done, r.Total)
			}
			last = r
		})
		if q.cancelled {
			continue
		}
		if last.Type == protocol.Failed {
			q.done(nil, errors.New(last.Error))
		} else {
			q.done(last.Result, nil)
		}
	}
	return n
}

// keepBrowser is a fake ui.Browser that keeps downloads.
type keepBrowser struct {
	fakeImages
	names []string
	files map[string][]byte
}

func (b *keepBrowser) Address() string                 { return "file:///hdrisk.html" }
func (b *keepBrowser) Fragment() string                { return "" }
func (b *keepBrowser) SetFragment(string, bool)        {}
func (b *keepBrowser) OnFragment(func(string))         {}
func (b *keepBrowser) Copy(_ string, done func(error)) { done(nil) }
func (b *keepBrowser) Load(string) (string, bool)      { return "", false }
func (b *keepBrowser) Store(string, string) error      { return nil }
func (b *keepBrowser) Download(name, _ string, data []byte) error {
	if b.files == nil {
		b.files = map[string][]byte{}
	}
	b.names = append(b.names, name)
	b.files[name] = data
	return nil
}
func (b *keepBrowser) ReadFile(_ string, _ int64, done func(string, []byte, error)) {
	done("", nil, errors.New("no file"))
}

// modelOf loads an invented scenario into a new editor model.
func modelOf(t *testing.T, text string) *Model {
	t.Helper()
	s, err := scenario.Decode([]byte(text))
	if err != nil {
		t.Fatal(err)
	}
	m := NewModel()
	if err := m.Load(s); err != nil {
		t.Fatal(err)
	}
	if ch := m.Check(); ch.Err != nil {
		t.Fatal(ch.Err)
	}
	return m
}

const lassoScenario = `{"kind":"hdrisk.scenario","version":1,"title":"invented example",` +
	`"design":{"shape":"orthogonal","alpha":0.4,"scale":"rows"},` +
	`"signal":{"law":"bernoulli-gauss","density":0.05,"variance":1},` +
	`"noise":{"variance":0.001},"penalty":{"kind":"l1","l1":0.05}}`

func TestCurveSweepMatchesEngineWithBestAndBayes(t *testing.T) {
	m := modelOf(t, lassoScenario)
	jobs, br := &queueJobs{}, &keepBrowser{}
	c := &CurveView{Model: m, Jobs: jobs, Browser: br}
	c.curveInit()
	if c.Axis().Over != "l1" || !c.Axis().Log || c.Axis().Points != "200" {
		t.Fatalf("the proposed sweep should be 200 log-spaced values of l1: %+v", c.Axis())
	}
	for k, v := range map[string]string{"from": "0.001", "to": "1", "points": "60"} {
		if err := c.Set(k, v); err != nil {
			t.Fatal(err)
		}
	}
	c.Start()
	if c.Run() != RunRunning || c.Problem() != "" {
		t.Fatalf("run %s, problem %q", c.Run(), c.Problem())
	}
	if got := strings.Join(jobs.started, ","); got != "sweep,best,bayes" {
		t.Errorf("jobs started: %s", got)
	}
	jobs.flush()
	if c.Run() != RunDone {
		t.Fatalf("run %s after the jobs, problem %q", c.Run(), c.Problem())
	}
	s, _ := scenario.Decode([]byte(lassoScenario))
	want, err := study.Sweep(context.Background(), s, study.SweepSpec{Axis: study.Axis{Over: "l1", From: 1e-3, To: 1, Points: 60, Log: true}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	got := c.current.Points
	if len(got) != len(want) {
		t.Fatalf("%d points, want %d", len(got), len(want))
	}
	for i := range want {
		if got[i].X != want[i].X || got[i].Result.MSE != want[i].Result.MSE || got[i].OK() != want[i].OK() {
			t.Errorf("point %d: view (%g, %g), engine (%g, %g)", i, got[i].X, got[i].Result.MSE, want[i].X, want[i].Result.MSE)
		}
	}
	wb, err := study.Best(context.Background(), s, study.BestSpec{Over: "l1"})
	if err != nil {
		t.Fatal(err)
	}
	ans := map[string]string{}
	for _, a := range c.Answers() {
		ans[a[0]] = a[1]
	}
	if ans["curve_best_value"] != full(wb.Value) || ans["curve_bayes_nmse_db"] == "" || ans["curve_seconds"] == "" || c.FigureSeconds() == "0" {
		t.Errorf("answers %v; engine best %v", ans, wb.Value)
	}
	spec, ok := c.figureSpec()
	if !ok || len(spec.VLines) != 1 || spec.VLines[0].At != wb.Value || len(spec.HLines) != 1 {
		t.Errorf("the figure should carry the best marker at %g and the Bayes line: %+v %+v", wb.Value, spec.VLines, spec.HLines)
	}
	// No convex estimator beats the Bayes-optimal error (docs/method.md section 4).
	var bayes float64
	for _, a := range c.Answers() {
		if a[0] == "curve_bayes_nmse_db" {
			bayes = float64(c.bayes.Optimal.NMSEdB)
		}
	}
	if bayes > wb.Result.NMSEdB+1e-9 {
		t.Errorf("Bayes-optimal %g dB above the best LASSO %g dB", bayes, wb.Result.NMSEdB)
	}
	if c.FigureURL() == "" {
		t.Fatalf("no figure: %q", c.FigureProblem())
	}
	br.shown(t, "curve", c.FigureURL())
	// The settings travel with the scenario.
	st := m.Check().Scenario.Study
	if st == nil || st.View != "curve" || st.Sweep == nil || !reflect.DeepEqual(*st.Sweep, scenario.Sweep{Over: "l1", From: 1e-3, To: 1, Points: 60, Log: true}) ||
		st.Best == nil || st.Best.Over != "l1" {
		t.Fatalf("study not saved: %+v", st)
	}
	ch := m.Check()
	back, err := scenario.Decode(ch.JSON)
	if err != nil || back.Study == nil || back.Study.Sweep == nil || back.Study.Sweep.Points != 60 {
		t.Fatalf("study does not survive the file: %v %+v", err, back.Study)
	}
	c2 := &CurveView{Model: m}
	c2.curveInit()
	if c2.Axis().Points != "60" || c2.Axis().From != "0.001" {
		t.Errorf("a new view should start from study.sweep: %+v", c2.Axis())
	}

	// Readout: the middle of the data area reads the nearest computed point, naming its
	// curve, with the crosshair on it.
	fr := c.box.frame
	c.box.pointAt((fr.Left+fr.Right)/2*600, (fr.Top+fr.Bottom)/2*400, 600, 400, c.say)
	if !strings.Contains(c.Readout(), "l1 = ") || !strings.HasPrefix(c.Readout(), "this scenario: nearest computed point ") || !c.crossOn() {
		t.Errorf("readout %q, crosshair %v", c.Readout(), c.crossOn())
	}
	c.box.pointAt(1, 1, 600, 400, c.say)
	if c.Readout() != "" {
		t.Errorf("outside the data area the readout should be empty, not %q", c.Readout())
	}

	// Exports.
	for _, what := range []string{"csv", "svg", "png"} {
		c.Export(what)
	}
	jobs.flush()
	if c.Problem() != "" || len(br.names) != 3 {
		t.Fatalf("exports: %v, problem %q", br.names, c.Problem())
	}
	rows, err := csv.NewReader(bytes.NewReader(br.files["hdrisk-curve.csv"])).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 61 || rows[0][0] != "curve" || rows[0][1] != "l1" || rows[1][0] != c.current.Label {
		t.Errorf("CSV: %d rows, header %q, first %q", len(rows), rows[0], rows[1])
	}
	if !bytes.Equal(br.files["hdrisk-curve.svg"], br.held[c.FigureURL()]) {
		t.Error("the SVG file is not the figure shown")
	}
	// The PNG is the SVG drawn at twice the CSS pixels: 480 pt = 640 px -> 1280 pixels.
	if w, h := pngSize(t, br.files["hdrisk-curve.png"]); w != 1280 || h != 800 {
		t.Errorf("PNG of %d x %d pixels, want 1280 x 800", w, h)
	}
}

// With a vanishing ridge the error along m/n peaks at the interpolation threshold m/n = 1
// (the double descent; e.g. Hastie, Montanari, Rosset & Tibshirani 2022, Ann. Statist. 50,
// "Surprises in high-dimensional ridgeless least squares interpolation", Fig. 1).
func TestCurveShowsDoubleDescentPeak(t *testing.T) {
	m := modelOf(t, `{"kind":"hdrisk.scenario","version":1,"title":"invented example",`+
		`"design":{"shape":"gaussian","alpha":1.05,"scale":"rows"},"signal":{"law":"gauss","variance":1},`+
		`"noise":{"variance":0.01},"penalty":{"kind":"ridge","l2":0.0001}}`)
	jobs := &queueJobs{}
	c := &CurveView{Model: m, Jobs: jobs}
	for k, v := range map[string]string{"over": "alpha", "from": "0.5", "to": "2", "points": "151", "log": "false"} {
		if err := c.Set(k, v); err != nil {
			t.Fatal(err)
		}
	}
	c.Start()
	if strings.Join(jobs.started, ",") != "sweep" {
		t.Errorf("a sweep over alpha needs no best marker and no constant Bayes line: %v", jobs.started)
	}
	jobs.flush()
	if c.Run() != RunDone {
		t.Fatal(c.Problem())
	}
	// The error falls with m/n on either side of the threshold, so the peak is local: it
	// must stand well above the error at m/n = 0.9 and 1.1.
	peak, at := math.Inf(-1), 0.0
	side := map[float64]float64{}
	for _, p := range c.current.Points {
		if !p.OK() {
			continue
		}
		if p.X >= 0.9 && p.X <= 1.1 && p.Result.NMSEdB > peak {
			peak, at = p.Result.NMSEdB, p.X
		}
		if r := math.Round(p.X*100) / 100; r == 0.9 || r == 1.1 {
			side[r] = p.Result.NMSEdB
		}
	}
	if math.Abs(at-1) > 0.02 {
		t.Errorf("the error peaks at m/n = %g, not near 1", at)
	}
	if !(peak > side[0.9]+3 && peak > side[1.1]+3) {
		t.Errorf("no visible peak: %g dB at the peak, %v on the sides", peak, side)
	}
	if len(c.Notes()) == 0 {
		t.Error("the view should say why no Bayes line is drawn along alpha")
	}
}

func TestCurveMarksUnconvergedPoints(t *testing.T) {
	pts := []study.Point{
		{X: 1, Result: resultOK(-10)},
		{X: 2, Result: resultOK(-12), Failed: "no fixed point"},
		{X: 3},
		{X: 4, Result: resultOK(-9)},
	}
	x, y, miss := plot.Values(pts, study.Observables()[2])
	if len(x) != 4 || !math.IsNaN(y[1]) || !math.IsNaN(y[2]) || y[3] != -9 || len(miss) != 2 || miss[0] != 2 || miss[1] != 3 {
		t.Errorf("x %v y %v missing %v", x, y, miss)
	}
}

func resultOK(db float64) (r fixedpoint.Result) {
	r.NMSEdB, r.Converged = db, true
	return r
}

func TestCurveCancelAndCompare(t *testing.T) {
	m := modelOf(t, lassoScenario)
	jobs := &queueJobs{}
	c := &CurveView{Model: m, Jobs: jobs}
	_ = c.Set("points", "30")
	c.Start()
	c.Cancel()
	if c.Run() != RunCancelled || jobs.flush() != 0 {
		t.Fatalf("cancel: run %s", c.Run())
	}
	c.Start()
	jobs.flush()
	c.Keep()
	if len(c.kept) != 1 || c.current != nil {
		t.Fatalf("keep: %d kept", len(c.kept))
	}
	c.Compare()
	jobs.flush()
	if c.Run() != RunDone {
		t.Fatalf("compare: %s %q", c.Run(), c.Problem())
	}
	shapes := map[string]bool{}
	for _, cs := range c.all() {
		shapes[cs.Scen.Design.Shape] = true
		if cs.Scen.Design.Alpha != 0.4 || cs.Scen.Design.Scale != "rows" || len(cs.Points) != 30 {
			t.Errorf("%s: alpha %g scale %s, %d points", cs.Label, cs.Scen.Design.Alpha, cs.Scen.Design.Scale, len(cs.Points))
		}
	}
	for _, want := range []string{"orthogonal", "gaussian", "uniform-sv", "geometric-sv"} {
		if !shapes[want] {
			t.Errorf("no curve for %s: %v", want, shapes)
		}
	}
	if shapes["empirical-sv"] {
		t.Error("listed singular values have no default to compare with")
	}
	c.Clear()
	if c.HasKept() {
		t.Error("clear kept the curves")
	}
	c.Jobs = nil
	c.Start()
	if !strings.Contains(c.Problem(), "workers") {
		t.Errorf("without workers the view should say they are starting: %q", c.Problem())
	}
	_ = c.Set("points", "1")
	c.Jobs = jobs
	c.Start()
	if !strings.Contains(c.Problem(), "points") {
		t.Errorf("one point should be refused naming the points: %q", c.Problem())
	}
}

// A curve over l1 drawn earlier must not make the scenario invalid once the penalty has no
// l1: the setting that no longer fits is replaced, with a note, and the rest stays.
func TestStudyThatNoLongerFitsIsReplaced(t *testing.T) {
	m := modelOf(t, lassoScenario)
	jobs := &queueJobs{}
	c := &CurveView{Model: m, Jobs: jobs}
	c.Start()
	p := &PlanView{Model: m, Jobs: jobs}
	p.Start()
	jobs.flush()
	if err := m.SetKind("penalty", "ridge"); err != nil {
		t.Fatal(err)
	}
	ch := m.Check()
	if ch.Err != nil {
		t.Fatalf("the scenario became invalid: %v", ch.Err)
	}
	st := ch.Scenario.Study
	if st == nil || st.Sweep == nil || st.Sweep.Over != "l2" || st.Best == nil || st.Best.Over != "l2" || st.Plan == nil {
		t.Errorf("the sweep and the tuned weight over l1 should be replaced by l2, the plan kept: %+v", st)
	}
	if n := m.Views().Notes; len(n) != 3 || !strings.Contains(n[0], "curve varied l1") || !strings.Contains(n[1], "x axis varied l1") || !strings.Contains(n[2], "tuned l1") {
		t.Errorf("the replacements should be noted: %q", n)
	}
	if err := m.SetKind("penalty", "l1"); err != nil {
		t.Fatal(err)
	}
	if st := m.Check().Scenario.Study; st == nil || st.Sweep == nil || st.Sweep.Over != "l1" {
		t.Errorf("back on l1 the sweep over l2 is replaced by one over l1: %+v", st)
	}
}

// Figures larger than the renderer's 16 KB attribute buffer must go in as short blob: URLs,
// and each replaced figure's URL must be released.
func TestFigureUsesBlobURLs(t *testing.T) {
	m := modelOf(t, lassoScenario)
	jobs, br := &queueJobs{}, &keepBrowser{}
	c := &CurveView{Model: m, Jobs: jobs, Browser: br}
	_ = c.Set("points", "40")
	c.Start()
	jobs.flush()
	first := c.FigureURL()
	br.shown(t, "curve", first)
	if len(br.held) != 1 {
		t.Fatalf("figure URL %q, %d live", first, len(br.held))
	}
	_ = c.Set("quantity", "mse")
	jobs.flush()
	if _, old := br.held[first]; c.FigureURL() == first || len(br.held) != 1 || old {
		t.Errorf("after a redraw: %q, live %v", c.FigureURL(), len(br.held))
	}
	c.box.clear()
	if len(br.held) != 0 {
		t.Errorf("clearing kept %d URLs alive", len(br.held))
	}
	c.Start()
	jobs.flush()
	if len(br.held) != 1 {
		t.Fatalf("%d URLs alive after a new figure", len(br.held))
	}
	c.Destroy(nil)
	if len(br.held) != 0 {
		t.Errorf("a dropped view kept %d URLs alive", len(br.held))
	}
}

// poolJobs is a queueJobs that says how many workers it has, like the page's pool.
type poolJobs struct {
	queueJobs
	workers int
}

func (p *poolJobs) Workers() int { return p.workers }

// With several workers a sweep is shared out in blocks; the curve must still be the
// engine's, to the fixed point's tolerance, at exactly the axis's values.
func TestCurveSharedOverWorkers(t *testing.T) {
	m := modelOf(t, lassoScenario)
	jobs := &poolJobs{workers: 3}
	c := &CurveView{Model: m, Jobs: jobs}
	c.Start()
	n := 0
	for _, k := range jobs.started {
		if k == "sweep" {
			n++
		}
	}
	if n != 3 {
		t.Fatalf("a 200-point sweep over 3 workers should go out in 3 blocks, not %d", n)
	}
	jobs.flush()
	if c.Run() != RunDone {
		t.Fatal(c.Problem())
	}
	s, _ := scenario.Decode([]byte(lassoScenario))
	ax := c.axis
	want, err := study.Sweep(context.Background(), s, study.SweepSpec{Axis: study.Axis{Over: ax.Over, From: ax.From, To: ax.To, Points: ax.Points, Log: ax.Log}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i, p := range c.current.Points {
		if p.X != want[i].X || p.OK() != want[i].OK() || math.Abs(p.Result.MSE-want[i].Result.MSE) > 1e-9*want[i].Result.MSE {
			t.Errorf("point %d: (%v, %v), engine (%v, %v)", i, p.X, p.Result.MSE, want[i].X, want[i].Result.MSE)
		}
	}
	if got := (&CurveView{Jobs: jobs}).sweepBlocks(40); len(got) != 1 {
		t.Errorf("40 points are not worth sharing out: %v", got)
	}
}
