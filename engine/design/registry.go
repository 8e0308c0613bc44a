package design

import (
	"fmt"
	"maps"
	"math"
	"slices"
	"strings"

	"hdrisk/engine/param"
)

// Shape describes one shape of the registry. Every shape also takes the sampling ratio
// alpha and a Scale, which are not listed among its Params.
type Shape struct {
	Name   string // the scenario's design.shape
	Help   string // one line, plain words
	Params []param.Param
}

var (
	svMin = param.Param{Name: "min", Unit: "singular value", Max: math.Inf(1), MaxOpen: true,
		Log: true, Role: param.Scale,
		Help: "smallest singular value, before scaling"}
	svMax = param.Param{Name: "max", Unit: "singular value", Max: math.Inf(1), MinOpen: true, MaxOpen: true,
		Log: true, Role: param.Scale,
		Help: "largest singular value, before scaling"}
	evMin = param.Param{Name: "min", Unit: "eigenvalue", Max: math.Inf(1), MaxOpen: true,
		Log: true, Role: param.Scale,
		Help: "smallest nonzero eigenvalue of F^T F, before scaling"}
	evMax = param.Param{Name: "max", Unit: "eigenvalue", Max: math.Inf(1), MinOpen: true, MaxOpen: true,
		Log: true, Role: param.Scale,
		Help: "largest eigenvalue of F^T F, before scaling"}
)

type lists = map[string][]float64

var shapes = []struct {
	Shape
	build func(alpha float64, s Scale, v map[string]float64, l lists) (Law, error)
}{
	{Shape{"gaussian", "i.i.d. Gaussian entries: Marchenko-Pastur eigenvalues", nil},
		func(a float64, s Scale, _ map[string]float64, _ lists) (Law, error) { return Gaussian(a, s) }},
	{Shape{"orthogonal", "all nonzero singular values equal: orthonormal rows (or columns)", nil},
		func(a float64, s Scale, _ map[string]float64, _ lists) (Law, error) { return Orthogonal(a, s) }},
	{Shape{"uniform-sv", "nonzero singular values spread evenly between min and max", []param.Param{svMin, svMax}},
		func(a float64, s Scale, v map[string]float64, _ lists) (Law, error) {
			return UniformSV(a, v["min"], v["max"], s)
		}},
	{Shape{"uniform-ev", "nonzero eigenvalues of F^T F spread evenly between min and max", []param.Param{evMin, evMax}},
		func(a float64, s Scale, v map[string]float64, _ lists) (Law, error) {
			return UniformEV(a, v["min"], v["max"], s)
		}},
	{Shape{"geometric-sv", "singular values spread evenly on a log scale over the given condition number", []param.Param{
		{Name: "condition", Unit: "ratio of largest to smallest singular value", Min: 1, Max: maxCond, Role: param.Shape,
			Help: "condition number of F; 1 is the orthogonal design"}}},
		func(a float64, s Scale, v map[string]float64, _ lists) (Law, error) {
			return GeometricSV(a, v["condition"], s)
		}},
	{Shape{"empirical-sv", "your own singular values, each an equal share of the spectrum", []param.Param{
		{Name: "values", Unit: "singular value", Max: math.Inf(1), MaxOpen: true, List: true, MaxLen: MaxValues, Role: param.Scale,
			Help: "the singular values, in any order"}}},
		func(a float64, s Scale, _ map[string]float64, l lists) (Law, error) {
			return EmpiricalSV(a, l["values"], s)
		}},
}

// Shapes lists every shape of the registry with its parameters, in a fixed order.
// The result is a fresh copy.
func Shapes() []Shape {
	out := make([]Shape, len(shapes))
	for i, k := range shapes {
		out[i] = k.Shape
		out[i].Params = slices.Clone(k.Params)
	}
	return out
}

// New builds the law of the given shape from the sampling ratio, the scale and named
// parameters (the names of Shapes): numbers in params, lists in lists. Optional numbers
// left out take their Default. An unknown shape is reported with Field "shape"; a missing
// or unknown parameter with its own name as Field; values out of range as the
// constructor reports them.
func New(shape string, alpha float64, s Scale, params map[string]float64, lists map[string][]float64) (Law, error) {
	names := make([]string, len(shapes))
	for i, k := range shapes {
		names[i] = k.Name
		if k.Name != shape {
			continue
		}
		v := make(map[string]float64, len(k.Params))
		l := make(map[string][]float64)
		for _, p := range k.Params {
			if p.List {
				x, ok := lists[p.Name]
				if !ok {
					return nil, &param.Error{Field: p.Name, Reason: fmt.Sprintf("missing (shape %s needs it)", shape)}
				}
				l[p.Name] = x
				continue
			}
			x, ok := params[p.Name]
			switch {
			case ok:
				v[p.Name] = x
			case p.Optional:
				v[p.Name] = p.Default
			default:
				return nil, &param.Error{Field: p.Name, Reason: fmt.Sprintf("missing (shape %s needs it)", shape)}
			}
		}
		for _, name := range slices.Sorted(maps.Keys(params)) {
			if _, ok := v[name]; !ok {
				return nil, &param.Error{Field: name, Reason: fmt.Sprintf("not a parameter of shape %s (its parameters: %s)", shape, paramNames(k.Params))}
			}
		}
		for _, name := range slices.Sorted(maps.Keys(lists)) {
			if _, ok := l[name]; !ok {
				return nil, &param.Error{Field: name, Reason: fmt.Sprintf("not a parameter of shape %s (its parameters: %s)", shape, paramNames(k.Params))}
			}
		}
		return k.build(alpha, s, v, l)
	}
	return nil, &param.Error{Field: "shape", Reason: fmt.Sprintf("unknown shape %q (known: %s)", shape, strings.Join(names, ", "))}
}

func paramNames(ps []param.Param) string {
	if len(ps) == 0 {
		return "none besides alpha and scale"
	}
	n := make([]string, len(ps))
	for i, p := range ps {
		n[i] = p.Name
	}
	return strings.Join(n, ", ")
}
