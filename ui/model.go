package ui

import (
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Param is one editable number (or list of numbers) of a scenario, under its contract-1 name.
type Param struct {
	Name    string // JSON key within its group, e.g. "l1"
	Label   string // what the input is called on the page
	Default string // the starting text of the input
	List    bool   // a list of numbers, separated by commas or spaces
}

// Kind is one choice of a group's menu (a design shape, a signal law, a penalty kind).
type Kind struct {
	Name   string // contract-1 value, e.g. "elastic-net"
	Label  string
	Params []Param
}

// Group is one object of the scenario file: "design", "signal", "noise" or "penalty".
type Group struct {
	Name    string  // JSON object name
	Title   string  // heading on the page
	KindKey string  // JSON key naming the kind ("shape", "law", "kind"); empty if none
	Kinds   []Kind  // menu; empty if the group has no kinds
	Common  []Param // parameters every kind of the group has
}

// Groups lists the editable parts of a scenario in page order. The names and kinds are those
// of contract 1 (architecture.md); labels are the page's own.
var Groups = []Group{
	{
		Name: "design", Title: "Measurement design", KindKey: "shape",
		Common: []Param{{Name: "alpha", Label: "Sampling ratio m/n", Default: "0.4"}},
		Kinds: []Kind{
			{Name: "orthogonal", Label: "Orthogonal rows"},
			{Name: "gaussian", Label: "Gaussian entries"},
			{Name: "uniform-sv", Label: "Uniform singular values", Params: []Param{
				{Name: "min", Label: "Smallest singular value", Default: "0.5"},
				{Name: "max", Label: "Largest singular value", Default: "1.5"}}},
			{Name: "uniform-ev", Label: "Uniform eigenvalues of FᵀF", Params: []Param{
				{Name: "min", Label: "Smallest eigenvalue", Default: "0.25"},
				{Name: "max", Label: "Largest eigenvalue", Default: "2.25"}}},
			{Name: "geometric-sv", Label: "Geometric singular values", Params: []Param{
				{Name: "condition", Label: "Condition number", Default: "10"}}},
			{Name: "empirical-sv", Label: "Listed singular values", Params: []Param{
				{Name: "values", Label: "Singular values", Default: "1, 0.8, 0.6, 0.4", List: true}}},
		},
	},
	{
		Name: "signal", Title: "Signal entries", KindKey: "law",
		Kinds: []Kind{
			{Name: "bernoulli-gauss", Label: "Sparse Gaussian", Params: []Param{
				{Name: "density", Label: "Share of nonzero entries", Default: "0.05"},
				{Name: "variance", Label: "Variance of a nonzero entry", Default: "1"}}},
			{Name: "gauss", Label: "Gaussian", Params: []Param{
				{Name: "variance", Label: "Variance", Default: "1"}}},
			{Name: "bernoulli-rademacher", Label: "Sparse ±amplitude", Params: []Param{
				{Name: "density", Label: "Share of nonzero entries", Default: "0.05"},
				{Name: "amplitude", Label: "Amplitude", Default: "1"}}},
			{Name: "laplace", Label: "Laplace", Params: []Param{
				{Name: "scale", Label: "Scale", Default: "1"}}},
			{Name: "uniform", Label: "Uniform", Params: []Param{
				{Name: "halfwidth", Label: "Half-width", Default: "1"}}},
			{Name: "student-t", Label: "Student t", Params: []Param{
				{Name: "dof", Label: "Degrees of freedom", Default: "5"},
				{Name: "scale", Label: "Scale", Default: "1"}}},
			{Name: "gauss-mixture", Label: "Gaussian mixture", Params: []Param{
				{Name: "weights", Label: "Weights", Default: "0.9, 0.1", List: true},
				{Name: "means", Label: "Means", Default: "0, 0", List: true},
				{Name: "variances", Label: "Variances", Default: "0, 1", List: true}}},
			{Name: "empirical", Label: "Listed sample values", Params: []Param{
				{Name: "values", Label: "Sample values", Default: "0, 0, 0, 1, -1", List: true}}},
		},
	},
	{
		Name: "noise", Title: "Measurement noise",
		Common: []Param{{Name: "variance", Label: "Noise variance", Default: "0.01"}},
	},
	{
		Name: "penalty", Title: "Penalty", KindKey: "kind",
		Kinds: []Kind{
			{Name: "elastic-net", Label: "Elastic net", Params: []Param{
				{Name: "l1", Label: "L1 weight", Default: "0.05"},
				{Name: "l2", Label: "L2 weight", Default: "0"}}},
			{Name: "l1", Label: "L1 (LASSO)", Params: []Param{
				{Name: "l1", Label: "L1 weight", Default: "0.05"}}},
			{Name: "ridge", Label: "Ridge", Params: []Param{
				{Name: "l2", Label: "L2 weight", Default: "0.1"}}},
			{Name: "nonneg-l1", Label: "Nonnegative L1", Params: []Param{
				{Name: "l1", Label: "L1 weight", Default: "0.05"},
				{Name: "l2", Label: "L2 weight", Default: "0"}}},
			{Name: "box", Label: "Box constraint", Params: []Param{
				{Name: "bound", Label: "Bound on |x|", Default: "1"},
				{Name: "l2", Label: "L2 weight", Default: "0"}}},
			{Name: "huber", Label: "Huber", Params: []Param{
				{Name: "l1", Label: "Weight", Default: "0.05"},
				{Name: "width", Label: "Width of the quadratic part", Default: "0.1"}}},
			{Name: "power", Label: "Power |x|^q", Params: []Param{
				{Name: "weight", Label: "Weight", Default: "0.05"},
				{Name: "q", Label: "Exponent q (1 to 2)", Default: "1.5"}}},
		},
	},
}

// Scales are the choices of design.scale (contract 1, method.md section 1).
var Scales = []Kind{
	{Name: "rows", Label: "Rows of unit norm (E λ = m/n)"},
	{Name: "columns", Label: "Columns of unit norm (E λ = 1)"},
	{Name: "as-given", Label: "As given"},
}

// Model is the scenario being edited: the chosen kind of each group and the text of every
// input. Texts are kept per kind and parameter, so switching a menu back and forth keeps
// what was typed.
type Model struct {
	Title string
	Scale string
	kinds map[string]string // group -> kind name
	texts map[string]string // "group/kind/param" (kind empty for common params) -> text
}

// NewModel returns the starting scenario: the first kind of each menu with its defaults.
// It is an invented example, not data from any study.
func NewModel() *Model {
	m := &Model{Title: "Invented example: sparse signal, orthogonal design", Scale: "rows",
		kinds: map[string]string{}, texts: map[string]string{}}
	for _, g := range Groups {
		if len(g.Kinds) > 0 {
			m.kinds[g.Name] = g.Kinds[0].Name
		}
	}
	return m
}

// FindGroup returns the group named name.
func FindGroup(name string) (Group, bool) {
	for _, g := range Groups {
		if g.Name == name {
			return g, true
		}
	}
	return Group{}, false
}

// Kind returns the kind chosen in group g ("" for a group without kinds).
func (m *Model) Kind(g string) string { return m.kinds[g] }

// SetKind chooses kind in group g. Special cases are: an unknown group or kind is an error
// and changes nothing.
func (m *Model) SetKind(g, kind string) error {
	grp, ok := FindGroup(g)
	if !ok {
		return fmt.Errorf("%s: unknown part of the scenario", g)
	}
	for _, k := range grp.Kinds {
		if k.Name == kind {
			m.kinds[g] = kind
			return nil
		}
	}
	return fmt.Errorf("%s.%s: unknown choice %q", g, grp.KindKey, kind)
}

// SetScale chooses design.scale. Special cases are: an unknown scale is an error.
func (m *Model) SetScale(s string) error {
	for _, k := range Scales {
		if k.Name == s {
			m.Scale = s
			return nil
		}
	}
	return fmt.Errorf("design.scale: unknown choice %q", s)
}

// Field is one input as the page shows it.
type Field struct {
	ID    string // element id, unique on the page
	Path  string // contract-1 path, e.g. "penalty.l1"
	Label string
	Text  string
	List  bool
	key   string
}

// Fields returns the inputs of group g for its chosen kind: the common ones first.
func (m *Model) Fields(g string) []Field {
	grp, _ := FindGroup(g)
	var out []Field
	add := func(kind string, p Param) {
		key := g + "/" + kind + "/" + p.Name
		text, ok := m.texts[key]
		if !ok {
			text = p.Default
		}
		id := "in-" + g + "-" + p.Name
		if kind != "" {
			id = "in-" + g + "-" + kind + "-" + p.Name
		}
		out = append(out, Field{ID: id, Path: g + "." + p.Name, Label: p.Label, Text: text, List: p.List, key: key})
	}
	for _, p := range grp.Common {
		add("", p)
	}
	for _, k := range grp.Kinds {
		if k.Name == m.kinds[g] {
			for _, p := range k.Params {
				add(k.Name, p)
			}
		}
	}
	return out
}

// SetText stores the text typed into the input with the given element id.
// Special cases are: an id that is not an input of the current choices is an error.
func (m *Model) SetText(id, text string) error {
	for _, g := range Groups {
		for _, f := range m.Fields(g.Name) {
			if f.ID == id {
				m.texts[f.key] = text
				return nil
			}
		}
	}
	return fmt.Errorf("no input %q in the current scenario", id)
}

// maxList is the longest list the editor sends; the engine states its own cap and names it
// if this one is larger.
const maxList = 10000

// JSON returns the scenario file (contract 1, version 1) for the current inputs. Only the
// form of the numbers is checked here; their ranges are the engine's to check.
// Special cases are: text that is not a finite number, or an empty or overlong list, is an
// error naming the field, e.g. "penalty.l1: not a number: "abc"".
func (m *Model) JSON() ([]byte, error) {
	doc := map[string]any{"kind": "hdrisk.scenario", "version": 1, "title": m.Title}
	for _, g := range Groups {
		obj := map[string]any{}
		if g.KindKey != "" {
			obj[g.KindKey] = m.kinds[g.Name]
		}
		if g.Name == "design" {
			obj["scale"] = m.Scale
		}
		for _, f := range m.Fields(g.Name) {
			v, err := parseField(f)
			if err != nil {
				return nil, err
			}
			obj[f.Path[len(g.Name)+1:]] = v
		}
		doc[g.Name] = obj
	}
	return json.Marshal(doc)
}

func parseField(f Field) (any, error) {
	if !f.List {
		return parseNumber(f.Path, f.Text)
	}
	words := strings.FieldsFunc(f.Text, func(r rune) bool { return r == ',' || r == ';' || r == ' ' || r == '\t' || r == '\n' })
	if len(words) == 0 {
		return nil, fmt.Errorf("%s: the list is empty", f.Path)
	}
	if len(words) > maxList {
		return nil, fmt.Errorf("%s: %d numbers, more than the %d the page accepts", f.Path, len(words), maxList)
	}
	vs := make([]float64, len(words))
	for i, w := range words {
		v, err := parseNumber(fmt.Sprintf("%s[%d]", f.Path, i), w)
		if err != nil {
			return nil, err
		}
		vs[i] = v
	}
	return vs, nil
}

func parseNumber(path, text string) (float64, error) {
	t := strings.TrimSpace(text)
	if t == "" {
		return 0, fmt.Errorf("%s: empty; type a number", path)
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil {
		return 0, fmt.Errorf("%s: not a number: %q", path, t)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%s: not a finite number: %q", path, t)
	}
	return v, nil
}
