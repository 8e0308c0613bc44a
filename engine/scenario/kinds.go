package scenario

import (
	"strings"

	"hdrisk/engine/param"
)

// kindSpec is one entry of a registry: a shape, a law or a penalty kind, with the
// parameters its registry states. The scenario format never lists these itself: adding
// a law to a registry makes it readable, writable and sweepable here.
type kindSpec struct {
	Name, Label string
	Params      []param.Param
	full        []string // the JSON path of each parameter, "penalty.l1"
}

func (k kindSpec) param(name string) (param.Param, bool) {
	for _, p := range k.Params {
		if p.Name == name {
			return p, true
		}
	}
	return param.Param{}, false
}

// family is one registry as the scenario sees it: design shapes, signal laws or penalty
// kinds, with the JSON object ("design") and the key that names the kind ("shape").
type family struct {
	Object, Key, Noun string
	Kinds             []kindSpec
}

func (f *family) add(name, label string, ps []param.Param) {
	k := kindSpec{Name: name, Label: label, Params: ps}
	for _, p := range ps {
		k.full = append(k.full, f.Object+"."+p.Name)
	}
	f.Kinds = append(f.Kinds, k)
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
