package ui

import (
	"strings"
	"testing"
)

// guardBrowser is the fake browser with a guarded paste box.
type guardBrowser struct {
	*fakeBrowser
	id      string
	limit   int
	refused func(int)
}

func (b *guardBrowser) GuardInput(id string, limit int, refused func(int)) {
	b.id, b.limit, b.refused = id, limit, refused
}

// TestSharePasteRefusedAsItArrives: the paste box is guarded with the paste limit, and an
// oversized paste is refused at once, on the share tab, leaving the scenario as it was.
func TestSharePasteRefusedAsItArrives(t *testing.T) {
	b := &guardBrowser{fakeBrowser: newFake("")}
	shown := ""
	c := &Share{Model: NewModel(), Browser: b, Show: func(v string) { shown = v }}
	c.Start()
	if b.id != PasteInputID || b.limit != MaxPaste || b.refused == nil {
		t.Fatalf("guard on %q with limit %d; want %q and %d", b.id, b.limit, PasteInputID, MaxPaste)
	}
	before := c.fingerprint()
	b.refused(10 << 20)
	if !strings.Contains(c.Message, "10485760 characters") || !strings.Contains(c.Message, "left empty") || shown != "share" {
		t.Errorf("refusal %q shown on %q", c.Message, shown)
	}
	if c.fingerprint() != before {
		t.Error("the refused paste changed the scenario")
	}
}
