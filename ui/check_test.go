package ui

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"strings"
	"testing"
	"time"

	"hdrisk/engine/scenario"
	"hdrisk/protocol"
	"hdrisk/wasm/job"
)

// cdJobs is a fake ui.Jobs: it records each start and, with run set, answers at once by
// running the job natively (the same code a worker runs).
type cdJobs struct {
	run      bool
	started  []string
	args     []any
	progress func(int, int)
	done     func([]byte, error)
	cancels  int
}

func (j *cdJobs) Start(kind string, args any, progress func(int, int), done func([]byte, error)) func() {
	j.started, j.args = append(j.started, kind), append(j.args, args)
	j.progress, j.done = progress, done
	cancelled := false
	if j.run {
		raw, err := json.Marshal(args)
		if err != nil {
			done(nil, err)
			return func() {}
		}
		var last protocol.Reply
		job.Run(protocol.Request{Kind: kind, Args: raw}, func(r protocol.Reply) {
			if r.Type == protocol.Progress && progress != nil {
				progress(r.Done, r.Total)
			}
			last = r
		})
		if last.Type == protocol.Failed {
			done(nil, errors.New(last.Error))
		} else {
			done(last.Result, nil)
		}
	}
	return func() {
		if !cancelled {
			cancelled = true
			j.cancels++
		}
	}
}

// cdBrowser is a fake ui.Browser that keeps downloads and serves one chosen file.
type cdBrowser struct {
	fakeImages
	downloads map[string][]byte
	file      []byte
	fileName  string
	limits    []int64
}

func (b *cdBrowser) Address() string                 { return "file:///hdrisk.html" }
func (b *cdBrowser) Fragment() string                { return "" }
func (b *cdBrowser) SetFragment(string, bool)        {}
func (b *cdBrowser) OnFragment(func(string))         {}
func (b *cdBrowser) Copy(_ string, done func(error)) { done(nil) }
func (b *cdBrowser) Load(string) (string, bool)      { return "", false }
func (b *cdBrowser) Store(string, string) error      { return nil }
func (b *cdBrowser) Download(name, _ string, data []byte) error {
	if b.downloads == nil {
		b.downloads = map[string][]byte{}
	}
	b.downloads[name] = data
	return nil
}
func (b *cdBrowser) ReadFile(_ string, limit int64, done func(string, []byte, error)) {
	b.limits = append(b.limits, limit)
	if int64(len(b.file)) > limit {
		done(b.fileName, nil, errors.New(b.fileName+" is larger than the limit; nothing was read"))
		return
	}
	done(b.fileName, b.file, nil)
}

// lassoModel is the editor's starting scenario with the LASSO penalty (an invented example).
func lassoModel(t *testing.T) *Model {
	t.Helper()
	m := NewModel()
	if err := m.SetKind("penalty", "l1"); err != nil {
		t.Fatal(err)
	}
	if ch := m.Check(); ch.Err != nil {
		t.Fatal(ch.Err)
	}
	return m
}

func TestCheckDefaultsAndSettingsTravel(t *testing.T) {
	m := lassoModel(t)
	c := &CheckView{Model: m}
	c.checkStart()
	if c.NText() != "500" || c.TrialsText() != "20" || c.Solver != "cd" || c.Run() != RunIdle {
		t.Errorf("defaults n=%s trials=%s solver=%s run=%s", c.NText(), c.TrialsText(), c.Solver, c.Run())
	}
	_ = c.SetSetting("seed", "42")
	c.Start() // no workers yet
	if c.Run() != RunError || !strings.Contains(c.Problem(), "workers") {
		t.Errorf("without workers: run=%s problem=%q", c.Run(), c.Problem())
	}
	if m.Study == nil || m.Study.Check == nil || *m.Study.Check != (scenario.Check{N: 500, Trials: 20, Seed: 42, Solver: "cd"}) || m.Study.View != "check" {
		t.Fatalf("study.check not saved in the scenario: %+v", m.Study)
	}
	ch := m.Check()
	back, err := scenario.Decode(ch.JSON)
	if ch.Err != nil || err != nil || back.Study == nil || back.Study.Check == nil || back.Study.Check.Seed != 42 {
		t.Errorf("the scenario file does not carry the check: %s (%v, %v)", ch.JSON, ch.Err, err)
	}
	// A new view over the same scenario starts from its study.check.
	c2 := &CheckView{Model: m}
	c2.checkStart()
	if c2.SeedText() != "42" || c2.NText() != "500" {
		t.Errorf("settings not read back from study.check: seed %s n %s", c2.SeedText(), c2.NText())
	}
}

