package ui

import (
	"strings"
	"testing"

	"hdrisk/engine/scenario"
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
