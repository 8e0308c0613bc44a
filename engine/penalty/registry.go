package penalty

import (
	"fmt"
	"math"
	"slices"

	"hdrisk/engine/param"
)

// Kind describes one penalty of the registry: Name is the scenario's penalty.kind.
type Kind = param.Kind

var (
	l1Param = param.Param{Name: "l1", Unit: "loss per unit of |x|", Max: math.Inf(1), MaxOpen: true,
		Log: true, Role: param.Strength,
		Help: "strength of the absolute-value term; larger values set more entries to zero"}
	l2Param = param.Param{Name: "l2", Unit: "loss per unit of x^2", Max: math.Inf(1), MaxOpen: true,
		Log: true, Role: param.Strength,
		Help: "strength of the squared term (l2/2) x^2; larger values shrink every entry"}
)

func optional(p param.Param) param.Param {
	p.Optional = true
	return p
}

type entry struct {
	Kind
	build func(v map[string]float64) (Penalty, error)
}

var kinds = []entry{
	{Kind{Name: "l1", Help: "LASSO: l1 |x|, sets small entries exactly to zero", Params: []param.Param{l1Param}},
		func(v map[string]float64) (Penalty, error) { return L1(v["l1"]) }},
	{Kind{Name: "ridge", Help: "ridge: (l2/2) x^2, shrinks every entry, sets none to zero", Params: []param.Param{l2Param}},
		func(v map[string]float64) (Penalty, error) { return Ridge(v["l2"]) }},
	{Kind{Name: "elastic-net", Help: "elastic net: l1 |x| + (l2/2) x^2, LASSO and ridge together", Params: []param.Param{l1Param, l2Param}},
		func(v map[string]float64) (Penalty, error) { return ElasticNet(v["l1"], v["l2"]) }},
	{Kind{Name: "nonneg-l1", Help: "nonnegative LASSO: l1 x + (l2/2) x^2 with every entry kept >= 0", Params: []param.Param{l1Param, optional(l2Param)}},
		func(v map[string]float64) (Penalty, error) { return NonnegL1(v["l1"], v["l2"]) }},
	{Kind{Name: "box", Help: "box: every entry kept within [-bound, bound], with an optional (l2/2) x^2", Params: []param.Param{
		{Name: "bound", Unit: "units of x0", Max: math.Inf(1), MinOpen: true, MaxOpen: true, Log: true, Role: param.Scale,
			Help: "largest allowed absolute value of an entry"},
		optional(l2Param)}},
		func(v map[string]float64) (Penalty, error) { return Box(v["bound"], v["l2"]) }},
	{Kind{Name: "huber", Help: "Huber: quadratic for |x| <= width, l1 |x| beyond; shrinks large entries less than ridge", Params: []param.Param{
		{Name: "l1", Unit: "loss per unit of |x|", Max: math.Inf(1), MaxOpen: true, Log: true, Role: param.Strength,
			Help: "slope of the penalty beyond the width"},
		{Name: "width", Unit: "units of x0", Max: math.Inf(1), MinOpen: true, MaxOpen: true, Log: true, Role: param.Scale,
			Help: "where the penalty turns from quadratic to linear"}}},
		func(v map[string]float64) (Penalty, error) { return Huber(v["l1"], v["width"]) }},
	{Kind{Name: "power", Help: "power: weight |x|^q with q >= 1: the LASSO at q = 1, ridge at q = 2, towards a box beyond", Params: []param.Param{
		{Name: "weight", Unit: "loss per unit of |x|^q", Max: math.Inf(1), MaxOpen: true, Log: true, Role: param.Strength,
			Help: "strength of the penalty"},
		{Name: "q", Unit: "dimensionless", Min: 1, Max: MaxPowerQ, Role: param.Shape,
			Help: "exponent; q below 1 would make the penalty non-convex and is refused"}}},
		func(v map[string]float64) (Penalty, error) { return Power(v["weight"], v["q"]) }},
}

// Register adds a penalty kind to the registry, after those already there; the scenario
// decoder, the command line and the page's editor then offer it with its parameters. build
// receives every parameter by name (optional ones left out at their Default) and returns
// the penalty or a *param.Error naming the parameter. Register is meant for init functions:
// it must not run while the registry is read.
//
// Special cases are: an empty or taken name, a parameter without a name or with Min > Max,
// a name given twice, and a nil build are refused with a *param.Error.
func Register(k Kind, build func(v map[string]float64) (Penalty, error)) error {
	if k.Name == "" || build == nil {
		return &param.Error{Field: "kind", Reason: "a penalty needs a name and a constructor"}
	}
	seen := map[string]bool{}
	for _, p := range k.Params {
		if p.Name == "" || !(p.Min <= p.Max) || seen[p.Name] {
			return &param.Error{Field: k.Name, Reason: fmt.Sprintf("parameter %q: needs a unique name and Min <= Max", p.Name)}
		}
		seen[p.Name] = true
	}
	for _, e := range kinds {
		if e.Name == k.Name {
			return &param.Error{Field: "kind", Reason: fmt.Sprintf("penalty %q is registered already", k.Name)}
		}
	}
	k.Params = slices.Clone(k.Params)
	kinds = append(kinds, entry{k, build})
	return nil
}

// Kinds lists every penalty of the registry with its parameters, in a fixed order.
// The result is a fresh copy.
func Kinds() []Kind {
	return param.List(kinds, func(e entry) Kind { return e.Clone() })
}

// New builds the penalty of the given kind from named parameters (the names of Kinds).
// Optional parameters left out take their Default. An unknown kind is reported with Field
// "kind"; a missing, unknown or out-of-range parameter with its own name as Field.
func New(kind string, params map[string]float64) (Penalty, error) {
	k, v, _, err := param.Lookup("kind", "penalty", kind, kinds, func(e entry) (string, []param.Param) { return e.Name, e.Params }, params, nil)
	if err != nil {
		return nil, err
	}
	return k.build(v)
}

// Strengths of the power penalty: its weight, at every q.
func (p power) Strengths() []Strength { return []Strength{{"weight", p.weight}} }
