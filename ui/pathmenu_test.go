package ui

import (
	"strings"
	"testing"
)

// TestVaryMenuNamesAndKeepsItsList: the menu shows the editor's names with the short name
// (the registry's explanation goes to the title), and keeps the last valid list while the
// scenario cannot be checked.
func TestVaryMenuNamesAndKeepsItsList(t *testing.T) {
	m := NewModel()
	var k pathChoices
	list := k.of(m)
	text := map[string]pathChoice{}
	for _, p := range list {
		text[p.Name] = p
	}
	for name, want := range map[string]string{"alpha": "Sampling ratio m/n (alpha)", "l1": "L1 weight (l1)", "density": "Share of nonzero entries (density)"} {
		if got := text[name].Text; got != want {
			t.Errorf("%s shows as %q, want %q", name, got, want)
		}
	}
	if l1 := text["l1"]; !strings.Contains(l1.Title, "absolute-value term") || strings.Contains(l1.Text, "absolute-value") {
		t.Errorf("l1: text %q, title %q; want the explanation in the title only", l1.Text, l1.Title)
	}

	// A penalty of another kind with an input that is not a number: no list can be made.
	if err := m.SetKind("penalty", "ridge"); err != nil {
		t.Fatal(err)
	}
	if err := m.SetText("in-penalty-ridge-l2", "x"); err != nil {
		t.Fatal(err)
	}
	if modelPaths(m) != nil {
		t.Fatal("an invalid scenario lists its numbers; this test proves nothing")
	}
	if got := k.of(m); len(got) != len(list) || got[0] != list[0] {
		t.Errorf("while invalid the menu has %d entries, before %d", len(got), len(list))
	}
	if err := m.SetText("in-penalty-ridge-l2", "0.1"); err != nil {
		t.Fatal(err)
	}
	names := ""
	for _, p := range k.of(m) {
		names += p.Name + " "
	}
	if strings.Contains(names, "l1 ") || !strings.Contains(names, "l2") {
		t.Errorf("valid again with ridge: the menu lists %q", names)
	}
}
