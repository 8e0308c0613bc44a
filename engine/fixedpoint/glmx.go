package fixedpoint

import (
	"math"
	"math/rand/v2"
	"slices"

	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

// scaledLaw is the law of mu x0: the input side of a generalized linear model sees
// r1 = mu x0 + sqrt(t1) z (docs/method.md section 10), and signal.Expect of this law gives the
// error about mu x0, the derivative and the support counts in closed form.
type scaledLaw struct {
	l     signal.Law
	mu    float64
	comps []signal.Component
}

func newScaledLaw(l signal.Law, mu float64) scaledLaw {
	c := l.Mixture()
	for i := range c {
		c[i].Mean *= mu
		c[i].Var *= mu * mu
	}
	return scaledLaw{l, mu, c}
}

func (s scaledLaw) Name() string                { return s.l.Name() }
func (s scaledLaw) Mixture() []signal.Component { return slices.Clone(s.comps) }
func (s scaledLaw) Exact() bool                 { return s.l.Exact() }
func (s scaledLaw) Second() float64             { return s.mu * s.mu * s.l.Second() }
func (s scaledLaw) Sample(r *rand.Rand, n int) []float64 {
	x := s.l.Sample(r, n)
	for i := range x {
		x[i] *= s.mu
	}
	return x
}

// overlap returns O = E[(xhat - mu x0) x0] for xhat = prox(mu x0 + sqrt(t) z; g), by
// Gauss-Legendre quadrature over r for each mixture component, split at the prox's kinks and
// at 0 as in signal.ExpectQuad. With xbar = E[x0 | r] (linear in r within a component),
// O = E[(xhat - mu xbar) xbar] - mu E[Var(x0 | r)], which keeps the part that the quadrature
// sees bounded by the estimate's own error.
func overlap(l signal.Law, p penalty.Penalty, mu, g, t float64) float64 {
	splits := append(slices.Clone(p.Kinks(g)), 0)
	o := 0.0
	for _, c := range l.Mixture() {
		mean, v := mu*c.Mean, mu*mu*c.Var+t
		if v == 0 {
			xh := p.Prox(mean, g)
			o += c.Weight * (xh - mu*c.Mean) * c.Mean
			continue
		}
		sd := math.Sqrt(v)
		beta := mu * c.Var / v
		post := c.Var * t / v
		lo, hi := mean-12*sd, mean+12*sd
		cuts := []float64{lo, hi}
		for _, k := range splits {
			if k > lo && k < hi {
				cuts = append(cuts, k)
			}
		}
		slices.Sort(cuts)
		sum := 0.0
		for i := 1; i < len(cuts); i++ {
			n := int(math.Ceil((cuts[i] - cuts[i-1]) / sd))
			h := (cuts[i] - cuts[i-1]) / float64(n)
			for j := range n {
				left := cuts[i-1] + float64(j)*h
				for k, x := range glmLegX {
					r := left + (x+1)*h/2
					w := glmLegW[k] * h / 2 * normPDF((r-mean)/sd) / sd
					xbar := c.Mean + beta*(r-mean)
					sum += w * (p.Prox(r, g) - mu*xbar) * xbar
				}
			}
		}
		o += c.Weight * (sum - mu*post)
	}
	return o
}
