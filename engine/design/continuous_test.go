package design

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// continuousCase is a continuous shape with its unscaled nonzero part written as a flat
// density in a variable x on [lo, hi] and the map from x to lambda; s1 is the closed form of
// E[1/(lambda + g)] over that part.
type continuousCase struct {
	name   string
	make   func(alpha float64, s Scale) (Law, error)
	lo, hi float64
	lam    func(x float64) float64
	s1     func(g float64) float64
	s2     func(g float64) (float64, bool) // S2 of the shape, and whether its form serves at g
	e1     float64                         // E[lambda] of the unscaled nonzero part
}

// continuousCases gives the closed forms of S1 for each continuous shape, elementary
// integrals (common practice): for lambda uniform on [a, b], log(1 + (b - a)/(a + g))/(b - a);
// for sigma uniform on [a, b], atan((b - a) sqrt g/(g + a b))/(sqrt g (b - a)); for log sigma
// uniform on [-L, 0], log(1 + g (e^2L - 1)/(1 + g))/(2 g L).
func continuousCases() []continuousCase {
	ev := func(a, b float64) continuousCase {
		return continuousCase{
			name: fmt.Sprintf("uniform-ev[%v,%v]", a, b),
			make: func(alpha float64, s Scale) (Law, error) { return UniformEV(alpha, a, b, s) },
			lo:   a, hi: b, lam: func(x float64) float64 { return x },
			s1: func(g float64) float64 { return math.Log1p((b-a)/(a+g)) / (b - a) },
			s2: func(g float64) (float64, bool) { return 1 / ((a + g) * (b + g)), true },
			e1: (a + b) / 2,
		}
	}
	sv := func(a, b float64) continuousCase {
		return continuousCase{
			name: fmt.Sprintf("uniform-sv[%v,%v]", a, b),
			make: func(alpha float64, s Scale) (Law, error) { return UniformSV(alpha, a, b, s) },
			lo:   a, hi: b, lam: func(x float64) float64 { return x * x },
			s1: func(g float64) float64 {
				r := math.Sqrt(g)
				return math.Atan((b-a)*r/(g+a*b)) / (r * (b - a))
			},
			// int dsigma/(sigma^2 + g)^2 = sigma/(2g(sigma^2 + g)) + atan(sigma/sqrt g)/(2 g^1.5),
			// which cancels below g = a b: not used there.
			s2: func(g float64) (float64, bool) {
				r := math.Sqrt(g)
				s1 := math.Atan((b-a)*r/(g+a*b)) / (r * (b - a))
				return ((g-a*b)/((b*b+g)*(a*a+g)) + s1) / (2 * g), g >= a*b || a == 0
			},
			e1: (a*a + a*b + b*b) / 3,
		}
	}
	geo := func(cond float64) continuousCase {
		ll := math.Log(cond)
		return continuousCase{
			name: fmt.Sprintf("geometric-sv[%v]", cond),
			make: func(alpha float64, s Scale) (Law, error) { return GeometricSV(alpha, cond, s) },
			lo:   -ll, hi: 0, lam: func(x float64) float64 { return math.Exp(2 * x) },
			s1: func(g float64) float64 { return math.Log1p(g*math.Expm1(2*ll)/(1+g)) / (2 * g * ll) },
			e1: -math.Expm1(-2*ll) / (2 * ll),
		}
	}
	return []continuousCase{
		ev(0, 3), ev(0.5, 3), ev(1e-9, 1), ev(2.9, 3), ev(1e-25, 1),
		sv(0, 2), sv(0.5, 2), sv(1e-7, 1), sv(1.9, 2), sv(1e-14, 1),
		geo(1.5), geo(10), geo(1e4), geo(1e8), geo(1e15),
	}
}

