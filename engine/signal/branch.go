package signal

import (
	"math"
	"slices"

	"hdrisk/engine/penalty"
)

// brancher is a penalty whose prox is odd and has an explicit inverse along a parameter u of
// its positive branch (the power penalty; see its Branch method).
type brancher interface {
	Branch(u, g float64) (x, dxdu, r, drdu float64)
	BranchAt(r, g float64) float64
	Exponent() float64
}

// Quadrature along a branch.
const (
	// branchWidth is the widest panel, in standard deviations of the narrowest component
	// present there: 16-point Gauss-Legendre integrates the normal density over 1.5 standard
	// deviations to rounding error.
	branchWidth = 1.5
	// branchDepth is how far the panels grade towards u = 0, in r relative to the first
	// panel: the mass below is under 1e-10 of it.
	branchDepth = 1e-10
	// branchTiny is the x, relative to the first panel, below which x no longer enters any
	// moment (it is added to numbers of the size of the panel).
	branchTiny = 1e-20
)

// sideComp is one component seen on the positive branch: the mean m (the component's mean,
// or its negative for the negative branch, by the symmetry of an odd prox), the variance
// v = Var + t of r, beta = Var/v, and its weight times the number of branches it stands for.
type sideComp struct {
	w, m, v, beta, sd, lo, hi float64
}

// expectBranch returns the moments of Expect along the branch of b (docs/method.md sections 7 and 11.3):
// for each component, E[h(prox(r))] over r ~ N(m, v) is, by the change of variable r = r(u),
// the integral over u > 0 of h(x(u)) phi(r(u)) r'(u) on each branch, and A the integral of
// phi(r(u)) x'(u). Every component shares the nodes: the panels in r are at most branchWidth
// standard deviations of the narrowest component whose +-12 standard deviations reach there,
// they grade geometrically (ratio 4 in u) towards u = 0, and, when e = q - 1 is below 0.1,
// where x = u^(1/e) takes off they are at most a factor 4^10 in x wide, so that every panel
// holds a function that 16-point Gauss-Legendre integrates to rounding error. A prox without
// a zero region has NonZero = 1.
func expectBranch(l Law, p penalty.Penalty, b brancher, g, t float64) Moments {
	e := b.Exponent()
	var m Moments
	var sides []sideComp
	for _, c := range componentsOf(l) {
		active := c.active()
		if active {
			m.Active += c.Weight
		}
		v := c.Var + t
		if v == 0 {
			xhat := p.Prox(c.Mean, g)
			m.MSE += c.Weight * (xhat - c.Mean) * (xhat - c.Mean)
			m.A += c.Weight * p.Deriv(c.Mean, g)
			continue
		}
		m.MSE += c.Weight * c.Var * t / v
		sd := math.Sqrt(v)
		add := func(w, mean float64) {
			if hi := mean + quadSpan*sd; hi > 0 {
				sides = append(sides, sideComp{w, mean, v, c.Var / v, sd, math.Max(0, mean-quadSpan*sd), hi})
			}
		}
		if c.Mean == 0 {
			add(2*c.Weight, 0)
		} else {
			add(c.Weight, c.Mean)
			add(c.Weight, -c.Mean)
		}
	}
	// The weights sum to 1 (Law), and the prox is zero only at r = 0.
	m.NonZero, m.TruePos = 1, m.Active
	if len(sides) == 0 {
		return m
	}
	cuts := branchCuts(sides, b, e, g)
	if ls, isL := l.(laplaceScaler); isL && t > 0 {
		// A Laplace law through its posterior in closed form at each node, on the panels
		// its mixture's components call for (docs/method.md section 6.2).
		if lb, sigma := ls.laplaceScale(), math.Sqrt(t); lb > 0 && sigma >= lapBranchSmall*lb && sigma <= lapBranchLarge*lb {
			m.MSE, m.A = branchLaplace(b, g, cuts, lb, sigma)
			return m
		}
	}
	var mse, a float64
	// The components a panel can reach: r(u) increases with u, so a component whose
	// quadSpan + 1 standard deviations miss [r(lo), r(hi)] is skipped at every node of the
	// panel anyway. Listing them once per panel keeps a mixture of many narrow components
	// (a uniform signal at small t) from costing panels times nodes times components.
	near := make([]sideComp, 0, len(sides))
	_, _, rLo, _ := b.Branch(cuts[0], g)
	for i := 1; i < len(cuts); i++ {
		_, _, rHi, _ := b.Branch(cuts[i], g)
		near = near[:0]
		for _, s := range sides {
			if reach := (quadSpan + 1) * s.sd; s.m+reach >= rLo && s.m-reach <= rHi {
				near = append(near, s)
			}
		}
		rLo = rHi
		h := (cuts[i] - cuts[i-1]) / 2
		c := (cuts[i] + cuts[i-1]) / 2
		for j, z := range legendreX {
			u := c + h*z
			x, dxdu, r, drdu := b.Branch(u, g)
			gw := legendreW[j] * h
			for _, s := range near {
				y := (r - s.m) / s.sd
				if y > quadSpan+1 || y < -quadSpan-1 {
					continue
				}
				f := s.w * gw * math.Exp(-y*y/2) / (s.sd * math.Sqrt(2*math.Pi))
				d := x - (s.m + s.beta*(r-s.m))
				mse += f * drdu * d * d
				a += f * dxdu
			}
		}
	}
	m.MSE += mse
	m.A += a
	return m
}

