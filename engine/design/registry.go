package design

import (
	"math"

	"hdrisk/engine/param"
)

// Shape describes one shape of the registry: Name is the scenario's design.shape. Every
// shape also takes the sampling ratio alpha and a Scale, which are not listed among its
// Params.
type Shape = param.Kind

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

// shapeEntry is a shape of the registry with its constructor.
type shapeEntry struct {
	Shape
	build func(alpha float64, s Scale, v map[string]float64, l lists) (Law, error)
}

var shapes = []shapeEntry{
	{Shape{Name: "gaussian", Help: "i.i.d. Gaussian entries: Marchenko-Pastur eigenvalues"},
		func(a float64, s Scale, _ map[string]float64, _ lists) (Law, error) { return Gaussian(a, s) }},
	{Shape{Name: "orthogonal", Help: "all nonzero singular values equal: orthonormal rows (or columns)"},
		func(a float64, s Scale, _ map[string]float64, _ lists) (Law, error) { return Orthogonal(a, s) }},
	{Shape{Name: "uniform-sv", Help: "nonzero singular values spread evenly between min and max", Params: []param.Param{svMin, svMax}},
		func(a float64, s Scale, v map[string]float64, _ lists) (Law, error) {
			return UniformSV(a, v["min"], v["max"], s)
		}},
	{Shape{Name: "uniform-ev", Help: "nonzero eigenvalues of F^T F spread evenly between min and max", Params: []param.Param{evMin, evMax}},
		func(a float64, s Scale, v map[string]float64, _ lists) (Law, error) {
			return UniformEV(a, v["min"], v["max"], s)
		}},
	{Shape{Name: "geometric-sv", Help: "singular values spread evenly on a log scale over the given condition number", Params: []param.Param{
		{Name: "condition", Unit: "ratio of largest to smallest singular value", Min: 1, Max: maxCond, Role: param.Shape,
			Help: "condition number of F; 1 is the orthogonal design"}}},
		func(a float64, s Scale, v map[string]float64, _ lists) (Law, error) {
			return GeometricSV(a, v["condition"], s)
		}},
	{Shape{Name: "empirical-sv", Help: "your own singular values, each an equal share of the spectrum", Params: []param.Param{
		{Name: "values", Unit: "singular value", Max: math.Inf(1), MaxOpen: true, List: true, MaxLen: MaxValues, Role: param.Scale,
			Help: "the singular values, in any order"}}},
		func(a float64, s Scale, _ map[string]float64, l lists) (Law, error) {
			return EmpiricalSV(a, l["values"], s)
		}},
}

// Shapes lists every shape of the registry with its parameters, in a fixed order.
// The result is a fresh copy.
func Shapes() []Shape {
	return param.List(shapes, func(e shapeEntry) Shape { return e.Clone() })
}

// New builds the law of the given shape from the sampling ratio, the scale and named
// parameters (the names of Shapes): numbers in params, lists in lists. Optional numbers
// left out take their Default. An unknown shape is reported with Field "shape"; a missing
// or unknown parameter with its own name as Field; values out of range as the
// constructor reports them.
func New(shape string, alpha float64, s Scale, params map[string]float64, lists map[string][]float64) (Law, error) {
	k, v, l, err := param.Lookup("shape", "shape", shape, shapes, func(e shapeEntry) (string, []param.Param) { return e.Name, e.Params }, params, lists)
	if err != nil {
		return nil, err
	}
	return k.build(alpha, s, v, l)
}
