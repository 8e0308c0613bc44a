package penalty

import (
	"fmt"
	"math"

	"hdrisk/engine/param"
)

// power is f(x) = weight |x|^q with 1 <= q <= 2. For q = 1 and q = 2 it is the l1 and the
// ridge penalty (l2 = 2 weight) and delegates to them, so that their closed forms apply; in
// between the prox has no closed form and is found by a safeguarded Newton iteration.
type power struct {
	weight, q float64
	exact     Penalty // the l1 or ridge form at q = 1 or q = 2, nil otherwise
}

// Power returns weight |x|^q (weight >= 0 finite, 1 <= q <= 2).
//
// Special cases are: q = 1 is L1(weight), q = 2 is Ridge(2 weight), weight = 0 the identity.
// q < 1 is refused (the penalty is non-convex) and so is q > 2 (outside the supported family).
func Power(weight, q float64) (Penalty, error) {
	if err := checkWeight("weight", weight); err != nil {
		return nil, err
	}
	switch {
	case math.IsNaN(q) || math.IsInf(q, 0):
		return nil, &param.Error{Field: "q", Reason: fmt.Sprintf("must be a finite number (got %v)", q)}
	case q < 1:
		return nil, &param.Error{Field: "q", Reason: fmt.Sprintf("must be >= 1 (got %v): |x|^q with q < 1 is non-convex, which the theory does not cover", q)}
	case q > 2:
		return nil, &param.Error{Field: "q", Reason: fmt.Sprintf("must be <= 2 (got %v): the power penalty is supported for 1 <= q <= 2", q)}
	}
	p := power{weight: weight, q: q}
	switch q {
	case 1:
		p.exact = FromPieces(elasticNet{"power", weight, 0})
	case 2:
		p.exact = FromPieces(elasticNet{"power", 0, 2 * weight})
	}
	return p, nil
}

func (p power) Name() string { return "power" }

// Prox solves x + k sign(x) |x|^(q-1) = r with k = q weight / g, sign(x) = sign(r).
//
// With p = q - 1 and u = |x|^p the equation reads phi(u) = u^(1/p) + k u - |r| = 0, with phi
// convex and increasing and phi'(0) = k > 0, so Newton's method started to the right of the
// root decreases monotonically to it (no bracketing is needed; the iteration stops as soon as
// it fails to decrease, which happens only at rounding level). The start min(|r|/k, |r|^p) is
// an upper bound because both terms of phi are nonnegative. A last Newton step in x itself
// restores full relative precision of x when p is small.
func (p power) Prox(r, g float64) float64 {
	if p.exact != nil {
		return p.exact.Prox(r, g)
	}
	a := math.Abs(r)
	if p.weight == 0 || a == 0 || math.IsInf(a, 1) || math.IsNaN(a) {
		return r
	}
	k := p.q * p.weight / g
	e := p.q - 1
	u := math.Min(a/k, math.Pow(a, e))
	for range 200 {
		y := math.Pow(u, 1/e)
		phi := y + k*u - a
		next := u - phi/(y/(e*u)+k)
		if !(next < u) || next <= 0 {
			break
		}
		u = next
	}
	y := math.Pow(u, 1/e)
	if y > 0 {
		ye := math.Pow(y, e)
		y -= (y + k*ye - a) / (1 + k*e*ye/y)
	}
	return math.Copysign(math.Max(y, 0), r)
}

// Deriv is 1/(1 + k (q-1) |x|^(q-2)) at x = prox(r), written as |x|^(2-q)/(|x|^(2-q) + k (q-1))
// so that it is exactly 0 at x = 0 (the limit from both sides) instead of 1/Inf.
func (p power) Deriv(r, g float64) float64 {
	if p.exact != nil {
		return p.exact.Deriv(r, g)
	}
	if p.weight == 0 {
		return 1
	}
	k := p.q * p.weight / g
	s := math.Pow(math.Abs(p.Prox(r, g)), 2-p.q)
	return s / (s + k*(p.q-1))
}

// Kinks is empty for 1 < q < 2: the derivative is continuous (it tends to 0 at r = 0 from both
// sides), although not smooth at r = 0.
func (p power) Kinks(g float64) []float64 {
	if p.exact != nil {
		return p.exact.Kinks(g)
	}
	return []float64{}
}

// Pieces reports ok = false for 1 < q < 2, where the prox is not piecewise linear.
func (p power) Pieces(g float64) ([]Piece, bool) {
	if p.exact != nil {
		return p.exact.Pieces(g)
	}
	return nil, false
}

func (p power) Linear(g float64) (Linear, bool) {
	if p.exact != nil {
		return p.exact.(LinearForm).Linear(g)
	}
	return Linear{}, false
}

func (p power) HasZeroRegion() bool { return p.q == 1 && p.weight > 0 }

// StartG: f'(x) = q weight x^(q-1) for x > 0, see pullStart.
func (p power) StartG(t float64) float64 {
	return pullStart(p.q*p.weight*math.Pow(2*math.Sqrt(t), p.q-1), t)
}
