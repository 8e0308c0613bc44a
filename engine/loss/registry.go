package loss

import (
	"math"
	"slices"

	"hdrisk/engine/param"
)

// Kind describes one loss of the registry.
type Kind struct {
	Name   string // the scenario's loss.kind
	Help   string
	Labels bool // needs labels y = +-1
	Params []param.Param
}

// entry is a loss of the registry with its constructor.
type entry struct {
	Kind
	build func(v map[string]float64) (Loss, error)
}

var kinds = []entry{
	{Kind{"square", "least squares, (y - z)^2/2: today's estimator", false, nil},
		func(map[string]float64) (Loss, error) { return Square(), nil }},
	{Kind{"huber", "Huber: quadratic for small residuals, linear beyond the width (robust to outliers)", false, []param.Param{
		{Name: "width", Label: "Huber width", Log: true, Role: param.Scale, Unit: "units of y", Max: math.Inf(1), MinOpen: true, MaxOpen: true,
			Help: "residual size where the loss turns from quadratic to linear"}}},
		func(v map[string]float64) (Loss, error) { return Huber(v["width"]) }},
	{Kind{"absolute", "least absolute deviations, |y - z|", false, nil},
		func(map[string]float64) (Loss, error) { return Absolute(), nil }},
	{Kind{"logistic", "logistic regression, log(1 + exp(-y z)); labels only", true, nil},
		func(map[string]float64) (Loss, error) { return Logistic(), nil }},
	{Kind{"hinge", "support vector machine, max(0, 1 - y z); labels only", true, nil},
		func(map[string]float64) (Loss, error) { return Hinge(), nil }},
}

// Kinds lists every loss of the registry, in a fixed order; a fresh copy.
func Kinds() []Kind {
	return param.List(kinds, func(e entry) Kind { k := e.Kind; k.Params = slices.Clone(k.Params); return k })
}

// New builds the loss of the given kind. An unknown kind is reported with Field "kind", a
// missing or unknown parameter with its own name.
func New(kind string, params map[string]float64) (Loss, error) {
	k, v, _, err := param.Lookup("kind", "loss", kind, kinds, func(e entry) (string, []param.Param) { return e.Name, e.Params }, params, nil)
	if err != nil {
		return nil, err
	}
	return k.build(v)
}
