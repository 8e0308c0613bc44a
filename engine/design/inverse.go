package design

import (
	"fmt"
	"math"

	"hdrisk/engine/param"
)

// reachTol is the relative distance below which a v just above S1(0) is read as S1(0)
// itself (g = 0) rather than as out of reach: a few hundred rounding errors of the caller.
const reachTol = 1e-12

// eps is the spacing of float64 numbers just above 1.
const eps = 0x1p-52

// InverseS1 returns the g >= 0 with S1(g) = v for the law l, to a relative accuracy near
// machine precision. S1 is decreasing, and Jensen's inequality with S1 <= 1/g brackets the
// answer in [max(0, 1/v - Mean), 1/v]. Newton's method runs on 1/S1(g) - 1/v, which is
// nearly linear in g (it tends to g + Mean - 1/v for large g and is linear near 0 when there
// is an atom at zero), and falls back to bisection whenever a step leaves the bracket.
// Special cases are: v <= 0, NaN or Inf give a *param.Error for "v"; without an atom at
// zero, v = S1(0) (within a relative 1e-12) gives g = 0 and a larger v gives a *param.Error
// saying that v is beyond the design's reach; with an atom at zero every v > 0 has a
// solution g > 0.
func InverseS1(l Law, v float64) (g float64, err error) {
	return InverseS1Near(l, v, math.NaN())
}

// InverseS1Near is InverseS1 with Newton's method started at near when near lies inside the
// bracket: a solver that inverts S1 at slowly moving values (a fixed-point iteration) saves
// most of the steps. A near outside the bracket, or NaN, is ignored.
func InverseS1Near(l Law, v, near float64) (g float64, err error) {
	if math.IsNaN(v) || math.IsInf(v, 0) || v <= 0 {
		return 0, &param.Error{Field: "v", Reason: fmt.Sprintf("%v: S1 can only take finite positive values", v)}
	}
	hi := 1 / v
	lo := max(0, hi-l.Mean())
	if lo == 0 && l.Atom0() == 0 {
		s0, _ := l.Stieltjes(0)
		switch {
		case v > s0*(1+reachTol):
			return 0, &param.Error{Field: "v", Reason: fmt.Sprintf("%v is beyond the design's reach: the largest value of S1 is S1(0) = %v", v, s0)}
		case v >= s0*(1-reachTol):
			return 0, nil
		}
	}
	x := lo
	if x == 0 {
		x = hi / 2
	}
	if near > lo && near < hi {
		x = near
	}
	for range 400 {
		s1, s2 := l.Stieltjes(x)
		if math.Abs(s1-v) <= 2*eps*v {
			return x, nil
		}
		if s1 > v {
			lo = x
		} else {
			hi = x
		}
		next := x - (v-s1)*s1/(v*s2)
		if !(next > lo && next < hi) {
			switch {
			case lo == 0:
				next = hi / 8
			case hi > 8*lo:
				next = math.Sqrt(lo * hi)
			default:
				next = lo + (hi-lo)/2
			}
		}
		if math.Abs(next-x) <= eps*next || hi-lo <= eps*hi {
			return next, nil
		}
		x = next
	}
	return 0, &param.Error{Field: "v", Reason: fmt.Sprintf("S1(g) = %v was not solved in 400 steps", v)}
}
