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

// MinDensity is the smallest density of the Bernoulli laws: in the solver's units, where
// E[x0^2] = 1, the nonzero part has variance 1/density, which beyond 1e300 leaves the
// double-precision numbers (a density of 5e-324 with a variance of 5e99, say).
const MinDensity = 1e-300

func checkDensity(v float64) error {
	if err := finite("density", v); err != nil {
		return err
	}
	if !(v >= MinDensity && v <= 1) {
		return &param.Error{Field: "density", Reason: fmt.Sprintf("must be in [%g, 1] (got %v): below %g the nonzero entries' variance in units of E[x0^2], 1/density, leaves the range of double-precision numbers", MinDensity, v, MinDensity)}
	}
	return nil
}

// scaled is the law of x0/s for a law of x0, in the solver's units (docs/method.md section 3).
type scaled struct {
	mixture
	base   Law
	s, sec float64
	fold   folded
}

// Scaled returns the law of x0/s (s > 0 finite) for the law l of x0: its mixture has the
// means divided by s and the variances by s^2; Name and Exact are those of l. The solver
// works in units where E[x0^2] = 1 so that laws of any size (variances from 1e-300 to 1e300)
// meet the same numbers.
//
// Special cases are: s = 1 returns l itself.
func Scaled(l Law, s float64) Law {
	if s == 1 {
		return l
	}
	if u, ok := l.(unitSecond); ok {
		// The solver's units (E[x0^2] = 1), prepared once with the law rather than copied
		// at every solve.
		if pre := u.atUnitSecond(); pre != nil && s == math.Sqrt(l.Second()) {
			return *pre
		}
	}
	return scaleBy(l, s)
}

// unitSecond is a law that keeps Scaled(l, sqrt(l.Second())) (nil when not prepared).
type unitSecond interface{ atUnitSecond() *scaled }

// prepareUnitSecond returns scaleBy(l, sqrt(l.Second())) for a law to keep (see unitSecond),
// nil when that is l itself.
func prepareUnitSecond(l Law) *scaled {
	s := math.Sqrt(l.Second())
	if s == 1 {
		return nil
	}
	sc := scaleBy(l, s).(scaled)
	return &sc
}

// scaleBy is Scaled without the prepared laws.
func scaleBy(l Law, s float64) Law {
	var comps []Component
	var fold folded
	if u, ok := l.(unitScale); ok {
		// Rescaled from the law of scale 1, so that no variance passes through the square
		// of a scale near 1e150 (the heavy tail of a Student-t law would overflow there).
		src, sc := u.unitComponents()
		f := sc / s
		comps = make([]Component, len(src))
		for i, c := range src {
			comps[i] = Component{c.Weight, c.Mean * f, c.Var * f * f}
		}
		if uf, ok := l.(unitFolder); ok {
			if fu := uf.unitFoldedTail(); fu.comps != nil {
				fold.comps = make([]Component, len(fu.comps))
				for i, c := range fu.comps {
					fold.comps[i] = Component{c.Weight, c.Mean * f, c.Var * f * f}
				}
				fold.vmin = fu.vmin * f * f
			}
		}
	} else {
		src := componentsOf(l)
		comps = make([]Component, len(src))
		for i, c := range src {
			comps[i] = Component{c.Weight, c.Mean / s, c.Var / s / s}
		}
	}
	return scaled{mixture{comps}, l, s, l.Second() / s / s, fold}
}

// folded is a mixture whose components of largest variance have been replaced by a few (the
// Student-t mixture's heavy tail, see foldTail), and the smallest variance among the new
// ones: at a channel noise t, a prox whose kinks k all satisfy k^2 + t <= foldReach vmin meets
// the same moments from it (docs/method.md section 6). comps is nil when nothing was folded.
type folded struct {
	comps []Component
	vmin  float64
}

// foldReach bounds the kinks for which Expect uses a folded mixture (see folded): measured,
// the moments then move by less than 1e-10 relative (TestStudentTTailFold).
const foldReach = 0.1

// folder is a law that offers a folded mixture beside its own; unitFolder offers the folded
// mixture of its law of scale 1 (see unitScale).
type folder interface{ foldedTail() folded }
type unitFolder interface{ unitFoldedTail() folded }

func (l scaled) foldedTail() folded { return l.fold }

// unitScale is a law that is its scale times a law of scale 1: unitComponents returns the
// mixture of the latter and the scale.
type unitScale interface {
	unitComponents() ([]Component, float64)
}

func (l scaled) Name() string    { return l.base.Name() }
func (l scaled) Exact() bool     { return l.base.Exact() }
func (l scaled) Second() float64 { return l.sec }
func (l scaled) Sample(rng *rand.Rand, n int) []float64 {
	x := l.base.Sample(rng, n)
	for i := range x {
		x[i] /= l.s
	}
	return x
}