// TestContinuousS1ClosedForm checks that the discretization has converged: S1 of the
// discrete law against the closed form, from 1e-30 to 1e10 times the mean eigenvalue (far
// below the smallest eigenvalue of spreads up to 1e28, and far below the graded panels of a
// support that reaches 0), for alpha below and above 1 and every scale; and, for the
// shapes without an atom at 0 (alpha >= 1), S2 against its closed form and the identities
// T = 1 - g S1 and S3 = S1 - g S2, which the sums form from other terms.
func TestContinuousS1ClosedForm(t *testing.T) {
	for _, c := range continuousCases() {
		for _, alpha := range []float64{0.4, 1, 3} {
			for _, s := range []Scale{Rows, Columns, AsGiven} {
				l, err := c.make(alpha, s)
				if err != nil {
					t.Fatal(err)
				}
				p0, q := parts(alpha)
				f := s.factor(alpha, q*c.e1)
				for e := -30.0; e <= 10; e += 0.5 {
					g := math.Pow(10, e) * l.Mean()
					want := p0/g + q*c.s1(g/f)/f
					tr := l.At(g)
					// 2e-12: measured 1.1e-12 with sigma from 1e-14 at g = 1e-30, where the
					// lowest panel's pole is nearest (rho^-48 with rho = 1.9 per panel).
					if got := tr.S1; !close(got, want, 2e-12) {
						t.Errorf("%s alpha=%v %v g=%g: S1 = %.17g, want %.17g", c.name, alpha, s, g, got, want)
					}
					if c.s2 == nil || p0 > 0 {
						continue
					}
					if s2, ok := c.s2(g / f); ok {
						if got, want := tr.S2, s2/f/f; !close(got, want, 3e-12) { // measured 1.2e-12: the double pole
							t.Errorf("%s alpha=%v %v g=%g: S2 = %.17g, want %.17g", c.name, alpha, s, g, got, want)
						}
					}
					if gs := g * tr.S1; gs < 0.5 && !close(tr.T, 1-gs, 1e-12) {
						t.Errorf("%s alpha=%v %v g=%g: T = %.17g, 1 - g S1 = %.17g", c.name, alpha, s, g, tr.T, 1-gs)
					}
					if gs := g * tr.S2; gs < 0.5*tr.S1 && !close(tr.S3, tr.S1-gs, 1e-12) {
						t.Errorf("%s alpha=%v %v g=%g: S3 = %.17g, S1 - g S2 = %.17g", c.name, alpha, s, g, tr.S3, tr.S1-gs)
					}
				}
			}
		}
	}
}

// TestContinuousAgainstQuadrature checks every transform against direct Gauss-Legendre
// quadrature of the flat density with 3000 nodes (gonum integrate/quad) on one panel, for
// g from 1e-2 to 1e4 times the mean, where that rule has converged.
func TestContinuousAgainstQuadrature(t *testing.T) {
	const n = 3000
	x, w := make([]float64, n), make([]float64, n)
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	for _, c := range continuousCases() {
		for _, alpha := range []float64{0.4, 3} {
			l, err := c.make(alpha, Columns)
			if err != nil {
				t.Fatal(err)
			}
			p0, q := parts(alpha)
			f := Columns.factor(alpha, q*c.e1)
			for e := -2.0; e <= 4; e++ {
				g := math.Pow(10, e) * l.Mean()
				mean := func(h func(lam float64) float64, at0 float64) float64 {
					var in float64
					for i, xi := range x {
						in += w[i] * h(f*c.lam(c.lo+(c.hi-c.lo)*(xi+1)/2))
					}
					return p0*at0 + q*in/2
				}
				s1 := mean(func(x float64) float64 { return 1 / (x + g) }, 1/g)
				want := Transforms{
					S1:    s1,
					S2:    mean(func(x float64) float64 { return 1 / (x + g) / (x + g) }, 1/g/g),
					S3:    mean(func(x float64) float64 { return x / (x + g) / (x + g) }, 0),
					T:     mean(func(x float64) float64 { return x / (x + g) }, 0),
					W:     mean(func(x float64) float64 { d := 1/(x+g) - s1; return d * d }, (1/g-s1)*(1/g-s1)) / (s1 * s1),
					S2Pos: mean(func(x float64) float64 { return 1 / (x + g) / (x + g) }, 0),
				}
				compare(t, fmt.Sprintf("%s alpha=%v g=%g", c.name, alpha, g), l.At(g), want, 1e-11)
			}
		}
	}
}
