package penalty

import (
	"fmt"
	"math"

	"hdrisk/engine/param"
)

// Limits of the power penalty.
const (
	// MaxPowerQ is the largest exponent accepted: beyond, |x|^q is a box constraint |x| <= 1
	// to within the range of double-precision numbers for any weight.
	MaxPowerQ = 100
	// powerNear is how close q may come to 1 or 2 before the l1 or ridge form is used: the
	// prox differs from theirs by about k (q - 1) |log x| or k |q - 2| |x log x|, below 1e-7
	// of the entry for the entries that matter, while the change of variable of Branch would
	// need steps in u finer than the rounding of u.
	powerNear = 1e-9
)

// power is f(x) = weight |x|^q with 1 <= q <= MaxPowerQ. For q = 1 and q = 2 (and within
// powerNear of them) it is the l1 and the ridge penalty (l2 = 2 weight) and delegates to them,
// so that their closed forms apply; otherwise the prox has no closed form and is found by a
// safeguarded Newton iteration, and the expectations of package signal run along Branch.
type power struct {
	weight, q float64
	exact     Penalty // the l1 or ridge form at q = 1 or q = 2, nil otherwise
}

// Power returns weight |x|^q (weight >= 0 finite, 1 <= q <= MaxPowerQ). It is convex for
// every q >= 1.
//
// Special cases are: q within 1e-9 of 1 is L1(weight), within 1e-9 of 2 is Ridge(2 weight),
// weight = 0 the identity. q < 1 is refused (the penalty is non-convex) and so is q above
// MaxPowerQ.
func Power(weight, q float64) (Penalty, error) {
	if err := checkWeight("weight", weight); err != nil {
		return nil, err
	}
	switch {
	case math.IsNaN(q) || math.IsInf(q, 0):
		return nil, &param.Error{Field: "q", Reason: fmt.Sprintf("must be a finite number (got %v)", q)}
	case q < 1:
		return nil, &param.Error{Field: "q", Reason: fmt.Sprintf("must be >= 1 (got %v): |x|^q with q < 1 is non-convex, which the theory does not cover", q)}
	case q > MaxPowerQ:
		return nil, &param.Error{Field: "q", Reason: fmt.Sprintf("must be <= %d (got %v): beyond, |x|^q is the box |x| <= 1 (use the box penalty)", MaxPowerQ, q)}
	}
	p := power{weight: weight, q: q}
	switch {
	case weight == 0:
		p.exact = FromPieces(elasticNet{"power", 0, 0})
	case q-1 < powerNear:
		p.exact = FromPieces(elasticNet{"power", weight, 0})
	case math.Abs(q-2) < powerNear:
		p.exact = FromPieces(elasticNet{"power", 0, 2 * weight})
	}
	return p, nil
}

func (p power) Name() string { return "power" }

// Prox solves x + k sign(x) |x|^(q-1) = r with k = q weight / g, sign(x) = sign(r).
//
// For q < 2, with e = q - 1 and u = |x|^e the equation reads phi(u) = u^(1/e) + k u - |r| = 0,
// with phi convex and increasing and phi'(0) = k > 0, so Newton's method started to the right
// of the root decreases monotonically to it (no bracketing is needed; the iteration stops as
// soon as it fails to decrease, which happens only at rounding level). The start
// min(|r|/k, |r|^e) is an upper bound because both terms of phi are nonnegative. A last Newton
// step in x itself restores full relative precision of x when e is small. For q > 2 the
// equation in x itself, x + k x^e = |r|, is convex and increasing, and Newton's method runs
// on it from the upper bound min(|r|, (|r|/k)^(1/e)) in the same way.
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
	if e > 1 {
		x := math.Min(a, math.Pow(a/k, 1/e))
		for range 200 {
			xe := math.Pow(x, e)
			next := x - (x+k*xe-a)/(1+k*e*xe/x)
			if !(next < x) || next <= 0 {
				break
			}
			x = next
		}
		return math.Copysign(x, r)
	}
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

// Deriv is 1/(1 + k (q-1) |x|^(q-2)) at x = prox(r). For q < 2 it is written as
// |x|^(2-q)/(|x|^(2-q) + k (q-1)) so that it is exactly 0 at x = 0 (the limit from both sides)
// instead of 1/Inf; for q > 2 it is 1 at x = 0.
func (p power) Deriv(r, g float64) float64 {
	if p.exact != nil {
		return p.exact.Deriv(r, g)
	}
	if p.weight == 0 {
		return 1
	}
	k := p.q * p.weight / g
	x := math.Abs(p.Prox(r, g))
	if p.q > 2 {
		return 1 / (1 + k*(p.q-1)*math.Pow(x, p.q-2))
	}
	s := math.Pow(x, 2-p.q)
	return s / (s + k*(p.q-1))
}

// Branch parametrizes the positive branch of the prox at precision g by u > 0 (docs/method.md
// section 7): it returns x = prox(r; g) >= 0, dx/du, the r itself and dr/du, all explicit,
// so that expectations over r can run in u where no prox has to be solved, with
// prox'(r) dr = dx. With k = q weight / g and e = q - 1: for q < 2, u = x^e, x = u^(1/e) and
// r = x + k u (u is about r/k near 0, where x vanishes faster than any power of r when q is
// near 1); for q > 2, u = x and r = x + k x^e. The prox is odd, which gives the negative
// branch.
func (p power) Branch(u, g float64) (x, dxdu, r, drdu float64) {
	k := p.q * p.weight / g
	e := p.q - 1
	if e > 1 {
		ue := powOf(u, e)
		return u, 1, u + k*ue, 1 + k*e*ue/u
	}
	x = powOf(u, 1/e)
	dxdu = x / (e * u)
	return x, dxdu, x + k*u, dxdu + k
}

// powOf is math.Pow(u, y) for u >= 0. The exponents Branch meets for the usual q (1.5, 2.5
// and 3) are a product or a square root, exact to rounding and several times cheaper than
// math.Pow, which costs about a quarter of an expectation with q = 1.5 otherwise.
func powOf(u, y float64) float64 {
	switch y {
	case 2:
		return u * u
	case 1.5:
		return u * math.Sqrt(u)
	}
	return math.Pow(u, y)
}

// BranchAt returns the u of Branch at r > 0: prox(r; g)^e for q < 2, prox(r; g) for q > 2.
func (p power) BranchAt(r, g float64) float64 {
	x := p.Prox(r, g)
	if p.q > 2 {
		return x
	}
	return math.Pow(x, p.q-1)
}

// Exponent returns q - 1, or 0 when the penalty is the l1 or ridge form or zero (Branch does
// not apply).
func (p power) Exponent() float64 {
	if p.exact != nil || p.weight == 0 {
		return 0
	}
	return p.q - 1
}

// Kinks is empty for q > 1: the derivative is continuous (it tends to 0 at r = 0 from both
// sides for q < 2, to 1 for q > 2), although not smooth at r = 0.
func (p power) Kinks(g float64) []float64 {
	if p.exact != nil {
		return p.exact.Kinks(g)
	}
	return []float64{}
}

// Pieces reports ok = false for q > 1 away from 2, where the prox is not piecewise linear.
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

func (p power) HasZeroRegion() bool { return p.q-1 < powerNear && p.weight > 0 }

// StartG: f'(x) = q weight x^(q-1) for x > 0, see pullStart.
func (p power) StartG(t float64) float64 {
	return pullStart(p.q*p.weight*math.Pow(2*math.Sqrt(t), p.q-1), t)
}
