package scenario

import (
	"errors"
	"math"
	"sync"

	"hdrisk/engine/signal"
)

var (
	signalsOnce sync.Once
	signalFam   *family
)

var (
	nonneg   = param{Max: math.Inf(1), MaxOpen: true}
	positive = param{Max: math.Inf(1), MinOpen: true, MaxOpen: true}
	anyReal  = param{Min: math.Inf(-1), Max: math.Inf(1), MinOpen: true, MaxOpen: true}
)

func named(p param, name, label, unit string) param {
	p.Name, p.Label, p.Unit = name, label, unit
	return p
}

func list(p param, maxLen int) param {
	p.List, p.MaxLen = true, maxLen
	return p
}

// signalLaws pairs each law with its constructor, in the order of the contract.
var signalLaws = []struct {
	kindSpec
	build func(v map[string]float64, l map[string][]float64) (signal.Law, error)
}{
	{kindSpec{"gauss", "Gaussian entries", []param{
		named(nonneg, "variance", "variance of each entry", "units of x0 squared")}},
		func(v map[string]float64, _ map[string][]float64) (signal.Law, error) {
			return signal.Gauss(v["variance"])
		}},
	{kindSpec{"bernoulli-gauss", "sparse: zero, or Gaussian with probability density", []param{
		{Name: "density", Label: "fraction of nonzero entries", Min: 0, Max: 1, MinOpen: true},
		named(nonneg, "variance", "variance of a nonzero entry", "units of x0 squared")}},
		func(v map[string]float64, _ map[string][]float64) (signal.Law, error) {
			return signal.BernoulliGauss(v["density"], v["variance"])
		}},
	{kindSpec{"bernoulli-rademacher", "sparse: zero, or plus or minus amplitude with probability density", []param{
		{Name: "density", Label: "fraction of nonzero entries", Min: 0, Max: 1, MinOpen: true},
		named(nonneg, "amplitude", "size of a nonzero entry", "units of x0")}},
		func(v map[string]float64, _ map[string][]float64) (signal.Law, error) {
			return signal.BernoulliRademacher(v["density"], v["amplitude"])
		}},
	{kindSpec{"laplace", "Laplace (double exponential) entries", []param{
		named(positive, "scale", "scale b (variance 2 b^2)", "units of x0")}},
		func(v map[string]float64, _ map[string][]float64) (signal.Law, error) {
			return signal.Laplace(v["scale"])
		}},
	{kindSpec{"uniform", "entries uniform on [-halfwidth, halfwidth]", []param{
		named(positive, "halfwidth", "half the width of the range", "units of x0")}},
		func(v map[string]float64, _ map[string][]float64) (signal.Law, error) {
			return signal.Uniform(v["halfwidth"])
		}},
	{kindSpec{"student-t", "heavy-tailed Student-t entries", []param{
		{Name: "dof", Label: "degrees of freedom (more than 2)", Min: 2, Max: math.Inf(1), MinOpen: true, MaxOpen: true},
		named(positive, "scale", "scale of the law", "units of x0")}},
		func(v map[string]float64, _ map[string][]float64) (signal.Law, error) {
			return signal.StudentT(v["dof"], v["scale"])
		}},
	{kindSpec{"gauss-mixture", "a finite mixture of Gaussians", []param{
		list(param{Name: "weights", Label: "probability of each component", Min: 0, Max: 1}, signal.MaxMixture),
		list(named(anyReal, "means", "mean of each component", "units of x0"), signal.MaxMixture),
		list(named(nonneg, "variances", "variance of each component", "units of x0 squared"), signal.MaxMixture)}},
		func(_ map[string]float64, l map[string][]float64) (signal.Law, error) {
			return signal.GaussMixture(l["weights"], l["means"], l["variances"])
		}},
	{kindSpec{"empirical", "your own values, each equally likely", []param{
		list(named(anyReal, "values", "the values", "units of x0"), signal.MaxEmpirical)}},
		func(_ map[string]float64, l map[string][]float64) (signal.Law, error) {
			return signal.Empirical(l["values"])
		}},
}

func signals() *family {
	signalsOnce.Do(func() {
		f := &family{Object: "signal", Key: "law", Noun: "law"}
		for _, k := range signalLaws {
			for i, p := range k.Params {
				k.Params[i].Log = !p.List && logScale(p.Min, p.Max)
			}
			f.Kinds = append(f.Kinds, k.kindSpec)
		}
		signalFam = f
	})
	return signalFam
}

func buildSignal(s Signal) (signal.Law, error) {
	for _, k := range signalLaws {
		if k.Name == s.Law {
			l, err := k.build(s.Params, s.Lists)
			return l, asField("signal", err)
		}
	}
	return nil, fieldErr("signal.law", "unknown law %q (known: %s)", clip(s.Law, 40), signals().names())
}

func signalField(object string, err error) error {
	var se *signal.ParamError
	if errors.As(err, &se) {
		return &FieldError{Field: join(object, se.Field), Reason: se.Reason}
	}
	return &FieldError{Field: object, Reason: err.Error()}
}
