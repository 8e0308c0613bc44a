package fixedpoint

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/integrate/quad"
)

// Gaussian helpers for the output side of the generalized linear model (docs/method.md section
// 10). Probabilities of intervals come from erfc on the side away from the mean, so that a
// cell far in a tail keeps its relative accuracy.

const invSqrt2Pi = 0.3989422804014327

func normPDF(x float64) float64 { return invSqrt2Pi * math.Exp(-x*x/2) }

// normCell returns P(a <= Z < b) for a standard normal Z (a <= b, either may be infinite).
func normCell(a, b float64) float64 {
	switch {
	case a >= 0:
		return (math.Erfc(a/math.Sqrt2) - math.Erfc(b/math.Sqrt2)) / 2
	case b <= 0:
		return (math.Erfc(-b/math.Sqrt2) - math.Erfc(-a/math.Sqrt2)) / 2
	}
	return 1 - (math.Erfc(-a/math.Sqrt2)+math.Erfc(b/math.Sqrt2))/2
}

// truncMoments returns E[V^k 1{lo <= V < hi}], k = 0, 1, 2, for V ~ N(0, s2), s2 > 0.
func truncMoments(lo, hi, s2 float64) (m0, m1, m2 float64) {
	s := math.Sqrt(s2)
	a, b := lo/s, hi/s
	m0 = normCell(a, b)
	pa, pb := 0.0, 0.0
	if !math.IsInf(a, 0) {
		pa = normPDF(a)
	}
	if !math.IsInf(b, 0) {
		pb = normPDF(b)
	}
	m1 = s * (pa - pb)
	ta, tb := 0.0, 0.0
	if pa > 0 {
		ta = a * pa
	}
	if pb > 0 {
		tb = b * pb
	}
	m2 = s2 * (m0 + ta - tb)
	return m0, m1, m2
}

// glmNodes is the Gauss-Legendre rule of each sub-interval of the output-side quadrature
// (gonum quad.Legendre), and hermite the Gauss-Hermite rule of the logistic readout's
// conditional label probability (gonum quad.Hermite, weight exp(-x^2)).
const glmNodes = 16

var glmLegX, glmLegW = func() ([]float64, []float64) {
	x := make([]float64, glmNodes)
	w := make([]float64, glmNodes)
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	return x, w
}()

// innerRules are the Gauss-Hermite rules of P(y | p1) = E[sigmoid(m + sqrt(s) X)], each with
// the largest s it serves: the integrand's poles lie pi/sqrt(s) from the real axis in X, and
// each rule is within 2e-10 relative (of P, 1 - P and E[sigmoid'], over |m| <= 8) of a
// 200-node rule up to its s, as measured when the sizes were chosen (TestInnerRules checks
// it); beyond s = 0.5 the 24-node rule, within 5e-10 at s = 1.
var innerRules = func() []innerRule {
	r := []innerRule{{0.1, 8, nil, nil}, {0.3, 12, nil, nil}, {0.5, 16, nil, nil}, {math.Inf(1), 24, nil, nil}}
	for i := range r {
		r[i].x, r[i].w = hermiteNormal(r[i].n)
	}
	return r
}()

type innerRule struct {
	maxS float64
	n    int
	x, w []float64
}

// hermiteNormal returns the n-node Gauss-Hermite rule of E[f(X)], X ~ N(0, 1) (gonum
// quad.Hermite, weight exp(-x^2), rescaled).
func hermiteNormal(n int) (x, w []float64) {
	x = make([]float64, n)
	w = make([]float64, n)
	quad.Hermite{}.FixedLocations(x, w, math.Inf(-1), math.Inf(1))
	for i := range w {
		w[i] /= math.Sqrt(math.Pi)
		x[i] *= math.Sqrt2
	}
	return x, w
}

func innerRuleFor(s float64) innerRule {
	for _, r := range innerRules {
		if s <= r.maxS {
			return r
		}
	}
	return innerRules[len(innerRules)-1]
}

// gaussGrid returns the nodes and weights of E[f(P)], P ~ N(0, v), v > 0, over +-10
// standard deviations (the mass beyond is 1.5e-23): split at cuts (kinks of the integrand), with sub-intervals of at most
// width, and around each of the sharp points (centre, scale) graded intervals of the given
// scale, so that a step smoothed on that scale is integrated to rounding error.
func gaussGrid(v float64, cuts []float64, width float64, sharp [][2]float64) (nodes, weights []float64) {
	return gaussGridTo(v, cuts, width, sharp, math.Inf(1))
}

// gaussGridTo is gaussGrid with only the sub-intervals that begin below top, the part of the
// grid below top when top is one of the cuts.
func gaussGridTo(v float64, cuts []float64, width float64, sharp [][2]float64, top float64) (nodes, weights []float64) {
	sd := math.Sqrt(v)
	lo, hi := -10*sd, 10*sd
	pts := []float64{lo, hi}
	for _, c := range cuts {
		if c > lo && c < hi {
			pts = append(pts, c)
		}
	}
	for _, sp := range sharp {
		c, s := sp[0], sp[1]
		if s <= 0 {
			if c > lo && c < hi {
				pts = append(pts, c)
			}
			continue
		}
		if s >= sd {
			continue
		}
		for _, k := range [...]float64{0, 0.25, 0.5, 1, 2, 3, 4, 6, 8, 12} {
			for _, x := range [2]float64{c - k*s, c + k*s} {
				if x > lo && x < hi {
					pts = append(pts, x)
				}
			}
		}
	}
	slices.Sort(pts)
	total := 0
	for i := 1; i < len(pts); i++ {
		if a, b := pts[i-1], pts[i]; b > a && a < top {
			total += int(math.Ceil((b - a) / width))
		}
	}
	nodes = make([]float64, 0, total*len(glmLegX))
	weights = make([]float64, 0, total*len(glmLegX))
	for i := 1; i < len(pts); i++ {
		a, b := pts[i-1], pts[i]
		if !(b > a) || !(a < top) {
			continue
		}
		n := int(math.Ceil((b - a) / width))
		h := (b - a) / float64(n)
		for j := range n {
			left := a + float64(j)*h
			for k, x := range glmLegX {
				p := left + (x+1)*h/2
				nodes = append(nodes, p)
				weights = append(weights, glmLegW[k]*h/2*normPDF(p/sd)/sd)
			}
		}
	}
	return nodes, weights
}
