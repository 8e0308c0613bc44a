package ui

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/vugu/vugu"

	"hdrisk/engine/scenario"
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
	t += ". " + capital(f.Help) + "."
	if c.Model.alphaLocked(f) {
		t += c.Model.alphaLockNote()
	}
	return t
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

// A list whose text is longer than maxListChars is not put in its box: the page's renderer
// passes every property through a 16 KB buffer and stops the page on a longer one. Such a
// list (a measured spectrum, a sample of thousands of values) is kept as it is and stated in
// one line; its box stays empty and locked until the user asks to replace the list.

// compact tells whether f is a list too long to show in its box.
func compact(f Field) bool { return f.List && len(f.Text) > maxListChars }

// boxText is what f's box shows: its text, or nothing for a compact list.
func (c *Editor) boxText(f Field) string {
	if compact(f) {
		return ""
	}
	return f.Text
}

// locked tells whether f's box refuses typing: a compact list the user has not asked to
// replace.
func (c *Editor) locked(f Field) bool {
	return compact(f) && c.replacing[f.ID] != f.Text || c.Model.alphaLocked(f)
}

// placeholder is the hint in an empty box of a compact list.
func (c *Editor) placeholder(f Field) string {
	if !compact(f) {
		return ""
	}
	if c.locked(f) {
		return "the list is too long to show here"
	}
	return "type or paste the numbers that replace the list"
}

// listSummary states a compact list in one line: how many values, their range.
func (c *Editor) listSummary(f Field) string {
	return c.summed(f).line
}

// listSum is the summary of a compact list, kept until its text changes.
type listSum struct{ text, line, count string }

func (c *Editor) summed(f Field) listSum {
	if s, ok := c.sums[f.ID]; ok && s.text == f.Text {
		return s
	}
	n, lo, hi, bad := 0, math.Inf(1), math.Inf(-1), 0
	for _, w := range listWords(f.Text) {
		n++
		v, err := strconv.ParseFloat(w, 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			bad++
			continue
		}
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	s := fmt.Sprintf("%d values, from %s to %s", n, strconv.FormatFloat(lo, 'g', 4, 64), strconv.FormatFloat(hi, 'g', 4, 64))
	if bad == n {
		s = fmt.Sprintf("%d entries, none of them a number", n)
	} else if bad > 0 {
		s += fmt.Sprintf(" (%d entries are not numbers)", bad)
	}
	s += fmt.Sprintf("; kept as they are, %d characters being too long to show here.", len(f.Text))
	if c.sums == nil {
		c.sums = map[string]listSum{}
	}
	sum := listSum{text: f.Text, line: s, count: strconv.Itoa(n)}
	c.sums[f.ID] = sum
	return sum
}

// listCount is the number of entries of a compact list, for its data-list-count hook.
func (c *Editor) listCount(f Field) string { return c.summed(f).count }

// replaceLabel is the text of the button beside a compact list.
func (c *Editor) replaceLabel(f Field) string {
	if c.locked(f) {
		return "Replace the list…"
	}
	return "Keep the listed values"
}

// toggleReplace unlocks a compact list's box for a new list, or locks it again.
func (c *Editor) toggleReplace(f Field) {
	if c.replacing == nil {
		c.replacing = map[string]string{}
	}
	if c.locked(f) {
		c.replacing[f.ID] = f.Text
	} else {
		delete(c.replacing, f.ID)
	}
}

// fieldDescribedBy is the aria-describedby of f's box: with the summary of a compact list.
func (c *Editor) fieldDescribedBy(f Field) string {
	if compact(f) {
		return "sum-" + f.ID + " " + c.describedBy(f.ID)
	}
	return c.describedBy(f.ID)
}

// The ids of the title and notes boxes.
const (
	TitleInputID = "scenario-title"
	NotesInputID = "scenario-notes"
)

func (c *Editor) retitle(e vugu.DOMEvent) {
	c.Model.Title = e.PropString("target", "value")
	c.Changed()
}

func (c *Editor) renote(e vugu.DOMEvent) {
	c.Model.Notes = e.PropString("target", "value")
	c.Changed()
}

func (c *Editor) titleHelp() string {
	return fmt.Sprintf("One line, at most %d characters; it travels with the link and names saved files.", scenario.MaxTitle)
}

func (c *Editor) notesHelp() string {
	return fmt.Sprintf("Free text, at most %d characters; it travels with the link.", scenario.MaxNotes)
}
