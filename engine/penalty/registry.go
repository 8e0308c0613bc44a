package penalty

import (
	"fmt"
	"maps"
	"math"
	"slices"
	"strings"
)

// Param describes one parameter of a penalty kind for the scenario decoder and the page's
// menus. The domain is the interval from Min to Max, with each end excluded when MinOpen or
// MaxOpen is set.
type Param struct {
	Name             string
	Unit             string
	Min, Max         float64
	MinOpen, MaxOpen bool
	Optional         bool    // may be left out; then Default is used
	Default          float64 // the value used when an optional parameter is left out
	Help             string  // one line, plain words
}

// Kind describes one penalty of the registry.
type Kind struct {
	Name   string // the scenario's penalty.kind
	Help   string // one line, plain words
	Params []Param
}

var (
	l1Param = Param{Name: "l1", Unit: "loss per unit of |x|", Max: math.Inf(1), MaxOpen: true,
		Help: "strength of the absolute-value term; larger values set more entries to zero"}
	l2Param = Param{Name: "l2", Unit: "loss per unit of x^2", Max: math.Inf(1), MaxOpen: true,
		Help: "strength of the squared term (l2/2) x^2; larger values shrink every entry"}
)

func optional(p Param) Param {
	p.Optional = true
	return p
}

var kinds = []struct {
	Kind
	build func(v map[string]float64) (Penalty, error)
}{
	{Kind{"l1", "LASSO: l1 |x|, sets small entries exactly to zero", []Param{l1Param}},
		func(v map[string]float64) (Penalty, error) { return L1(v["l1"]) }},
	{Kind{"ridge", "ridge: (l2/2) x^2, shrinks every entry, sets none to zero", []Param{l2Param}},
		func(v map[string]float64) (Penalty, error) { return Ridge(v["l2"]) }},
	{Kind{"elastic-net", "elastic net: l1 |x| + (l2/2) x^2, LASSO and ridge together", []Param{l1Param, l2Param}},
		func(v map[string]float64) (Penalty, error) { return ElasticNet(v["l1"], v["l2"]) }},
	{Kind{"nonneg-l1", "nonnegative LASSO: l1 x + (l2/2) x^2 with every entry kept >= 0", []Param{l1Param, optional(l2Param)}},
		func(v map[string]float64) (Penalty, error) { return NonnegL1(v["l1"], v["l2"]) }},
	{Kind{"box", "box: every entry kept within [-bound, bound], with an optional (l2/2) x^2", []Param{
		{Name: "bound", Unit: "units of x0", Max: math.Inf(1), MinOpen: true, MaxOpen: true,
			Help: "largest allowed absolute value of an entry"},
		optional(l2Param)}},
		func(v map[string]float64) (Penalty, error) { return Box(v["bound"], v["l2"]) }},
	{Kind{"huber", "Huber: quadratic for |x| <= width, l1 |x| beyond; shrinks large entries less than ridge", []Param{
		{Name: "l1", Unit: "loss per unit of |x|", Max: math.Inf(1), MaxOpen: true,
			Help: "slope of the penalty beyond the width"},
		{Name: "width", Unit: "units of x0", Max: math.Inf(1), MinOpen: true, MaxOpen: true,
			Help: "where the penalty turns from quadratic to linear"}}},
		func(v map[string]float64) (Penalty, error) { return Huber(v["l1"], v["width"]) }},
	{Kind{"power", "power: weight |x|^q with q >= 1: the LASSO at q = 1, ridge at q = 2, towards a box beyond", []Param{
		{Name: "weight", Unit: "loss per unit of |x|^q", Max: math.Inf(1), MaxOpen: true,
			Help: "strength of the penalty"},
		{Name: "q", Unit: "dimensionless", Min: 1, Max: MaxPowerQ,
			Help: "exponent; q below 1 would make the penalty non-convex and is refused"}}},
		func(v map[string]float64) (Penalty, error) { return Power(v["weight"], v["q"]) }},
}

// Kinds lists every penalty of the registry with its parameters, in a fixed order.
// The result is a fresh copy.
func Kinds() []Kind {
	out := make([]Kind, len(kinds))
	for i, k := range kinds {
		out[i] = k.Kind
		out[i].Params = slices.Clone(k.Params)
	}
	return out
}

// New builds the penalty of the given kind from named parameters (the names of Kinds).
// Optional parameters left out take their Default. An unknown kind is reported with Field
// "kind"; a missing, unknown or out-of-range parameter with its own name as Field.
func New(kind string, params map[string]float64) (Penalty, error) {
	names := make([]string, len(kinds))
	for i, k := range kinds {
		names[i] = k.Name
		if k.Name != kind {
			continue
		}
		v := make(map[string]float64, len(k.Params))
		for _, p := range k.Params {
			x, ok := params[p.Name]
			switch {
			case ok:
				v[p.Name] = x
			case p.Optional:
				v[p.Name] = p.Default
			default:
				return nil, &ParamError{p.Name, fmt.Sprintf("missing (penalty %s needs it)", kind)}
			}
		}
		for _, name := range slices.Sorted(maps.Keys(params)) {
			if _, ok := v[name]; !ok {
				return nil, &ParamError{name, fmt.Sprintf("not a parameter of penalty %s (its parameters: %s)", kind, paramNames(k.Params))}
			}
		}
		return k.build(v)
	}
	return nil, &ParamError{"kind", fmt.Sprintf("unknown penalty %q (known: %s)", kind, strings.Join(names, ", "))}
}

func paramNames(ps []Param) string {
	n := make([]string, len(ps))
	for i, p := range ps {
		n[i] = p.Name
	}
	return strings.Join(n, ", ")
}
