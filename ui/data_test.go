package ui

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"

	"hdrisk/engine/scenario"
	"hdrisk/protocol"
)

func dataNum(s string) float64 {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return math.NaN()
	}
	return v
}

func dataFacts(list [][3]string) map[string]string {
	m := map[string]string{}
	for _, f := range list {
		m[f[0]] = f[1]
	}
	return m
}

// A matrix file read through the browser becomes the design: empirical-sv with its
// singular values and alpha = rows/cols, other parts of the scenario untouched.
func TestDataMatrixFileBecomesTheDesign(t *testing.T) {
	m := lassoModel(t)
	changed := 0
	br := &cdBrowser{fileName: "invented.csv", file: []byte("3,0,0,0\n0,2,0,0\n")}
	jobs := &cdJobs{run: true}
	c := &DataView{Model: m, Jobs: jobs, Browser: br, Changed: func() { changed++ }}
	c.start()
	c.ReadFile("design")
	if c.DesignRun() != RunDone || c.Problem("design") != "" {
		t.Fatalf("run %s problem %q", c.DesignRun(), c.Problem("design"))
	}
	if len(br.limits) != 1 || br.limits[0] != MaxMatrixBytes {
		t.Errorf("ReadFile limits %v, want the matrix cap %d", br.limits, MaxMatrixBytes)
	}
	f := dataFacts(c.DesignFacts())
	if f["data_rows"] != "2" || f["data_alpha"] != "0.5" || math.Abs(dataNum(f["data_condition"])-1.5) > 1e-12 || f["data_rank"] != "2" || f["data_svd_seconds"] == "" {
		t.Errorf("facts %v", f)
	}
	br.shown(t, "histogram", c.FigureURL("design"))
	before := m.Check().Scenario
	c.UseDesign()
	after := m.Check()
	if after.Err != nil {
		t.Fatal(after.Err)
	}
	d := after.Scenario.Design
	if d.Shape != "empirical-sv" || d.Alpha != 0.5 || len(d.Lists["values"]) != 2 || math.Abs(d.Lists["values"][0]-3) > 1e-12 || math.Abs(d.Lists["values"][1]-2) > 1e-12 || d.Scale != before.Design.Scale {
		t.Errorf("design after use: %+v", d)
	}
	if fmt.Sprint(after.Scenario.Signal, after.Scenario.Penalty, after.Scenario.Noise) != fmt.Sprint(before.Signal, before.Penalty, before.Noise) {
		t.Errorf("using the design changed other parts of the scenario")
	}
	if changed != 1 || c.Applied("design") == "" {
		t.Errorf("changed %d times, applied %q", changed, c.Applied("design"))
	}
}

// A bad file names the line and keeps both the open scenario and the pasted text.
func TestDataErrorsNameTheLineAndKeepTheScenario(t *testing.T) {
	m := lassoModel(t)
	want, _ := m.JSON()
	c := &DataView{Model: m, Jobs: &cdJobs{run: true}}
	c.start()
	text := "1,2,3\n4,5,6\n7,8\n"
	_ = c.SetSetting("design-text", text)
	c.ReadText("design")
	if c.DesignRun() != RunError || !strings.Contains(c.Problem("design"), "line 3") || !strings.HasPrefix(c.Problem("design"), "the pasted text: ") {
		t.Errorf("run %s problem %q", c.DesignRun(), c.Problem("design"))
	}
	if c.design.text != text || len(c.DesignFacts()) != 0 {
		t.Errorf("pasted text lost or stale facts shown")
	}
	c.UseDesign()
	if got, _ := m.JSON(); string(got) != string(want) {
		t.Errorf("the scenario changed after a failed read")
	}
	// Text when a file is too large for the cap: the browser refuses it before reading.
	br := &cdBrowser{fileName: "big.txt", file: make([]byte, MaxListBytes+1)}
	c.Browser = br
	_ = c.SetSetting("source", protocol.SourceSingular)
	c.ReadFile("design")
	if c.DesignRun() != RunError || !strings.Contains(c.Problem("design"), "big.txt") || !strings.Contains(c.Problem("design"), "32 MB") {
		t.Errorf("oversized file: %q", c.Problem("design"))
	}
	_ = c.SetSetting("signal-text", " ")
	c.ReadText("signal")
	if c.SignalRun() != RunError || c.Problem("signal") == "" {
		t.Errorf("empty paste accepted")
	}
}