// branchLaplace integrates the MSE and A of a Laplace law of scale lb at noise sigma along
// the branch b over the panels cuts, with laplaceNode at every node; both halves of the odd
// prox count through the factor 2.
func branchLaplace(b brancher, g float64, cuts []float64, lb, sigma float64) (mse, a float64) {
	for i := 1; i < len(cuts); i++ {
		h := (cuts[i] - cuts[i-1]) / 2
		c := (cuts[i] + cuts[i-1]) / 2
		for j, z := range legendreX {
			x, dxdu, r, drdu := b.Branch(c+h*z, g)
			p, e := laplaceNode(lb, sigma, r, x)
			gw := 2 * legendreW[j] * h
			mse += gw * drdu * e
			a += gw * dxdu * p
		}
	}
	return mse, a
}

// branchCuts returns the sorted panel ends in u for the components sides (see expectBranch).
func branchCuts(sides []sideComp, b brancher, e, g float64) []float64 {
	lo, hi := math.Inf(1), 0.0
	for _, s := range sides {
		lo = math.Min(lo, s.lo)
		hi = math.Max(hi, s.hi)
	}
	// Panels in r: walk from lo to hi with the width of the narrowest component present,
	// clipped at the next start of a component (where the width may shrink).
	var rc []float64
	r := lo
	for r < hi {
		w, next := math.Inf(1), hi
		for _, s := range sides {
			if s.lo <= r && r < s.hi {
				w = math.Min(w, branchWidth*s.sd)
			} else if s.lo > r {
				next = math.Min(next, s.lo)
			}
		}
		if math.IsInf(w, 1) {
			r = next
			continue
		}
		// A component far narrower than the rounding of its position (a spread of more
		// than 1e15 between the components' means and widths) is stepped over at the
		// rounding scale, which bounds the walk.
		w = math.Max(w, 1e-14*math.Abs(r))
		r = math.Min(r+w, next)
		rc = append(rc, r)
	}
	cuts := make([]float64, 0, len(rc)+40)
	if lo > 0 {
		cuts = append(cuts, b.BranchAt(lo, g))
	} else {
		cuts = append(cuts, 0)
	}
	for _, r := range rc {
		cuts = append(cuts, b.BranchAt(r, g))
	}
	if lo == 0 && len(rc) > 0 {
		first := rc[0]
		u := b.BranchAt(first, g)
		for {
			u /= 4
			_, _, r, _ := b.Branch(u, g)
			if r < branchDepth*first || u == 0 {
				break
			}
			cuts = append(cuts, u)
		}
		if e < 0.1 {
			// Where x = u^(1/e) rises from negligible to the size of the panels: steps of
			// a factor 4^10 in x, that is 10 e log 4 in log u.
			top := cuts[len(rc)]
			step := 10 * e * math.Log(4)
			for lu := math.Log(top) - step; ; lu -= step {
				u := math.Exp(lu)
				x, _, _, _ := b.Branch(u, g)
				if x < branchTiny*first || u == 0 {
					break
				}
				cuts = append(cuts, u)
			}
		}
	}
	slices.Sort(cuts)
	return slices.Compact(cuts)
}
