package ui

import (
	"testing"
	"time"

	"hdrisk/engine/scenario"
)

// timerBrowser is the fake browser with a Timer whose timers the test fires.
type timerBrowser struct {
	*fakeBrowser
	due   []func() bool
	stops int
}

func (b *timerBrowser) After(_ time.Duration, f func() bool) func() {
	i := len(b.due)
	b.due = append(b.due, f)
	return func() {
		if b.due[i] != nil {
			b.due[i] = nil
			b.stops++
		}
	}
}

func (b *timerBrowser) fire() {
	fs := b.due
	b.due = nil
	for _, f := range fs {
		if f != nil {
			f()
		}
	}
}

// alphaIn decodes the alpha of the scenario in a link or fragment.
func alphaIn(t *testing.T, code string) float64 {
	t.Helper()
	s, err := scenario.DecodeLink(code)
	if err != nil {
		t.Fatalf("%q: %v", code, err)
	}
	return s.Design.Alpha
}

// TestShareWaitsForTypingToPause: with a timer, edits reach the address, the link and the
// storage once the typing pauses, not at every keystroke; renders that change nothing do not
// restart the pause, and copying the link publishes a waiting edit first.
func TestShareWaitsForTypingToPause(t *testing.T) {
	b := &timerBrowser{fakeBrowser: newFake("")}
	c := &Share{Model: NewModel(), Browser: b}
	c.Start()
	first := b.Fragment()
	if alphaIn(t, first) != 0.4 {
		t.Fatalf("the starting scenario was not published: %q", first)
	}
	for _, text := range []string{"0.5", "0.55"} {
		if err := c.Model.SetText("in-design-alpha", text); err != nil {
			t.Fatal(err)
		}
		c.Observe()
		c.Observe() // a render that changes nothing
	}
	if b.Fragment() != first || alphaIn(t, c.Link) != 0.4 {
		t.Errorf("published while typing: address %q, link %q", b.Fragment(), c.Link)
	}
	if b.stops != 1 {
		t.Errorf("the pause was restarted %d times for one new keystroke; want 1", b.stops)
	}
	b.fire()
	if alphaIn(t, b.Fragment()) != 0.55 || alphaIn(t, c.Link) != 0.55 {
		t.Errorf("after the pause: address %q, link %q; want alpha 0.55", b.Fragment(), c.Link)
	}
	if _, ok := b.store[AutosaveKey]; !ok {
		t.Error("nothing autosaved after the pause")
	}

	if err := c.Model.SetText("in-design-alpha", "0.6"); err != nil {
		t.Fatal(err)
	}
	c.Observe()
	c.Copy()
	if len(b.copied) != 1 || alphaIn(t, b.copied[0]) != 0.6 {
		t.Errorf("copied %q; want the link with the edit still waiting (alpha 0.6)", b.copied)
	}
	b.fire() // the stopped timer, had it run, changes nothing
	if alphaIn(t, b.Fragment()) != 0.6 {
		t.Errorf("address %q after the copy", b.Fragment())
	}
}
