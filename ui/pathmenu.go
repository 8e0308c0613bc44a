package ui

import (
	"strings"

	"hdrisk/engine/scenario"
)

// pathChoice is one entry of a menu of the numbers a study can vary.
type pathChoice struct {
	Name  string // the short name the study keeps ("l1", "alpha")
	Text  string // what the menu shows: the page's name for it and its short name
	Title string // what it is, shown on hover
}

// pathChoices keeps the menu of the numbers a study can vary. While the scenario in the
// editor is invalid its numbers cannot be listed, and the menu keeps those of the last valid
// scenario rather than going empty under the user's pointer.
type pathChoices struct {
	key  string
	list []pathChoice
}

// of returns the menu for the model's scenario, or the last one listed.
func (k *pathChoices) of(m *Model) []pathChoice {
	paths := modelPaths(m)
	if paths == nil {
		return k.list
	}
	key := m.Scale
	for _, g := range Groups() {
		key += "|" + m.Kind(g.Name)
	}
	if key == k.key && k.list != nil {
		return k.list
	}
	k.key, k.list = key, make([]pathChoice, 0, len(paths))
	for _, p := range paths {
		k.list = append(k.list, pathChoice{Name: p.Name, Text: pathMenuText(m, p), Title: pathTitle(p)})
	}
	return k.list
}

// pathMenuText names a number as the editor labels its input, followed by its short name:
// "L1 weight (l1)", "Sampling ratio m/n (alpha)". Special cases are: a number the editor has
// no label for is shown by its short name alone.
func pathMenuText(m *Model, p scenario.PathInfo) string {
	group, param, ok := strings.Cut(p.Path, ".")
	if !ok {
		return p.Name
	}
	label, found := lookup(paramLabels, group, m.Kind(group), param)
	if !found || label == p.Name {
		return p.Name
	}
	return label + " (" + p.Name + ")"
}

// pathTitle says what a number is and its unit.
func pathTitle(p scenario.PathInfo) string {
	t := pathOption(p)
	if p.Unit != "" {
		t += " (" + p.Unit + ")"
	}
	return t
}

// varyChoices is the curve's "Vary" menu.
func (c *CurveView) varyChoices() []pathChoice { return c.vary.of(c.Model) }

// varyChoices is the map's "Vary" menus.
func (c *Mapview) varyChoices() []pathChoice { return c.vary.of(c.Model) }