func TestCheckSettingErrorsNameTheInput(t *testing.T) {
	for _, c := range []struct{ name, text, want string }{
		{"n", "lots", "n: "}, {"n", "1", "n: must be between 2"}, {"trials", "0", "trials: "},
		{"seed", "-1", "seed: "}, {"solver", "newton", "solver: "},
	} {
		v := &CheckView{Model: lassoModel(t), Jobs: &cdJobs{}}
		if err := v.SetSetting(c.name, c.text); err != nil {
			t.Fatal(err)
		}
		v.Start()
		if v.Run() != RunError || !strings.HasPrefix(v.Problem(), c.want) {
			t.Errorf("%s = %q: run %s problem %q, want it to start with %q", c.name, c.text, v.Run(), v.Problem(), c.want)
		}
	}
	v := &CheckView{Model: lassoModel(t), Jobs: &cdJobs{}}
	_ = v.SetSetting("over", "l1")
	v.Start()
	if !strings.HasPrefix(v.Problem(), "at: ") {
		t.Errorf("repeat over l1 with no values: %q", v.Problem())
	}
	if err := v.SetSetting("colour", "red"); err == nil {
		t.Errorf("an unknown setting was accepted")
	}
}

func TestCheckProgressAndCancel(t *testing.T) {
	jobs := &cdJobs{}
	c := &CheckView{Model: lassoModel(t), Jobs: jobs}
	c.Start()
	if c.Run() != RunRunning || !c.Running() || len(jobs.started) != 1 || jobs.started[0] != "check" {
		t.Fatalf("run %s, started %v", c.Run(), jobs.started)
	}
	a := jobs.args[0].(protocol.CheckArgs)
	if a.N != 500 || a.Trials != 20 || a.Solver != "cd" || a.Factors != "fast" || a.Curve != nil {
		t.Errorf("job arguments %+v", a)
	}
	if _, err := scenario.Decode(a.Scenario); err != nil {
		t.Errorf("the job's scenario does not decode: %v", err)
	}
	jobs.progress(7, 20)
	if got := c.Status(); got != "Trial 7 of 20…" {
		t.Errorf("status %q", got)
	}
	c.Start() // a second press while running does nothing
	if len(jobs.started) != 1 {
		t.Errorf("a second job started while one runs")
	}
	c.Cancel()
	if c.Run() != RunCancelled || c.Running() || jobs.cancels != 1 || !strings.HasPrefix(c.Status(), "Cancelled") {
		t.Errorf("after cancel: run %s running %v cancels %d status %q", c.Run(), c.Running(), jobs.cancels, c.Status())
	}
}

func TestCheckRunsToTheEnd(t *testing.T) {
	jobs := &cdJobs{run: true}
	br := &cdBrowser{}
	c := &CheckView{Model: lassoModel(t), Jobs: jobs, Browser: br}
	_ = c.SetSetting("n", "80")
	_ = c.SetSetting("trials", "4")
	c.Start()
	if c.Run() != RunDone || c.Problem() != "" || c.Running() {
		t.Fatalf("run %s problem %q running %v", c.Run(), c.Problem(), c.Running())
	}
	r, _ := c.Latest()
	want, err := job.Check(jobs.args[0].(protocol.CheckArgs), nil)
	if err != nil {
		t.Fatal(err)
	}
	hooks := map[string]string{}
	for _, row := range c.Rows() {
		hooks[row.Name], hooks[row.PredName] = row.Value, row.PredValue
	}
	for _, f := range c.Facts() {
		hooks[f[0]] = f[1]
	}
	for name, w := range map[string]float64{"check_mean_mse": float64(want.MeanMSE), "check_predicted_mse": float64(want.PredictedMSE),
		"check_stderr": float64(want.StdErr), "check_tpp": float64(want.TPP.Mean), "check_predicted_fdp": float64(want.FDP.Predicted)} {
		if hooks[name] != fullNum(w) {
			t.Errorf("hook %s = %q, want %s", name, hooks[name], fullNum(w))
		}
	}
	if hooks["check_converged"] != "true" || hooks["check_rule"] == "" || r.Trials != 4 {
		t.Errorf("hooks %v", hooks)
	}
	if len(c.PerTrial()) != 4 {
		t.Errorf("per-trial %d lines", len(c.PerTrial()))
	}
	br.shown(t, "check figure", c.FigureURL())
	c.Export("csv")
	lines := strings.Split(strings.TrimSpace(string(br.downloads["hdrisk-check.csv"])), "\n")
	if len(lines) != 5 || !strings.HasPrefix(lines[0], "over,at,trial,mse,") {
		t.Errorf("CSV %q", lines)
	}
	c.Export("svg")
	c.Export("png")
	if !bytes.Equal(br.downloads["hdrisk-check.svg"], br.held[c.FigureURL()]) {
		t.Errorf("the SVG file is not the figure shown")
	}
	if w, h := pngSize(t, br.downloads["hdrisk-check.png"]); w != 1280 || h != 800 {
		t.Errorf("PNG of %d x %d pixels, want 1280 x 800", w, h)
	}
	c.Export("pdf")
	if pdf := br.downloads["hdrisk-check.pdf"]; !bytes.HasPrefix(pdf, []byte("%PDF-")) {
		t.Errorf("the PDF file starts with %q", pdf[:min(len(pdf), 8)])
	}
}