// A list of eigenvalues with a stated m/n becomes the design with that alpha.
func TestDataEigenvalueList(t *testing.T) {
	m := lassoModel(t)
	c := &DataView{Model: m, Jobs: &cdJobs{run: true}}
	c.start()
	_ = c.SetSetting("source", protocol.SourceEigenvalues)
	_ = c.SetSetting("alpha", "0.5")
	_ = c.SetSetting("design-text", "4\n1\n")
	c.ReadText("design")
	f := dataFacts(c.DesignFacts())
	if c.DesignRun() != RunDone || f["data_rows"] != "2" || f["data_alpha"] != "0.5" {
		t.Fatalf("run %s %q facts %v", c.DesignRun(), c.Problem("design"), f)
	}
	c.UseDesign()
	d := m.Check().Scenario.Design
	if d.Alpha != 0.5 || fmt.Sprint(d.Lists["values"]) != "[2 1]" {
		t.Errorf("design %+v", d)
	}
	_ = c.SetSetting("alpha", "-1")
	c.ReadText("design")
	if !strings.HasPrefix(c.Problem("design"), "m/n:") {
		t.Errorf("negative m/n: %q", c.Problem("design"))
	}
}

// Samples become an empirical law, a fitted sparse Gaussian or a mixture.
func TestDataSignalSamples(t *testing.T) {
	m := lassoModel(t)
	samples := "0\n0\n0\n1.5\n-2\n0\n0\n0.5\n"
	for _, c := range []struct {
		method, k string
		check     func(s scenario.Signal) bool
	}{
		{protocol.FitNone, "", func(s scenario.Signal) bool {
			return s.Law == "empirical" && fmt.Sprint(s.Lists["values"]) == "[-2 0 0 0 0 0 0.5 1.5]"
		}},
		{protocol.FitBernoulli, "", func(s scenario.Signal) bool {
			return s.Law == "bernoulli-gauss" && s.Params["density"] == 3.0/8 && s.Params["variance"] == (2.25+4+0.25)/3
		}},
		{protocol.FitMixture, "2", func(s scenario.Signal) bool { return s.Law == "gauss-mixture" && len(s.Lists["weights"]) == 2 }},
	} {
		v := &DataView{Model: m, Jobs: &cdJobs{run: true}}
		v.start()
		_ = v.SetSetting("method", c.method)
		_ = v.SetSetting("k", c.k)
		_ = v.SetSetting("signal-text", samples)
		v.ReadText("signal")
		if v.SignalRun() != RunDone {
			t.Errorf("%s: %s %q", c.method, v.SignalRun(), v.Problem("signal"))
			continue
		}
		if f := dataFacts(v.SignalFacts()); f["data_samples"] != "8" {
			t.Errorf("%s: facts %v", c.method, f)
		}
		if v.FigureURL("signal") == "" {
			t.Errorf("%s: no figure", c.method)
		}
		v.UseSignal()
		if s := m.Check().Scenario.Signal; !c.check(s) || v.Problem("signal") != "" {
			t.Errorf("%s: signal %+v (%s)", c.method, s, v.Problem("signal"))
		}
	}
	v := &DataView{Model: m, Jobs: &cdJobs{run: true}}
	v.start()
	_ = v.SetSetting("method", protocol.FitMixture)
	_ = v.SetSetting("k", "50")
	_ = v.SetSetting("signal-text", samples)
	v.ReadText("signal")
	if !strings.HasPrefix(v.Problem("signal"), "k: ") {
		t.Errorf("k = 50: %q", v.Problem("signal"))
	}
}

