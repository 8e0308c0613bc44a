package ui

import (
	"strings"
	"testing"

	"hdrisk/engine/penalty"
	"hdrisk/engine/scenario"
	"hdrisk/engine/signal"
)

// Every menu choice, with its default inputs, must make a scenario the engine accepts: the
// page's menus and contract 1 must not drift apart.
func TestEveryChoiceDecodes(t *testing.T) {
	for _, g := range Groups {
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
