package signal

import (
	"math"

	"hdrisk/engine/penalty"
)

// Moments of the scalar channel r = x0 + sqrt(t) z, xhat = prox(r; g).
type Moments struct {
	MSE     float64 // E[(xhat - x0)^2], units of x0 squared
	A       float64 // E[prox'(r; g)], in [0, 1]
	NonZero float64 // P(xhat != 0)
	TruePos float64 // P(xhat != 0 and x0 != 0)
	Active  float64 // P(x0 != 0): the weight of every component but a point mass at 0
}

// Expect returns the moments of the channel at precision g > 0 and noise variance t >= 0.
// When the prox is piecewise linear (p.Pieces(g) exact) it uses closed forms; otherwise it
// returns ExpectQuad(l, p, g, t).
//
// The closed forms: a component x0 ~ N(mu, s2) gives r ~ N(mu, v), v = s2 + t, and the
// posterior x0 | r ~ N(mu + beta (r - mu), s2 t / v), beta = s2 / v. Hence
// E[(xhat - x0)^2] = E[(xhat(r) - E[x0|r])^2] + s2 t / v, and on each linear piece
// xhat - E[x0|r] is linear in r, so that only truncated normal moments of order 0, 1, 2 enter.
// A piece lying in a tail is expanded about its finite end and its moments come from
// erfc and a continued fraction (see tailMoments), so that tails never cancel; with a
// soft threshold and a zero-mean component this reproduces docs/method.md section 3.
// Consecutive components whose variances the channel noise cannot tell apart are evaluated
// as one (see merger), within about mergeTol of the moments.
//
// Special cases are: t = 0 with a point-mass component evaluates the prox at the atom (for
// A and NonZero, the piece [Lo, Hi) containing the atom decides, the right-derivative
// convention). g <= 0, t < 0 or NaN arguments give NaN moments.
func Expect(l Law, p penalty.Penalty, g, t float64) Moments {
	if !(g > 0) || !(t >= 0) {
		return nanMoments()
	}
	var pieces []penalty.Piece
	var lin penalty.Linear
	ok := false
	if lf, isLin := p.(penalty.LinearForm); isLin {
		lin, ok = lf.Linear(g)
		pieces = lin.Pieces()
	} else {
		pieces, ok = p.Pieces(g)
	}
	if !ok {
		if b, isB := p.(brancher); isB && b.Exponent() > 0 {
			return expectBranch(l, p, b, g, t)
		}
		return ExpectQuad(l, p, g, t)
	}
	var m Moments
	grp := merger{lo: math.Inf(1), hi: math.Inf(-1)}
	for _, q := range pieces[:len(pieces)-1] {
		if !math.IsInf(q.Hi, 0) {
			grp.lo, grp.hi = math.Min(grp.lo, q.Hi), math.Max(grp.hi, q.Hi)
		}
	}
	for _, c := range componentsOf(l) {
		if !grp.add(c, t) {
			addComponent(&m, grp.component(), pieces, t)
			grp.w = 0
			grp.add(c, t)
		}
	}
	if grp.w > 0 {
		addComponent(&m, grp.component(), pieces, t)
	}
	return m
}

// mergeTol bounds the relative change of the moments when Expect evaluates a group of
// components as one (see merger).
const mergeTol = 1e-10

// merger gathers consecutive components of one mean, each of positive variance, into one
// component of their total weight and mean variance. A component's moments are smooth
// functions H(v) of v = Var + t; replacing the group by its mean variance changes their
// weighted sum by about H”/2 var(V) times the group's weight (the first order cancels).
// H varies on the scale v, and, where a kink lies y = |kink - mean| / sqrt(v) standard
// deviations out, its tail masses like phi(y) change by y^2/(2v) per unit of v, so that
// |H”/H| stays below (1 + y^2)^2 / v^2 up to a factor of order one. A group is kept while
// var(V) (1 + y^2)^2 / (t + min V)^2 <= mergeTol with the farthest kink: the group's part of
// the moments then moves by about mergeTol of itself. This merges the many nodes of a scale
// mixture that lie far below the channel noise (Laplace nodes of variance down to 1e-9 of
// E[x0^2] when t is of order one).
type merger struct {
	w, mean, v, m2, vmin float64 // weight, mean of x0, weighted mean and spread of Var
	lo, hi               float64 // the extreme finite kinks (+Inf, -Inf when none)
}

