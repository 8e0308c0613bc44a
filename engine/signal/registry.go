package signal

import (
	"math"
	"slices"

	"hdrisk/engine/param"
)

// Kind describes one law of the registry.
type Kind struct {
	Name   string // the scenario's signal.law
	Help   string // one line, plain words
	Exact  bool   // whether the mixture is the law itself (see Law.Exact)
	Params []param.Param
}

var (
	inf        = math.Inf(1)
	pDensity   = param.Param{Name: "density", Unit: "fraction of entries", Min: MinDensity, Max: 1, Help: "share of the entries that are nonzero, at least 1e-300 (below, the nonzero entries' variance in units of E[x0^2] leaves double precision)"}
	pVariance  = param.Param{Name: "variance", Unit: "units of x0 squared", Max: inf, MaxOpen: true, Log: true, Role: param.Scale, Help: "variance of a nonzero entry"}
	pAmplitude = param.Param{Name: "amplitude", Unit: "units of x0", Max: inf, MaxOpen: true, Log: true, Role: param.Scale, Help: "size of a nonzero entry, equally often positive and negative"}
)

// lawEntry is a law of the registry with its constructor.
type lawEntry struct {
	Kind
	build func(v map[string]float64, l map[string][]float64) (Law, error)
}

var laws = []lawEntry{
	{Kind{"gauss", "Gaussian entries with mean 0: a dense signal", true, []param.Param{
		{Name: "variance", Unit: "units of x0 squared", Max: inf, MaxOpen: true, Log: true, Role: param.Scale, Help: "variance of every entry"}}},
		func(v map[string]float64, _ map[string][]float64) (Law, error) { return Gauss(v["variance"]) }},
	{Kind{"bernoulli-gauss", "sparse: zero, or Gaussian with the given probability", true, []param.Param{pDensity, pVariance}},
		func(v map[string]float64, _ map[string][]float64) (Law, error) {
			return BernoulliGauss(v["density"], v["variance"])
		}},
	{Kind{"bernoulli-rademacher", "sparse: zero, or plus or minus the amplitude", true, []param.Param{pDensity, pAmplitude}},
		func(v map[string]float64, _ map[string][]float64) (Law, error) {
			return BernoulliRademacher(v["density"], v["amplitude"])
		}},
	{Kind{"laplace", "Laplace (double exponential): heavier tails than Gaussian", false, []param.Param{
		{Name: "scale", Unit: "units of x0", Max: inf, MinOpen: true, MaxOpen: true, Log: true, Role: param.Scale, Help: "mean absolute value of an entry; the variance is 2 scale^2"}}},
		func(v map[string]float64, _ map[string][]float64) (Law, error) { return Laplace(v["scale"]) }},
	{Kind{"uniform", "uniform between -halfwidth and halfwidth", false, []param.Param{
		{Name: "halfwidth", Unit: "units of x0", Max: inf, MinOpen: true, MaxOpen: true, Log: true, Role: param.Scale, Help: "largest absolute value of an entry"}}},
		func(v map[string]float64, _ map[string][]float64) (Law, error) { return Uniform(v["halfwidth"]) }},
	{Kind{"student-t", "Student-t: heavy tails, more so with fewer degrees of freedom", false, []param.Param{
		{Name: "dof", Unit: "degrees of freedom", Min: 2, Max: inf, MinOpen: true, MaxOpen: true, Log: true, Role: param.Shape, Help: "more than 2, so that the variance is finite; above 1e10 the Gaussian law of the same variance"},
		{Name: "scale", Unit: "units of x0", Max: inf, MinOpen: true, MaxOpen: true, Log: true, Role: param.Scale, Help: "spread; the variance is scale^2 dof/(dof - 2)"}}},
		func(v map[string]float64, _ map[string][]float64) (Law, error) { return StudentT(v["dof"], v["scale"]) }},
	{Kind{"gauss-mixture", "a mixture of Gaussians with the given weights, means and variances", true, []param.Param{
		{Name: "weights", Unit: "probability", Min: 0, Max: 1, List: true, MaxLen: MaxMixture, Help: "probability of each component; they sum to 1"},
		{Name: "means", Unit: "units of x0", Min: -inf, Max: inf, MinOpen: true, MaxOpen: true, List: true, MaxLen: MaxMixture, Role: param.Scale, Help: "mean of each component"},
		{Name: "variances", Unit: "units of x0 squared", Max: inf, MaxOpen: true, List: true, Role: param.Scale, MaxLen: MaxMixture, Help: "variance of each component; 0 is a fixed value"}}},
		func(_ map[string]float64, l map[string][]float64) (Law, error) {
			return GaussMixture(l["weights"], l["means"], l["variances"])
		}},
	{Kind{"empirical", "the entries of your own vector, each equally likely", true, []param.Param{
		{Name: "values", Unit: "units of x0", Min: -inf, Max: inf, MinOpen: true, MaxOpen: true, List: true, MaxLen: MaxEmpirical, Role: param.Scale, Help: "the values of the entries"}}},
		func(_ map[string]float64, l map[string][]float64) (Law, error) { return Empirical(l["values"]) }},
}

// Laws lists every law of the registry with its parameters, in a fixed order. The result is a
// fresh copy.
func Laws() []Kind {
	return param.List(laws, func(e lawEntry) Kind { k := e.Kind; k.Params = slices.Clone(k.Params); return k })
}

// New builds the named law from scalar parameters and list parameters, by the names of Laws
// (as in the scenario file: signal.law with its fields). An unknown law is reported with Field
// "law"; a missing or unknown parameter, or one given as a number where a list is expected
// (or the reverse), with its own name as Field; out-of-range values as by the constructors.
func New(law string, params map[string]float64, lists map[string][]float64) (Law, error) {
	k, v, l, err := param.Lookup("law", "law", law, laws, func(e lawEntry) (string, []param.Param) { return e.Name, e.Params }, params, lists)
	if err != nil {
		return nil, err
	}
	return k.build(v, l)
}