// Over a number, one job per value; the first also asks for the predicted curve, and the
// figure holds both.
func TestCheckOverValues(t *testing.T) {
	jobs := &cdJobs{run: true}
	c := &CheckView{Model: lassoModel(t), Jobs: jobs, Clock: func() time.Time { return time.Unix(0, 0) }}
	for k, v := range map[string]string{"n": "60", "trials": "2", "over": "l1", "at": "0.2, 0.05"} {
		_ = c.SetSetting(k, v)
	}
	c.Start()
	if c.Run() != RunDone || len(jobs.started) != 2 {
		t.Fatalf("run %s (%s), %d jobs", c.Run(), c.Problem(), len(jobs.started))
	}
	first, second := jobs.args[0].(protocol.CheckArgs), jobs.args[1].(protocol.CheckArgs)
	if first.At != 0.05 || second.At != 0.2 || first.Curve == nil || second.Curve != nil ||
		first.Curve.From != 0.05 || first.Curve.To != 0.2 || !first.Curve.Log {
		t.Errorf("jobs %+v / %+v", first, second)
	}
	if rows := c.PointRows(); len(rows) != 2 || rows[0][0] != "0.05" {
		t.Errorf("point rows %v", rows)
	}
	if c.FigureURL() == "" || len(c.curve) != curvePoints {
		t.Errorf("figure %q, curve of %d points", c.FigureProblem(), len(c.curve))
	}
}

// A trial at its iteration limit is stated in words, never hidden.
func TestCheckStatesUnconvergedTrials(t *testing.T) {
	c := &CheckView{Model: lassoModel(t)}
	c.points = []checkPoint{{Result: protocol.CheckResult{Trials: 3, NotConverged: 1, MaxIter: 10, Criterion: "duality gap / ||y||^2",
		PredictionConverged: true, PerTrial: []protocol.CheckTrial{{Converged: true}, {Converged: false}, {Converged: true}}}}}
	var conv string
	for _, f := range c.Facts() {
		if f[0] == "check_converged" {
			conv = f[1] + " " + f[2]
		}
	}
	if !strings.HasPrefix(conv, "false") || !strings.Contains(conv, "1 of 3 trials stopped at the iteration limit (10)") {
		t.Errorf("convergence fact %q", conv)
	}
	if pt := c.PerTrial(); !strings.Contains(pt[1], "not converged") || strings.Contains(pt[0], "not converged") {
		t.Errorf("per-trial lines %q", pt)
	}
}

// The menu of numbers to repeat over follows the chosen kinds.
func TestCheckPathsFollowTheKinds(t *testing.T) {
	m := lassoModel(t)
	c := &CheckView{Model: m}
	has := func(name string) bool {
		for _, p := range c.Paths() {
			if p.Name == name {
				return true
			}
		}
		return false
	}
	if !has("l1") || !has("alpha") || has("l2") {
		t.Errorf("LASSO paths %v", c.Paths())
	}
	if err := m.SetKind("penalty", "ridge"); err != nil {
		t.Fatal(err)
	}
	if has("l1") || !has("l2") {
		t.Errorf("ridge paths %v", c.Paths())
	}
}

