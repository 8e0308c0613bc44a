package ui

import (
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/vugu/vugu"
)

func (c *Editor) inputMode(f Field) string {
	if f.List {
		return "text"
	}
	return "decimal"
}

func (c *Editor) invalidText(id string) string {
	if c.Invalid[id] != "" {
		return "true"
	}
	return "false"
}

func (c *Editor) describedBy(id string) string {
	if c.Invalid[id] != "" {
		return "err-" + id + " help-" + id
	}
	return "help-" + id
}

// helpText is the line under an input: its range, its unit and what it means.
func (c *Editor) helpText(f Field) string {
	t := capital(f.Range())
	if f.Unit != "" {
		t += "; " + f.Unit
	}
	return t + ". " + capital(f.Help) + "."
}

func (c *Editor) staleText() string {
	if c.PlotsStale {
		return "true"
	}
	return "false"
}

func (c *Editor) caption(what string, p lawPlot) string {
	if p.URL == "" {
		return p.Alt
	}
	if c.PlotsStale {
		return what + " (last valid scenario; the inputs above are not valid)"
	}
	return what
}

func (c *Editor) scaleHelp() string {
	for _, k := range Scales {
		if k.Name == c.Model.Scale {
			return capital(k.Help) + "."
		}
	}
	return ""
}

// capital returns s with its first letter in upper case.
func capital(s string) string {
	r, n := utf8.DecodeRuneInString(s)
	if n == 0 {
		return s
	}
	return string(unicode.ToUpper(r)) + strings.TrimSuffix(s[n:], ".")
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