// add adds c to the group if the group stays within mergeTol at noise t, and reports whether
// it did; the empty group takes any component.
func (g *merger) add(c Component, t float64) bool {
	if g.w == 0 {
		g.w, g.mean, g.v, g.m2, g.vmin = c.Weight, c.Mean, c.Var, 0, c.Var
		return true
	}
	if c.Mean != g.mean || c.Var == 0 || g.vmin == 0 || c.Weight == 0 {
		return false
	}
	// Weighted Welford update: no cancellation in the spread.
	w := g.w + c.Weight
	d := c.Var - g.v
	v := g.v + d*c.Weight/w
	m2 := g.m2 + c.Weight*d*(c.Var-v)
	vmin := math.Min(g.vmin, c.Var)
	s := t + vmin
	y2 := 0.0
	if g.lo <= g.hi {
		k := math.Max(math.Abs(g.lo-g.mean), math.Abs(g.hi-g.mean))
		y2 = k * k / s
	}
	if !(m2/w*(1+y2)*(1+y2) <= mergeTol*s*s) {
		return false
	}
	g.w, g.v, g.m2, g.vmin = w, v, m2, vmin
	return true
}

func (g *merger) component() Component { return Component{g.w, g.mean, g.v} }

func nanMoments() Moments {
	n := math.NaN()
	return Moments{n, n, n, n, n}
}

// endPoint holds the standard normal quantities at one finite piece boundary y (in units of
// the component's standard deviation): phi(y), the tail masses on both sides, and the tail
// moments on the side away from the mean, tailMoments(|y|).
type endPoint struct {
	y, phi, right, left float64 // right = P(Z >= y), left = P(Z < y)
	j0, j1, j2          float64 // tailMoments(|y|)
}

func newEndPoint(y float64) endPoint {
	e := endPoint{y: y, phi: math.Exp(-y*y/2) / math.Sqrt(2*math.Pi)}
	a := math.Abs(y)
	far := math.Erfc(a/math.Sqrt2) / 2
	near := 1 - far
	if y >= 0 {
		e.right, e.left = far, near
	} else {
		e.right, e.left = near, far
	}
	e.j0, e.j1, e.j2 = tailMoments(a, e.phi, far)
	return e
}

// tailMoments returns, for x >= 0, the right-tail moments of the standard normal about x:
// j0 = P(Z > x) = q, j1 = E[(Z - x)+], j2 = E[(Z - x)+^2], given phi = phi(x) and q.
//
// The direct forms j1 = phi - x q and j2 = q - x j1 lose about log10(x^4/2) digits to
// cancellation; up to x = 4 that is about three digits (relative error measured below 5e-13),
// and the hot path of the fixed point rarely goes further. Beyond, they come from the continued
// fraction of the Mills ratio, q/phi = 1/(x + K1), K_n = n/(x + K_{n+1}) (Laplace's continued
// fraction; Abramowitz & Stegun 26.2.14), which gives without cancellation j1 = q K1 and
// j2 = q K1 K2. The depth 8 + 500/x^2 reaches full double precision from x = 3 on (checked
// against depth 100000 when it was chosen).
func tailMoments(x, phi, q float64) (j0, j1, j2 float64) {
	if x <= 4 {
		j1 = phi - x*q
		return q, j1, q - x*j1
	}
	k := 0.0
	for n := 8 + int(500/(x*x)); n >= 2; n-- {
		k = float64(n) / (x + k)
	}
	k1 := 1 / (x + k)
	return q, q * k1, q * k1 * k
}

