package ui

import (
	"math"
	"os"
	"path/filepath"
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

// The menus must offer exactly the kinds and parameters of the engine's registries (signal
// laws, penalty kinds): a law added there fails here until the page has its label and
// starting value in Groups.
func TestMenusFollowEngineRegistries(t *testing.T) {
	type kp = map[string][]string
	fromUI := func(group string) kp {
		g, _ := FindGroup(group)
		out := kp{}
		for _, k := range g.Kinds {
			for _, p := range k.Params {
				out[k.Name] = append(out[k.Name], p.Name)
			}
			if _, ok := out[k.Name]; !ok {
				out[k.Name] = nil
			}
		}
		return out
	}
	laws := kp{}
	for _, k := range signal.Laws() {
		laws[k.Name] = nil
		for _, p := range k.Params {
			laws[k.Name] = append(laws[k.Name], p.Name)
		}
	}
	pens := kp{}
	for _, k := range penalty.Kinds() {
		pens[k.Name] = nil
		for _, p := range k.Params {
			pens[k.Name] = append(pens[k.Name], p.Name)
		}
	}
	for _, c := range []struct {
		group string
		want  kp
	}{{"signal", laws}, {"penalty", pens}} {
		got := fromUI(c.group)
		for name, params := range c.want {
			have, ok := got[name]
			if !ok {
				t.Errorf("%s: the engine has %q, the page's menu does not", c.group, name)
				continue
			}
			if !sameSet(have, params) {
				t.Errorf("%s %s: page asks for %v, engine takes %v", c.group, name, have, params)
			}
		}
		for name := range got {
			if _, ok := c.want[name]; !ok {
				t.Errorf("%s: the page offers %q, the engine has no such kind", c.group, name)
			}
		}
	}
}

func sameSet(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	seen := map[string]int{}
	for _, x := range a {
		seen[x]++
	}
	for _, x := range b {
		seen[x]--
	}
	for _, n := range seen {
		if n != 0 {
			return false
		}
	}
	return true
}

// Every kind of the three registries appears in its menu with every parameter, and each
// input states the registry's unit, explanation and domain: adding a law to the engine
// needs no edit of the page.
func TestEveryRegistryKindInMenus(t *testing.T) {
	type regParam struct {
		name, unit, help string
		min, max         float64
		minOpen, maxOpen bool
	}
	check := func(group, kind, help string, params []regParam) {
		g, _ := FindGroup(group)
		k, ok := g.kind(kind)
		if !ok {
			t.Errorf("%s: the engine has %q, the menu does not", group, kind)
			return
		}
		if k.Help != help || k.Label == "" {
			t.Errorf("%s %s: help %q label %q, registry help %q", group, kind, k.Help, k.Label, help)
		}
		if len(k.Params) != len(params) {
			t.Errorf("%s %s: %d inputs, the registry has %d parameters", group, kind, len(k.Params), len(params))
			return
		}
		m := NewModel()
		if err := m.SetKind(group, kind); err != nil {
			t.Fatal(err)
		}
		fields := map[string]Field{}
		for _, f := range m.Fields(group) {
			fields[f.Name] = f
		}
		for _, p := range params {
			f, ok := fields[p.name]
			if !ok {
				t.Errorf("%s %s: no input for %s", group, kind, p.name)
				continue
			}
			if f.Unit != p.unit || f.Help != p.help || f.Min != p.min || f.Max != p.max || f.MinOpen != p.minOpen || f.MaxOpen != p.maxOpen {
				t.Errorf("%s %s %s: input %+v differs from the registry %+v", group, kind, p.name, f.Param, p)
			}
			if f.Label == "" || f.Range() == "" || f.Path != group+"."+p.name {
				t.Errorf("%s %s %s: label %q range %q path %q", group, kind, p.name, f.Label, f.Range(), f.Path)
			}
		}
	}
	for _, s := range design.Shapes() {
		var ps []regParam
		for _, p := range s.Params {
			ps = append(ps, regParam{p.Name, p.Unit, p.Help, p.Min, p.Max, p.MinOpen, p.MaxOpen})
		}
		check("design", s.Name, s.Help, ps)
	}
	for _, l := range signal.Laws() {
		var ps []regParam
		for _, p := range l.Params {
			ps = append(ps, regParam{p.Name, p.Unit, p.Help, p.Min, p.Max, p.MinOpen, p.MaxOpen})
		}
		check("signal", l.Name, l.Help, ps)
	}
	for _, k := range penalty.Kinds() {
		var ps []regParam
		for _, p := range k.Params {
			ps = append(ps, regParam{p.Name, p.Unit, p.Help, p.Min, p.Max, p.MinOpen, p.MaxOpen})
		}
		check("penalty", k.Name, k.Help, ps)
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
