package noise

import (
	"hdrisk/engine/param"
	"math"
	"math/rand/v2"

	"hdrisk/engine/signal"
)

// Component is one Gaussian component N(0, Var) of the noise, with probability Weight.
type Component struct{ Weight, Var float64 }

// Law is the law of one noise entry.
type Law interface {
	// Name is the registry kind, for example "outliers".
	Name() string
	// Variance is the variance of the typical entry (the scenario's noise.variance).
	Variance() float64
	// Second is E[w^2], the variance of an entry drawn from the whole law.
	Second() float64
	// Components returns the Gaussian scale-mixture form (weights sum to 1); a fresh copy.
	Components() []Component
	// Exact reports whether Components is the law itself rather than a discretization.
	Exact() bool
	// Sample returns n independent draws from the law itself.
	Sample(rng *rand.Rand, n int) []float64
}

// mixed wraps a Gaussian mixture of package signal (all means 0) as a noise law.
type mixed struct {
	name     string
	variance float64
	law      signal.Law
	comps    []Component
}

func newMixed(name string, variance float64, l signal.Law) mixed {
	m := l.Mixture()
	c := make([]Component, 0, len(m))
	for _, k := range m {
		if k.Weight > 0 {
			c = append(c, Component{k.Weight, k.Var})
		}
	}
	return mixed{name, variance, l, c}
}

func (m mixed) Name() string            { return m.name }
func (m mixed) Variance() float64       { return m.variance }
func (m mixed) Second() float64         { return m.law.Second() }
func (m mixed) Exact() bool             { return m.law.Exact() }
func (m mixed) Components() []Component { return append([]Component(nil), m.comps...) }
func (m mixed) Sample(rng *rand.Rand, n int) []float64 {
	return m.law.Sample(rng, n)
}

type gauss struct{ variance float64 }

// Gauss returns w ~ N(0, variance) (variance >= 0 finite; 0 is the noiseless model).
func Gauss(variance float64) (Law, error) {
	if err := nonnegative("variance", variance); err != nil {
		return nil, err
	}
	return gauss{variance}, nil
}

func (g gauss) Name() string            { return "gauss" }
func (g gauss) Variance() float64       { return g.variance }
func (g gauss) Second() float64         { return g.variance }
func (g gauss) Exact() bool             { return true }
func (g gauss) Components() []Component { return []Component{{1, g.variance}} }
func (g gauss) Sample(rng *rand.Rand, n int) []float64 {
	out := make([]float64, max(n, 0))
	s := math.Sqrt(g.variance)
	for i := range out {
		out[i] = s * rng.NormFloat64()
	}
	return out
}

// Laplace returns the Laplace law of the given variance (> 0 finite), density
// exp(-|w|/b)/(2b) with b = sqrt(variance/2); its mixture is the one of signal.Laplace.
func Laplace(variance float64) (Law, error) {
	if err := positive("variance", variance); err != nil {
		return nil, err
	}
	l, err := signal.Laplace(math.Sqrt(variance / 2))
	if err != nil {
		return nil, param.Errorf("variance", "%s", err.Error())
	}
	return newMixed("laplace", variance, l), nil
}

// StudentT returns the Student-t law with dof > 2 degrees of freedom scaled to the given
// variance (> 0 finite): w = s t_dof with s^2 = variance (dof - 2)/dof.
func StudentT(variance, dof float64) (Law, error) {
	if err := positive("variance", variance); err != nil {
		return nil, err
	}
	if math.IsNaN(dof) || math.IsInf(dof, 0) || !(dof > 2) {
		return nil, param.Errorf("dof", "must be a finite number > 2 (got %v): with 2 or fewer degrees of freedom the variance is infinite", dof)
	}
	l, err := signal.StudentT(dof, math.Sqrt(variance*(dof-2)/dof))
	if err != nil {
		return nil, param.Errorf("dof", "%s", err.Error())
	}
	return newMixed("student-t", variance, l), nil
}

// Outliers returns w ~ N(0, outlierVariance) with probability fraction and N(0, variance)
// otherwise (fraction in [0, 1), both variances >= 0 finite).
func Outliers(variance, fraction, outlierVariance float64) (Law, error) {
	if err := nonnegative("variance", variance); err != nil {
		return nil, err
	}
	if math.IsNaN(fraction) || !(fraction >= 0 && fraction < 1) {
		return nil, param.Errorf("fraction", "must be in [0, 1) (got %v)", fraction)
	}
	if err := nonnegative("outlier_variance", outlierVariance); err != nil {
		return nil, err
	}
	l, err := signal.GaussMixture([]float64{1 - fraction, fraction}, []float64{0, 0}, []float64{variance, outlierVariance})
	if err != nil {
		return nil, param.Errorf("fraction", "%s", err.Error())
	}
	return newMixed("outliers", variance, l), nil
}

func nonnegative(field string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
		return param.Errorf(field, "must be a finite number >= 0 (got %v)", v)
	}
	return nil
}

func positive(field string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) || !(v > 0) {
		return param.Errorf(field, "must be a finite number > 0 (got %v)", v)
	}
	return nil
}
