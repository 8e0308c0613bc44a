package scenario

import (
	"math"
	"strings"
)

// param describes one numeric parameter (or list of numbers) of a shape, a law or a
// penalty kind, as the engine registries state it. The scenario format never lists these
// itself: adding a law to a registry makes it readable, writable and sweepable here.
type param struct {
	Name, Label, Unit string
	Min, Max          float64 // closed bounds unless MinOpen / MaxOpen
	MinOpen, MaxOpen  bool
	Log               bool // a sweep over it is best spaced logarithmically
	List              bool // a list of numbers rather than one number
	MaxLen            int  // for lists
	Optional          bool // may be left out; Default is then used and written back
	Default           float64
	full              string // the JSON path, "penalty.l1", set when the registry is read
}

// kindSpec is one entry of a registry: a shape, a law or a penalty kind.
type kindSpec struct {
	Name, Label string
	Params      []param
}

func (k kindSpec) param(name string) (param, bool) {
	for _, p := range k.Params {
		if p.Name == name {
			return p, true
		}
	}
	return param{}, false
}

// family is one registry as the scenario sees it: design shapes, signal laws or penalty
// kinds, with the JSON object ("design") and the key that names the kind ("shape").
type family struct {
	Object, Key, Noun string
	Kinds             []kindSpec
}

func (f *family) find(name string) (kindSpec, bool) {
	for _, k := range f.Kinds {
		if k.Name == name {
			return k, true
		}
	}
	return kindSpec{}, false
}

func (f *family) names() string {
	n := make([]string, len(f.Kinds))
	for i, k := range f.Kinds {
		n[i] = k.Name
	}
	return strings.Join(n, ", ")
}

// isParamOfAny reports whether name is a parameter of some kind of the family, so that
// a misplaced parameter gets a better message than "unknown field".
func (f *family) isParamOfAny(name string) bool {
	for _, k := range f.Kinds {
		if _, ok := k.param(name); ok {
			return true
		}
	}
	return false
}

// check reports whether x lies in the stated range of p.
func (p param) check(path string, x float64) error {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return fieldErr(path, "must be a finite number")
	}
	lo, hi := p.Min, p.Max
	if x < lo || (p.MinOpen && x == lo) || x > hi || (p.MaxOpen && x == hi) {
		return fieldErr(path, "must be in %s, not %s", p.rangeText(), num(x))
	}
	return nil
}

func (p param) rangeText() string {
	l, r := "[", "]"
	if p.MinOpen {
		l = "("
	}
	if p.MaxOpen {
		r = ")"
	}
	return l + num(p.Min) + ", " + num(p.Max) + r
}
