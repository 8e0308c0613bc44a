package ui

import (
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/param"
	"hdrisk/engine/penalty"
	"hdrisk/engine/scenario"
	"hdrisk/engine/signal"
)

// Every menu choice, with its default inputs, must make a scenario the engine accepts: the
// page's menus and contract 1 must not drift apart.
func TestEveryChoiceDecodes(t *testing.T) {
	for _, g := range Groups() {
		kinds := g.Kinds
		if len(kinds) == 0 {
			kinds = []Kind{{}}
		}
		for _, k := range kinds {
			for _, sc := range Scales {
				m := NewModel()
				if k.Name != "" {
					if err := m.SetKind(g.Name, k.Name); err != nil {
						t.Fatal(err)
					}
				}
				if err := m.SetScale(sc.Name); err != nil {
					t.Fatal(err)
				}
				data, err := m.JSON()
				if err != nil {
					t.Fatalf("%s %s: %v", g.Name, k.Name, err)
				}
				if _, err := scenario.Decode(data); err != nil {
					t.Errorf("%s %s scale %s: engine refuses %s: %v", g.Name, k.Name, sc.Name, data, err)
				}
			}
		}
	}
}

func TestTextErrorsNameTheField(t *testing.T) {
	cases := []struct{ id, text, want string }{
		{"in-penalty-elastic-net-l1", "abc", `penalty.l1: not a number: "abc"`},
		{"in-design-alpha", " ", "design.alpha: empty"},
		{"in-noise-variance", "NaN", "noise.variance: not a finite number"},
		{"in-noise-variance", "1e999", "noise.variance: not a number"},
	}
	for _, c := range cases {
		m := NewModel()
		if err := m.SetText(c.id, c.text); err != nil {
			t.Fatal(err)
		}
		_, err := m.JSON()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s = %q: error %v, want it to contain %q", c.id, c.text, err, c.want)
		}
	}
	m := NewModel()
	_ = m.SetKind("design", "empirical-sv")
	_ = m.SetText("in-design-empirical-sv-values", "1, 2, x")
	if _, err := m.JSON(); err == nil || !strings.Contains(err.Error(), "design.values[2]") {
		t.Errorf("bad list entry: error %v, want design.values[2]", err)
	}
	_ = m.SetText("in-design-empirical-sv-values", " , ")
	if _, err := m.JSON(); err == nil || !strings.Contains(err.Error(), "design.values: the list is empty") {
		t.Errorf("empty list: error %v", err)
	}
}

func TestTextSurvivesSwitchingKinds(t *testing.T) {
	m := NewModel()
	if err := m.SetText("in-penalty-elastic-net-l1", "0.3"); err != nil {
		t.Fatal(err)
	}
	_ = m.SetKind("penalty", "ridge")
	if err := m.SetText("in-penalty-elastic-net-l1", "1"); err == nil {
		t.Errorf("an input of a kind not shown was accepted")
	}
	_ = m.SetKind("penalty", "elastic-net")
	for _, f := range m.Fields("penalty") {
		if f.Path == "penalty.l1" && f.Text != "0.3" {
			t.Errorf("penalty.l1 shows %q after switching back, want 0.3", f.Text)
		}
	}
}

func TestUnknownChoices(t *testing.T) {
	m := NewModel()
	if err := m.SetKind("penalty", "lasso2"); err == nil || !strings.Contains(err.Error(), "penalty.kind") {
		t.Errorf("unknown penalty: %v", err)
	}
	if err := m.SetKind("weather", "rain"); err == nil {
		t.Errorf("unknown group accepted")
	}
	if err := m.SetScale("diagonal"); err == nil || !strings.Contains(err.Error(), "design.scale") {
		t.Errorf("unknown scale: %v", err)
	}
}