// addComponent adds weight * (moments of one Gaussian component) to m.
func addComponent(m *Moments, c Component, pieces []penalty.Piece, t float64) {
	active := c.active()
	if active {
		m.Active += c.Weight
	}
	v := c.Var + t
	if v == 0 {
		// r = x0 = Mean exactly.
		q := pieceAt(pieces, c.Mean)
		xhat := q.Slope*c.Mean + q.Intercept
		d := xhat - c.Mean
		m.MSE += c.Weight * d * d
		m.A += c.Weight * q.Slope
		if xhat != 0 {
			m.NonZero += c.Weight
			if active {
				m.TruePos += c.Weight
			}
		}
		return
	}
	sd := math.Sqrt(v)
	mu := c.Mean
	var mse, a, nz float64
	var lo endPoint
	loInf := true
	for i, q := range pieces {
		hiInf := i == len(pieces)-1 || math.IsInf(q.Hi, 1)
		var hi endPoint
		if !hiInf {
			y := (q.Hi - mu) / sd
			if !loInf && y == -lo.y {
				// Symmetric boundaries share phi and the tail moments.
				hi = endPoint{y, lo.phi, lo.left, lo.right, lo.j0, lo.j1, lo.j2}
			} else {
				hi = newEndPoint(y)
			}
		}
		// d(y) = xhat - E[x0|r] = k0 + k1 y with r = mu + sd y. The slope is written with
		// 1 - beta = t/v, so that a unit slope at small t (noiseless recovery) keeps its
		// digits instead of losing them in Slope - beta.
		k1 := ((q.Slope - 1) + t/v) * sd
		k0 := (q.Slope-1)*mu + q.Intercept
		var m0, m1, m2 float64
		switch {
		case !loInf && lo.y >= 0:
			// Right of the mean: expand in s = y - ylo >= 0.
			m0, m1, m2 = lo.j0, lo.j1, lo.j2
			// A tail end beyond the reach of the normal law (j0 = 0, for instance a box
			// bound of 1e300) carries no mass: its terms are skipped rather than formed
			// as Inf * 0.
			if !hiInf && hi.j0 > 0 {
				dd := hi.y - lo.y
				m0 -= hi.j0
				m1 -= hi.j1 + dd*hi.j0
				m2 -= hi.j2 + 2*dd*hi.j1 + dd*dd*hi.j0
			}
			k0 += k1 * lo.y
		case !hiInf && hi.y <= 0:
			// Left of the mean: expand in s = yhi - y >= 0.
			m0, m1, m2 = hi.j0, hi.j1, hi.j2
			if !loInf && lo.j0 > 0 {
				dd := hi.y - lo.y
				m0 -= lo.j0
				m1 -= lo.j1 + dd*lo.j0
				m2 -= lo.j2 + 2*dd*lo.j1 + dd*dd*lo.j0
			}
			k0 += k1 * hi.y
			k1 = -k1
		case !loInf && !hiInf && math.Max(-lo.y, hi.y) < 0.1:
			// A narrow piece about the mean (a small threshold at noiseless recovery): the
			// general form below would get m2 as the difference m0 - 2 y phi(y) of two
			// nearly equal numbers (losing a factor 3/y^2, negligible above y = 0.1), so
			// integrate the Taylor series of phi instead.
			m0, m1, m2 = narrowMoments(lo.y, hi.y)
		default:
			// The piece holds the mean: moments about the mean. A boundary beyond the
			// reach of the normal law has phi = 0, and its y phi term is 0 even where y
			// itself overflowed to +-Inf (a box bound or Huber width near 1.8e308 divided by
			// a small standard deviation), rather than Inf * 0.
			m0 = 1
			if !loInf {
				m0 -= lo.left
				m1 += lo.phi
				if lo.phi > 0 {
					m2 += lo.y * lo.phi
				}
			}
			if !hiInf {
				m0 -= hi.right
				m1 -= hi.phi
				if hi.phi > 0 {
					m2 -= hi.y * hi.phi
				}
			}
			m2 += m0
		}
		if m0 == 0 && m1 == 0 && m2 == 0 {
			// The piece lies beyond the reach of the component: k0 may then be huge.
			lo, loInf = hi, hiInf
			continue
		}
		mse += k0*k0*m0 + 2*k0*k1*m1 + k1*k1*m2
		a += q.Slope * m0
		if !q.Zero() {
			nz += m0
		}
		lo, loInf = hi, hiInf
	}
	m.MSE += c.Weight * (mse + c.Var*t/v)
	m.A += c.Weight * a
	m.NonZero += c.Weight * nz
	if active {
		m.TruePos += c.Weight * nz
	}
}

// pieceAt returns the piece [Lo, Hi) that contains r.
func pieceAt(pieces []penalty.Piece, r float64) penalty.Piece {
	for _, q := range pieces[:len(pieces)-1] {
		if r < q.Hi {
			return q
		}
	}
	return pieces[len(pieces)-1]
}

// narrowMoments returns the integrals of s^k phi(s) over [a, b] for k = 0, 1, 2 when
// max(|a|, |b|) < 0.1, from phi(s) = phi(0) sum_j (-s^2/2)^j / j!, which converges to full
// precision in 8 terms there (the eighth is below 2e-20 relative).
func narrowMoments(a, b float64) (m0, m1, m2 float64) {
	c := 1 / math.Sqrt(2*math.Pi)
	a2, b2 := a*a, b*b
	pa, pb := a, b // a^(2j+1), b^(2j+1)
	for j := 0; j < 8; j++ {
		n := float64(2*j + 1)
		m0 += c * (pb - pa) / n
		m1 += c * (pb*b - pa*a) / (n + 1)
		m2 += c * (pb*b2 - pa*a2) / (n + 2)
		c *= -0.5 / float64(j+1)
		pa *= a2
		pb *= b2
	}
	return m0, m1, m2
}
