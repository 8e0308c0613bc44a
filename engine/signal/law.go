package signal

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"hdrisk/engine/param"
)

// Component is one Gaussian component x0 ~ N(Mean, Var) of a mixture, with probability Weight.
// Var = 0 is a point mass at Mean.
type Component struct{ Weight, Mean, Var float64 }

// active reports whether x0 drawn from the component is nonzero with probability one: every
// component except a point mass at 0.
func (c Component) active() bool { return c.Var != 0 || c.Mean != 0 }

// Law is the law of one entry of x0.
type Law interface {
	// Name is the registry name, for example "bernoulli-gauss".
	Name() string
	// Mixture returns the Gaussian-mixture form (a fresh copy): exact, or a quadrature of a
	// scale mixture or of a continuous law. Weights sum to 1.
	Mixture() []Component
	// Exact reports whether Mixture is the law itself rather than a discretization.
	Exact() bool
	// Second returns rho2 = E[x0^2] from the law's own formula (not from the mixture).
	Second() float64
	// Sample returns n independent draws from the law itself (not from its discretization);
	// n <= 0 gives an empty slice.
	Sample(rng *rand.Rand, n int) []float64
}

// mixture is the Gaussian-mixture form shared by every law of this package.
type mixture struct{ comps []Component }

func (m mixture) Mixture() []Component    { return slices.Clone(m.comps) }
func (m mixture) components() []Component { return m.comps }

// componentser lets Expect read the stored mixture of this package's laws without the copy
// that Mixture makes.
type componentser interface{ components() []Component }

func componentsOf(l Law) []Component {
	if c, ok := l.(componentser); ok {
		return c.components()
	}
	return l.Mixture()
}

func finite(field string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return &param.Error{Field: field, Reason: fmt.Sprintf("must be a finite number (got %v)", v)}
	}
	return nil
}

func nonnegative(field string, v float64) error {
	if err := finite(field, v); err != nil {
		return err
	}
	if v < 0 {
		return &param.Error{Field: field, Reason: fmt.Sprintf("must be >= 0 (got %v)", v)}
	}
	return nil
}

func positive(field string, v float64) error {
	if err := finite(field, v); err != nil {
		return err
	}
	if v <= 0 {
		return &param.Error{Field: field, Reason: fmt.Sprintf("must be > 0 (got %v)", v)}
	}
	return nil
}

func checkDensity(v float64) error {
	if err := finite("density", v); err != nil {
		return err
	}
	if !(v > 0 && v <= 1) {
		return &param.Error{Field: "density", Reason: fmt.Sprintf("must be in (0, 1] (got %v)", v)}
	}
	return nil
}
