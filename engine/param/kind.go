package param

import (
	"fmt"
	"maps"
	"slices"
	"strings"
)

// Kind is one entry of a registry: a design shape or a penalty kind, with the parameters
// it takes (the signal laws add whether the law is exact).
type Kind struct {
	Name   string // the value of the scenario's key: design.shape, penalty.kind
	Help   string // one line, plain words
	Params []Param
}

// Clone returns k with a copy of its Params, so that a caller may change it freely.
func (k Kind) Clone() Kind {
	k.Params = slices.Clone(k.Params)
	return k
}

// Gather checks the values given for the parameters ps of a registry entry, for its
// constructor: each parameter is given as a number or as a list, as it is declared; an
// optional number left out takes its Default and an optional list left out stays out; no
// other name is given. what names the entry in messages ("penalty l1", "shape uniform-sv").
// It returns the numbers and lists to build from. Errors are *Error with the parameter's
// name as Field: "missing (penalty l1 needs it)", "not a parameter of penalty l1 (its
// parameters: l1)", "must be a list of numbers".
func Gather(what string, ps []Param, nums map[string]float64, lists map[string][]float64) (map[string]float64, map[string][]float64, error) {
	v := make(map[string]float64, len(ps))
	l := map[string][]float64{}
	known := map[string]bool{}
	for _, p := range ps {
		known[p.Name] = true
		x, isNum := nums[p.Name]
		xs, isList := lists[p.Name]
		switch {
		case p.List && isNum:
			return nil, nil, &Error{Field: p.Name, Reason: "must be a list of numbers"}
		case !p.List && isList:
			return nil, nil, &Error{Field: p.Name, Reason: "must be a single number"}
		case isNum:
			v[p.Name] = x
		case isList:
			l[p.Name] = xs
		case p.Optional && !p.List:
			v[p.Name] = p.Default
		case !p.Optional:
			return nil, nil, &Error{Field: p.Name, Reason: fmt.Sprintf("missing (%s needs it)", what)}
		}
	}
	for _, m := range []map[string]bool{keySet(nums), keySet(lists)} {
		for _, name := range slices.Sorted(maps.Keys(m)) {
			if !known[name] {
				return nil, nil, &Error{Field: name, Reason: fmt.Sprintf("not a parameter of %s (its parameters: %s)", what, Names(ps))}
			}
		}
	}
	return v, l, nil
}

func keySet[V any](m map[string]V) map[string]bool {
	s := make(map[string]bool, len(m))
	for k := range m {
		s[k] = true
	}
	return s
}

// Names returns the names of ps joined by ", ", or "none" when there are none.
func Names(ps []Param) string {
	if len(ps) == 0 {
		return "none"
	}
	n := make([]string, len(ps))
	for i, p := range ps {
		n[i] = p.Name
	}
	return strings.Join(n, ", ")
}

// Lookup is the body of every registry's New: it finds the entry called want among entries,
// whose name and parameters parts gives (Find: an unknown name is an *Error under field), and
// checks the numbers and lists given for it (Gather, which names the entry "NOUN want"). It
// returns the entry with the numbers and lists to build it from.
func Lookup[E any](field, noun, want string, entries []E, parts func(E) (string, []Param), nums map[string]float64, lists map[string][]float64) (E, map[string]float64, map[string][]float64, error) {
	var zero E
	i, err := Find(field, noun, want, len(entries), func(i int) string { n, _ := parts(entries[i]); return n })
	if err != nil {
		return zero, nil, nil, err
	}
	_, ps := parts(entries[i])
	v, l, err := Gather(noun+" "+want, ps, nums, lists)
	if err != nil {
		return zero, nil, nil, err
	}
	return entries[i], v, l, nil
}

// List returns kind(e) for every entry, in order: a registry's listing of its kinds, where
// kind returns a copy that the caller may change (with its own Params).
func List[E, K any](entries []E, kind func(E) K) []K {
	out := make([]K, len(entries))
	for i, e := range entries {
		out[i] = kind(e)
	}
	return out
}