func TestDataCancelAndNoWorkers(t *testing.T) {
	jobs := &cdJobs{}
	c := &DataView{Model: lassoModel(t), Jobs: jobs}
	c.start()
	_ = c.SetSetting("design-text", "1,2\n3,4\n")
	c.ReadText("design")
	if !c.Busy("design") || c.Run() != RunRunning || jobs.started[0] != "spectrum" {
		t.Fatalf("busy %v run %s", c.Busy("design"), c.Run())
	}
	jobs.progress(protocol.SpectrumGramEnd+1, protocol.SpectrumTotal)
	if d, tot := c.Progress("design"); !strings.HasPrefix(c.Stage("design"), "Reducing the Gram matrix") || d != protocol.SpectrumGramEnd+1 || tot != protocol.SpectrumTotal {
		t.Errorf("stage %q", c.Stage("design"))
	}
	c.Cancel("design")
	if c.Busy("design") || c.DesignRun() != RunCancelled || jobs.cancels != 1 {
		t.Errorf("after cancel: busy %v run %s", c.Busy("design"), c.DesignRun())
	}
	c2 := &DataView{Model: lassoModel(t)}
	c2.start()
	_ = c2.SetSetting("design-text", "1")
	c2.ReadText("design")
	if !strings.Contains(c2.Problem("design"), "workers") {
		t.Errorf("no workers: %q", c2.Problem("design"))
	}
	c2.ReadFile("design")
	if !strings.Contains(c2.Problem("design"), "browser") {
		t.Errorf("no browser: %q", c2.Problem("design"))
	}
}

// A long list is fitted to what the editor's box can show, and the view says how.
func TestDataLongListIsShortenedAndSaid(t *testing.T) {
	m := lassoModel(t)
	var b strings.Builder
	for i := range 3000 {
		fmt.Fprintf(&b, "%v\n", 1+float64(i)/2999*3.123456789)
	}
	c := &DataView{Model: m, Jobs: &cdJobs{run: true}}
	c.start()
	_ = c.SetSetting("source", protocol.SourceSingular)
	_ = c.SetSetting("design-text", b.String())
	c.ReadText("design")
	c.UseDesign()
	v := m.Check().Scenario.Design.Lists["values"]
	text := strings.Trim(fmt.Sprint(v), "[]")
	if len(v) == 0 || len(v) >= 3000 || len(text) > maxListChars || !strings.Contains(c.Applied("design"), "thinned") {
		t.Errorf("%d values (%d characters) in the design; applied %q", len(v), len(text), c.Applied("design"))
	}
}

// boxBrowser records the texts put in the page's boxes directly (InputWriter).
type boxBrowser struct {
	*cdBrowser
	boxes map[string]string
}

func (b *boxBrowser) SetInput(id, text string) { b.boxes[id] = text }

// TestPastedTextSurvivesATabSwitch checks that the text pasted in the data view's boxes goes
// back into them when its tab is selected again (the boxes are then built afresh, empty),
// once per selection, and that Read reads that text.
func TestPastedTextSurvivesATabSwitch(t *testing.T) {
	br := &boxBrowser{cdBrowser: &cdBrowser{}, boxes: map[string]string{}}
	c := &DataView{Active: true, Model: lassoModel(t), Browser: br}
	c.Init(nil)
	c.Rendered(nil)
	if len(br.boxes) != 0 {
		t.Fatalf("empty boxes were written: %v", br.boxes)
	}
	pasted := "3, 0\n0, 2\n"
	if err := c.SetSetting("design-text", pasted); err != nil {
		t.Fatal(err)
	}
	_ = c.SetSetting("signal-text", "1 2 3")
	c.Rendered(nil)
	if len(br.boxes) != 0 {
		t.Errorf("a box the user is typing in was written back: %v", br.boxes)
	}
	c.Active = false // another tab
	c.Rendered(nil)
	c.Active = true // back
	c.Rendered(nil)
	if br.boxes["data-design-text"] != pasted || br.boxes["data-signal-text"] != "1 2 3" {
		t.Errorf("after a tab switch the boxes hold %q", br.boxes)
	}
	clear(br.boxes)
	c.Rendered(nil)
	if len(br.boxes) != 0 {
		t.Errorf("the boxes are written again at every render: %v", br.boxes)
	}
}