// TestCheckFollowsAnOpenedScenario checks that the check's inputs show the study.check of a
// scenario opened after the view started (a link, a file, a pasted code), and go back to
// the defaults when the opened scenario has none.
func TestCheckFollowsAnOpenedScenario(t *testing.T) {
	m := lassoModel(t)
	c := &CheckView{Model: m}
	c.Init(nil)
	_ = c.SetSetting("seed", "9")
	s := m.Check().Scenario
	s.Study = &scenario.Study{View: "check", Check: &scenario.Check{N: 800, Trials: 7, Seed: 42, Solver: "prox"}}
	if err := m.Load(s); err != nil {
		t.Fatal(err)
	}
	c.Compute(nil)
	if c.NText() != "800" || c.TrialsText() != "7" || c.SeedText() != "42" || c.Solver != "prox" {
		t.Errorf("after opening a scenario with a check: n=%s trials=%s seed=%s solver=%s, it states 800, 7, 42, prox",
			c.NText(), c.TrialsText(), c.SeedText(), c.Solver)
	}
	_ = c.SetSetting("n", "1200")
	c.Compute(nil)
	if c.NText() != "1200" {
		t.Errorf("an edit of n is undone by the next render: n=%s", c.NText())
	}
	s.Study = nil
	if err := m.Load(s); err != nil {
		t.Fatal(err)
	}
	c.Compute(nil)
	if c.NText() != "500" || c.SeedText() != "1" || c.Solver != "cd" {
		t.Errorf("after opening a scenario without a check: n=%s seed=%s solver=%s, want the defaults", c.NText(), c.SeedText(), c.Solver)
	}
}

// The result's solver note and warnings are shown under the numbers and travel in the CSV:
// the orthogonal LASSO's check asked of cd runs prox matrix-free, and says so.
func TestCheckShowsSolverNoteAndWarnings(t *testing.T) {
	jobs := &cdJobs{run: true}
	br := &cdBrowser{}
	c := &CheckView{Model: lassoModel(t), Jobs: jobs, Browser: br}
	_ = c.SetSetting("n", "80")
	_ = c.SetSetting("trials", "3")
	c.Start()
	if c.Run() != RunDone {
		t.Fatalf("run %s: %s", c.Run(), c.Problem())
	}
	want, err := job.Check(jobs.args[0].(protocol.CheckArgs), nil)
	if err != nil {
		t.Fatal(err)
	}
	if want.SolverNote == "" || !strings.HasPrefix(want.SolverNote, "cd was asked; prox ran") {
		t.Fatalf("the engine's check gives no solver note for cd on the orthogonal design: %+v", want)
	}
	notes := c.Notes()
	if len(notes) != 1 || notes[0][0] != "solver" || notes[0][1] != "Solver: "+want.SolverNote+"." {
		t.Errorf("notes %q, want the solver note %q", notes, want.SolverNote)
	}
	recs, err := csv.NewReader(bytes.NewReader(c.CSV())).ReadAll()
	if err != nil || len(recs) != 4 {
		t.Fatalf("CSV: %v, %d rows", err, len(recs))
	}
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	for k := 1; k < 4; k++ {
		if recs[k][col["solver_note"]] != want.SolverNote || recs[k][col["warnings"]] != "" {
			t.Errorf("CSV row %d: solver_note %q, warnings %q", k, recs[k][col["solver_note"]], recs[k][col["warnings"]])
		}
	}

	// Warnings: each shown up to maxCheckWarnings, the rest counted; all of them on the
	// check's first CSV row; the rotations' own solver note beside the user's matrix.
	var ws []string
	for i := range 7 {
		ws = append(ws, fmt.Sprintf("trial %d: solver prox reached its iteration limit", i))
	}
	c.points = []checkPoint{{Result: protocol.CheckResult{Trials: 7, Solver: "prox", Warnings: ws, PerTrial: make([]protocol.CheckTrial, 7),
		Comparison: &protocol.CheckComparison{RotatedSolverNote: "cd was asked; prox ran instead"}}}}
	notes = c.Notes()
	if len(notes) != 2+maxCheckWarnings || notes[0][0] != "rotated_solver" || !strings.Contains(notes[0][1], "cd was asked; prox ran instead") ||
		notes[1][1] != "Warning: "+ws[0]+"." || !strings.HasPrefix(notes[len(notes)-1][1], "Warning: 2 more like these") {
		t.Errorf("notes %q", notes)
	}
	recs, err = csv.NewReader(bytes.NewReader(c.CSV())).ReadAll()
	if err != nil || len(recs) != 8 {
		t.Fatalf("CSV: %v, %d rows", err, len(recs))
	}
	if got := recs[1][col["warnings"]]; got != strings.Join(ws, " | ") || recs[2][col["warnings"]] != "" || recs[1][col["solver_note"]] != "random rotations: cd was asked; prox ran instead" {
		t.Errorf("CSV warnings %q, next row %q, note %q", got, recs[2][col["warnings"]], recs[1][col["solver_note"]])
	}
}