// Every kind of the three registries appears in its menu with every parameter, and each
// input states the registry's unit, explanation and domain: adding a law to the engine
// needs no edit of the page.
func TestEveryRegistryKindInMenus(t *testing.T) {
	check := func(group, kind, help string, params []param.Param) {
		g, _ := FindGroup(group)
		k, ok := g.kind(kind)
		if !ok {
			t.Errorf("%s: the engine has %q, the menu does not", group, kind)
			return
		}
		if k.Help != help || k.Label == "" {
			t.Errorf("%s %s: help %q label %q, registry help %q", group, kind, k.Help, k.Label, help)
		}
		m := NewModel()
		if err := m.SetKind(group, kind); err != nil {
			t.Fatal(err)
		}
		var fields []Field
		for _, f := range m.Fields(group) {
			if f.Path != "design.alpha" {
				fields = append(fields, f)
			}
		}
		if len(fields) != len(params) {
			t.Errorf("%s %s: %d inputs, the registry has %d parameters", group, kind, len(fields), len(params))
			return
		}
		for i, p := range params {
			f := fields[i]
			if f.Param.Param != p || f.Path != group+"."+p.Name {
				t.Errorf("%s %s: input %d is %s %+v, the registry's %+v", group, kind, i, f.Path, f.Param.Param, p)
			}
			if f.Label == "" || f.Default == "" {
				t.Errorf("%s %s %s: label %q, starting text %q", group, kind, p.Name, f.Label, f.Default)
			}
		}
	}
	for _, s := range design.Shapes() {
		check("design", s.Name, s.Help, s.Params)
	}
	for _, l := range signal.Laws() {
		check("signal", l.Name, l.Help, l.Params)
	}
	for _, k := range penalty.Kinds() {
		check("penalty", k.Name, k.Help, k.Params)
	}
	for _, g := range []string{"design", "signal", "penalty"} {
		grp, _ := FindGroup(g)
		want := map[string]int{"design": len(design.Shapes()), "signal": len(signal.Laws()), "penalty": len(penalty.Kinds())}[g]
		if len(grp.Kinds) != want {
			t.Errorf("%s: %d menu entries, the registry has %d", g, len(grp.Kinds), want)
		}
	}
}

// A parameter the page has no words for still gets a label and a starting value inside its
// domain.
func TestFallbacksForUnknownParameters(t *testing.T) {
	for _, p := range []param.Param{
		{Name: "a", Min: 0, Max: math.Inf(1), MaxOpen: true},
		{Name: "b", Min: 2, MinOpen: true, Max: math.Inf(1), MaxOpen: true},
		{Name: "c", Min: 1, MinOpen: true, Max: 2},
		{Name: "d", Min: math.Inf(-1), Max: -5},
		{Name: "e", Min: 0, Max: 1, MaxOpen: true},
		{Name: "f", Min: 0, Max: 10, Optional: true, Default: 3},
	} {
		q := newParam("penalty", "invented-kind", p)
		v, err := strconv.ParseFloat(q.Default, 64)
		if err != nil || !q.Contains(v) || q.Label != p.Name {
			t.Errorf("%s: default %q (in domain: %v), label %q", p.Name, q.Default, err == nil && q.Contains(v), q.Label)
		}
	}
}

// Several inputs can be wrong at once: each is marked with a message naming its field and
// the reason, and a rule across fields is pinned on the input the engine names.
func TestInvalidFieldsMarked(t *testing.T) {
	m := NewModel()
	_ = m.SetText("in-design-alpha", "-1")
	_ = m.SetText("in-signal-bernoulli-gauss-density", "abc")
	c := m.Check()
	if c.Err == nil || c.JSON != nil {
		t.Fatalf("invalid inputs accepted: %s", c.JSON)
	}
	for id, want := range map[string]string{
		"in-design-alpha":                   "design.alpha: -1 is out of range: must be in (0, 100]",
		"in-signal-bernoulli-gauss-density": `signal.density: not a number: "abc"`,
	} {
		if c.Invalid[id] != want {
			t.Errorf("%s: message %q, want %q", id, c.Invalid[id], want)
		}
	}
	if len(c.Invalid) != 2 {
		t.Errorf("marked %v, want exactly the two bad inputs", c.Invalid)
	}

	m = NewModel()
	_ = m.SetKind("design", "uniform-sv")
	_ = m.SetText("in-design-uniform-sv-min", "3")
	c = m.Check()
	if c.Err == nil || len(c.Invalid) != 1 {
		t.Fatalf("min > max: error %v, marks %v", c.Err, c.Invalid)
	}
	for id, msg := range c.Invalid {
		if !strings.HasPrefix(id, "in-design-uniform-sv-") || !strings.HasPrefix(msg, "design.m") {
			t.Errorf("min > max marked %s: %q", id, msg)
		}
	}

	m = NewModel()
	_ = m.SetKind("signal", "gauss-mixture")
	_ = m.SetText("in-signal-gauss-mixture-weights", "0.5, 0.2")
	c = m.Check()
	if msg := c.Invalid["in-signal-gauss-mixture-weights"]; !strings.HasPrefix(msg, "signal.weights") {
		t.Errorf("weights not summing to 1: marks %v, error %v", c.Invalid, c.Err)
	}
	_ = m.SetText("in-signal-gauss-mixture-weights", "0.5, 1.5")
	if msg := m.Check().Invalid["in-signal-gauss-mixture-weights"]; msg != "signal.weights[1]: 1.5 is out of range: must be in [0, 1]" {
		t.Errorf("weight out of range: %q", msg)
	}
}

