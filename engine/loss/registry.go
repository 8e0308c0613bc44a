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

var kinds = []struct {
	Kind
	build func(v map[string]float64) (Loss, error)
}{
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
	out := make([]Kind, len(kinds))
	for i, k := range kinds {
		out[i] = k.Kind
		out[i].Params = slices.Clone(k.Params)
	}
	return out
}

// New builds the loss of the given kind. An unknown kind is reported with Field "kind", a
// missing or unknown parameter with its own name.
func New(kind string, params map[string]float64) (Loss, error) {
	i, err := param.Find("kind", "loss", kind, len(kinds), func(i int) string { return kinds[i].Name })
	if err != nil {
		return nil, err
	}
	k := kinds[i]
	v, _, err := param.Gather("loss "+kind, k.Params, params, nil)
	if err != nil {
		return nil, err
	}
	return k.build(v)
}
