package ui

import "github.com/vugu/vugu"

func (c *Editor) menuLabel(g Group) string {
	switch g.KindKey {
	case "shape":
		return "Shape of the spectrum"
	case "law":
		return "Distribution"
	default:
		return "Kind"
	}
}

func (c *Editor) inputMode(f Field) string {
	if f.List {
		return "text"
	}
	return "decimal"
}

func (c *Editor) pick(e vugu.DOMEvent, group string) {
	if c.Model.SetKind(group, e.PropString("target", "value")) == nil {
		c.Changed()
	}
}

func (c *Editor) pickScale(e vugu.DOMEvent) {
	if c.Model.SetScale(e.PropString("target", "value")) == nil {
		c.Changed()
	}
}

func (c *Editor) typed(e vugu.DOMEvent, id string) {
	if c.Model.SetText(id, e.PropString("target", "value")) == nil {
		c.Changed()
	}
}