// The noise can be stated as a variance or as an SNR in dB; the SNR reaches the engine as
// noise.snr_db.
func TestNoiseAsSNR(t *testing.T) {
	m := NewModel()
	if err := m.SetKind("noise", "snr_db"); err != nil {
		t.Fatal(err)
	}
	if err := m.SetText("in-noise-snr_db", "30"); err != nil {
		t.Fatal(err)
	}
	c := m.Check()
	if c.Err != nil || !c.Scenario.Noise.SNR || c.Scenario.Noise.SNRdB != 30 || !strings.Contains(string(c.JSON), `"snr_db": 30`) {
		t.Fatalf("SNR: %v %+v %s", c.Err, c.Scenario.Noise, c.JSON)
	}
	// rows scale: SNR = rho2 / Delta (contract 1), rho2 = 0.05 for the starting signal.
	if want := 0.05 / 1000; math.Abs(c.Problem.Noise-want) > 1e-15 {
		t.Errorf("Delta = %v, want %v", c.Problem.Noise, want)
	}
	_ = m.SetText("in-noise-snr_db", "300")
	if msg := m.Check().Invalid["in-noise-snr_db"]; msg != "noise.snr_db: 300 is out of range: must be in [-100, 200]" {
		t.Errorf("SNR out of range: %q", msg)
	}
}

// Loading a scenario file and reading the inputs back gives the same scenario.
func TestLoadRoundTrip(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "testdata", "scenarios", "*.json"))
	if err != nil || len(files) == 0 {
		t.Fatalf("no example scenarios: %v", err)
	}
	for _, name := range files {
		data, err := os.ReadFile(name)
		if err != nil {
			t.Fatal(err)
		}
		s, err := scenario.Decode(data)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		m := NewModel()
		if err := m.Load(s); err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		c := m.Check()
		if c.Err != nil {
			t.Errorf("%s: reloaded scenario invalid: %v", name, c.Err)
			continue
		}
		want, _ := s.Encode()
		if string(c.JSON) != string(want) {
			t.Errorf("%s: round trip\n got %s\nwant %s", name, c.JSON, want)
		}
	}
	m := NewModel()
	bad := scenario.Scenario{Design: scenario.Design{Shape: "triangular", Scale: "rows"}}
	if err := m.Load(bad); err == nil || m.Kind("design") != "orthogonal" {
		t.Errorf("unknown shape loaded: %v, design now %q", err, m.Kind("design"))
	}
}

// TestLoadKeepsKeptCurves checks that a scenario's kept curves (study.kept) become the
// page state's, and that the page writes them back unchanged.
func TestLoadKeepsKeptCurves(t *testing.T) {
	data, err := os.ReadFile(filepath.Join("..", "testdata", "scenarios", "sparse-survey.json"))
	if err != nil {
		t.Fatal(err)
	}
	s, err := scenario.Decode(data)
	if err != nil {
		t.Fatal(err)
	}
	other := s
	other.Study = nil
	other.Penalty.Params = map[string]float64{"l1": 0.02}
	s.Study = &scenario.Study{View: "curve", Kept: []scenario.Kept{
		{Label: "l1 = 0.02", Scenario: other, Sweep: scenario.Sweep{Over: "alpha", From: 0.2, To: 2, Points: 15}}}}
	m := NewModel()
	if err := m.Load(s); err != nil {
		t.Fatal(err)
	}
	k := m.Views().Kept
	if len(k) != 1 || k[0].ID == 0 || k[0].Label != "l1 = 0.02" || k[0].Axis.Over != "alpha" || k[0].Axis.Points != 15 {
		t.Fatalf("the page state holds the kept curves %+v", k)
	}
	c := m.Check()
	if c.Err != nil {
		t.Fatal(c.Err)
	}
	back, err := scenario.Decode(c.JSON)
	if err != nil {
		t.Fatal(err)
	}
	if back.Study == nil || !reflect.DeepEqual(back.Study.Kept, s.Study.Kept) {
		t.Errorf("the page writes the kept curves as %+v, it opened %+v", back.Study, s.Study.Kept)
	}
}
