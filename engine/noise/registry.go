package noise

import (
	"math"
	"slices"

	"hdrisk/engine/param"
)

// Kind describes one law of the registry.
type Kind struct {
	Name   string // the scenario's noise.law
	Help   string
	Params []param.Param
}

// entry is a noise law of the registry with its constructor.
type entry struct {
	Kind
	build func(variance float64, v map[string]float64) (Law, error)
}

var kinds = []entry{
	{Kind{"gauss", "Gaussian noise: today's model", nil},
		func(d float64, _ map[string]float64) (Law, error) { return Gauss(d) }},
	{Kind{"laplace", "Laplace (double exponential) noise: heavier tails than Gaussian", nil},
		func(d float64, _ map[string]float64) (Law, error) { return Laplace(d) }},
	{Kind{"student-t", "Student-t noise: heavy tails, more so with fewer degrees of freedom", []param.Param{
		{Name: "dof", Label: "degrees of freedom of the noise", Role: param.Shape, Unit: "degrees of freedom", Min: 2, Max: math.Inf(1), MinOpen: true, MaxOpen: true,
			Help: "degrees of freedom, above 2 so that the variance is finite"}}},
		func(d float64, v map[string]float64) (Law, error) { return StudentT(d, v["dof"]) }},
	{Kind{"outliers", "Gaussian noise where a fraction of the entries has a larger variance", []param.Param{
		{Name: "fraction", Label: "outlier fraction", Unit: "fraction of entries", Min: 0, Max: 1, MaxOpen: true,
			Help: "share of the entries that are outliers"},
		{Name: "outlier_variance", Label: "outlier variance", Log: true, Role: param.Scale, Unit: "units of y squared", Max: math.Inf(1), MaxOpen: true,
			Help: "variance of an outlier entry"}}},
		func(d float64, v map[string]float64) (Law, error) {
			return Outliers(d, v["fraction"], v["outlier_variance"])
		}},
}

// Kinds lists every law of the registry, in a fixed order; a fresh copy.
func Kinds() []Kind {
	return param.List(kinds, func(e entry) Kind { k := e.Kind; k.Params = slices.Clone(k.Params); return k })
}

// New builds the law of the given kind with the typical entry's variance and the kind's
// own parameters. An unknown kind is reported with Field "law", a missing or unknown
// parameter with its own name.
func New(kind string, variance float64, params map[string]float64) (Law, error) {
	k, v, _, err := param.Lookup("law", "law", kind, kinds, func(e entry) (string, []param.Param) { return e.Name, e.Params }, params, nil)
	if err != nil {
		return nil, err
	}
	return k.build(variance, v)
}
