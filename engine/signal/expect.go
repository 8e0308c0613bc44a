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
	m, _, _ := expect(l, p, g, t, false, math.Inf(1))
	return m
}

// AReaches reports !(A < bound) for the A of Expect(l, p, g, t), evaluating only as many
// components as it needs: A is a sum of nonnegative terms, added in the same order as
// Expect adds them, so that a partial sum at bound or above decides at once, and otherwise
// the full sum decides exactly as Expect's would.
func AReaches(l Law, p penalty.Penalty, g, t, bound float64) bool {
	m, _, _ := expect(l, p, g, t, false, bound)
	return !(m.A < bound)
}

// Slopes are the partial derivatives of the channel's MSE and A in the precision g and in
// the noise variance t (docs/method.md section 6, derivatives of the moments).
type Slopes struct{ MSEg, MSEt, Ag, At float64 }

// ExpectSlopes returns Expect(l, p, g, t) and, when ok, its partial derivatives in g and t,
// in closed form from the same normal quantities. They are available for an odd prox of
// three pieces (l1, elastic net, Huber, a symmetric box) and components of mean 0 at t > 0
// (docs/method.md section 6); otherwise ok is false and the slopes are zero.
func ExpectSlopes(l Law, p penalty.Penalty, g, t float64) (m Moments, sl Slopes, ok bool) {
	return expect(l, p, g, t, true, math.Inf(1))
}

// slopeStep is the relative step in g of the forward differences that give the derivatives
// of the pieces in g (kinks, slopes and intercepts are smooth functions of g, typically
// rational: the error is about slopeStep of them, the rounding about 1e-16/slopeStep, both
// far below what a Newton step needs).
const slopeStep = 1e-8

// piecesOf returns the pieces of p at precision g, if p has them, held in lin when p gives
// them by value (so that they stay on the caller's stack).
func piecesOf(p penalty.Penalty, g float64, lin *penalty.Linear) ([]penalty.Piece, bool) {
	if lf, isLin := p.(penalty.LinearForm); isLin {
		var ok bool
		*lin, ok = lf.Linear(g)
		return lin.Pieces(), ok
	}
	return p.Pieces(g)
}

// expect is Expect, with the slopes when wantSlopes, and stops as soon as the partial sum
// of A reaches stopA (the moments are then partial sums).
func expect(l Law, p penalty.Penalty, g, t float64, wantSlopes bool, stopA float64) (Moments, Slopes, bool) {
	if !(g > 0) || !(t >= 0) {
		return nanMoments(), Slopes{}, false
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
			return expectBranch(l, p, b, g, t), Slopes{}, false
		}
		return ExpectQuad(l, p, g, t), Slopes{}, false
	}
	if ls, isL := l.(laplaceScaler); isL && t > 0 && len(pieces) <= lapMaxPieces {
		if b := ls.laplaceScale(); b > 0 {
			var buf [lapMaxPieces]lapPiece
			d := buf[:len(pieces)]
			if !wantSlopes || !lapDerivs(p, g, pieces, d) {
				d = nil
			}
			if m, sl, ok := expectLaplace(b, pieces, d, t); ok {
				return m, sl, d != nil
			}
		}
	}
	var m Moments
	grp := merger{lo: math.Inf(1), hi: math.Inf(-1)}
	for _, q := range pieces[:len(pieces)-1] {
		if !math.IsInf(q.Hi, 0) {
			grp.lo, grp.hi = math.Min(grp.lo, q.Hi), math.Max(grp.hi, q.Hi)
		}
	}
	var odd *oddBatch
	if oddThree(pieces) {
		odd = &oddBatch{pieces: pieces, t: t}
		if wantSlopes && t > 0 {
			odd.slopes = odd.pieceSlopes(p, g)
		}
	}
	stop := !math.IsInf(stopA, 1)
	comps := componentsOf(l)
	if f, isF := l.(folder); isF {
		// The folded heavy tail serves while every kink and the channel noise lie well
		// inside the spread of the folded components (see folded; they have mean 0).
		if fd := f.foldedTail(); fd.comps != nil && grp.lo <= grp.hi {
			k := max(abs(grp.lo), abs(grp.hi))
			if k*k+t <= foldReach*fd.vmin {
				comps = fd.comps
			}
		}
	}
	for _, c := range comps {
		if !grp.add(c, t) {
			if odd != nil {
				odd.add(&m, grp.component())
			} else {
				addComponent(&m, grp.component(), pieces, t)
			}
			grp.w = 0
			grp.add(c, t)
			if stop {
				if odd != nil {
					odd.flush(&m)
				}
				if m.A >= stopA {
					return m, Slopes{}, false
				}
			}
		}
	}
	if grp.w > 0 {
		if odd != nil {
			odd.add(&m, grp.component())
		} else {
			addComponent(&m, grp.component(), pieces, t)
		}
	}
	if odd == nil {
		return m, Slopes{}, false
	}
	odd.flush(&m)
	if !odd.slopes {
		return m, Slopes{}, false
	}
	return m, odd.sl, true
}

// oddThree reports an odd prox of three pieces: (-Inf, -k), [-k, k), [k, Inf) with k > 0
// finite, the middle piece through 0 and the outer ones mirror images (l1, elastic net, Huber,
// a box with l2). addOdd evaluates a zero-mean component against it.
func oddThree(pc []penalty.Piece) bool {
	if len(pc) != 3 {
		return false
	}
	k := pc[1].Hi
	return k > 0 && !math.IsInf(k, 1) && pc[0].Hi == -k && pc[1].Intercept == 0 &&
		pc[0].Slope == pc[2].Slope && pc[0].Intercept == -pc[2].Intercept
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
	w, mean, vmin float64 // weight, mean of x0, smallest Var
	// v0 is the first component's Var; sd and sq are the weighted sums of d = Var - v0 and
	// d^2, so that the mean Var is v0 + sd/w and w^2 var(V) = sq w - sd^2.
	v0, sd, sq float64
	lo, hi     float64 // the extreme finite kinks (+Inf, -Inf when none)
	kk         float64 // the squared distance from mean to the farther of lo, hi
	kkSet      bool    // kk holds the value for mean
}

// add adds c to the group if the group stays within mergeTol at noise t, and reports whether
// it did; the empty group takes any component. It runs once for every component of every
// evaluation, so the test is written without a division, which would sit on the chain of
// dependent operations from one component to the next: as
// (sq w - sd^2) (t + min V + k^2)^2 <= mergeTol w^2 (t + min V)^4, k the farthest kink from
// the group's mean. The sums are taken about the first Var, which keeps the difference
// sq w - sd^2 to a few digits of cancellation where it decides (a merged group spreads by
// less than 1e-5 of t + min V), and rounding moves the test by about 1e-16 (max d)^2.
func (g *merger) add(c Component, t float64) bool {
	if g.w == 0 {
		if !g.kkSet || c.Mean != g.mean {
			// kk depends on the mean only: most mixtures have one mean throughout.
			g.kk, g.kkSet = 0, true
			if g.lo <= g.hi {
				k := max(abs(g.lo-c.Mean), abs(g.hi-c.Mean))
				g.kk = k * k
			}
		}
		g.w, g.mean, g.vmin = c.Weight, c.Mean, c.Var
		g.v0, g.sd, g.sq = c.Var, 0, 0
		return true
	}
	if c.Mean != g.mean || c.Var == 0 || g.vmin == 0 || c.Weight == 0 {
		return false
	}
	w := g.w + c.Weight
	d := c.Var - g.v0
	sd := g.sd + c.Weight*d
	sq := g.sq + c.Weight*d*d
	vmin := g.vmin
	if c.Var < vmin {
		vmin = c.Var
	}
	s := t + vmin
	sk := s + g.kk
	if !((sq*w-sd*sd)*sk*sk <= mergeTol*(w*w)*(s*s)*(s*s)) {
		return false
	}
	g.w, g.sd, g.sq, g.vmin = w, sd, sq, vmin
	return true
}

func abs(x float64) float64 { return math.Float64frombits(math.Float64bits(x) &^ (1 << 63)) }

// component returns the group as one component. A group of one (sd = 0) keeps its Var as it
// is, whatever its weight (a weight that underflowed to 0 must not turn it into 0/0).
func (g *merger) component() Component {
	if g.sd == 0 {
		return Component{g.w, g.mean, g.v0}
	}
	return Component{g.w, g.mean, g.v0 + g.sd/g.w}
}

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
	a := math.Abs(y)
	phi, far := normalAt(a)
	e := endPoint{y: y, phi: phi}
	near := 1 - far
	if y >= 0 {
		e.right, e.left = far, near
	} else {
		e.right, e.left = near, far
	}
	e.j0, e.j1, e.j2 = tailMoments(a, e.phi, far)
	return e
}

// normalAt returns phi(a) and the tail P(Z > a) for a >= 0. Below a = 0.1 both come from
// the series of narrowMoments (phi(0) sum_j (-a^2/2)^j / j!, and 1/2 minus its integral
// over [0, a]; the eighth term is below 2e-20 relative) instead of exp and erfc: a component
// far wider than the kinks (the heavy tail of a Student-t mixture) then costs neither.
func normalAt(a float64) (phi, far float64) {
	if a < 0.1 {
		a2 := a * a
		for j := len(narrowCoef) - 1; j >= 0; j-- {
			phi = phi*a2 + narrowPhi[j]
			far = far*a2 + narrowCoef[j][0]
		}
		return phi, 0.5 - far*a
	}
	return math.Exp(-a*a/2) / math.Sqrt(2*math.Pi), math.Erfc(a/math.Sqrt2) / 2
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

// addOdd is addComponent for the pieces of an oddThree prox: a component of mean 0 and
// positive Var + t meets both kinks at the same distance, so one endpoint serves both. It
// performs the very operations addComponent performs on such a component, in the same
// order, with the branches that cannot be taken left out, so that the two agree bit for bit
// (TestAddOddMatchesAddComponent); any other component goes to addComponent.
func addOdd(m *Moments, c Component, pieces []penalty.Piece, t float64) {
	b := oddBatch{pieces: pieces, t: t}
	b.add(m, c)
	b.flush(m)
}

// oddBatchSize is how many components oddBatch holds.
const oddBatchSize = 16

// oddBatch evaluates components against an oddThree prox as addOdd does, a batch at a time:
// each stage (square root, exponential, erfc, the moments) runs over the whole batch before
// the next, so that the processor overlaps the long chains of dependent operations of
// successive components instead of waiting on each in turn. Components are added to the
// moments in the order they came, as addComponent would add them.
type oddBatch struct {
	pieces []penalty.Piece
	t      float64
	n      int
	c      [oddBatchSize]Component

	// With slopes set, flush also accumulates sl, the derivatives of the moments, from the
	// derivatives in g of the outer and middle slopes (dSo, dSm), of the right intercept (dIo)
	// and of the kink (dk); a component that goes to addComponent clears slopes.
	slopes            bool
	dSo, dSm, dIo, dk float64
	dkk, invT         float64 // dk / k and 1 / t
	sl                Slopes
}

// pieceSlopes sets the derivatives of the pieces in g by central differences and reports
// whether the pieces keep their odd three-piece form on both sides.
func (b *oddBatch) pieceSlopes(p penalty.Penalty, g float64) bool {
	h := slopeStep * g
	var lhi penalty.Linear
	hi, ok := piecesOf(p, g+h, &lhi)
	if !ok || !oddThree(hi) {
		return false
	}
	lo := b.pieces
	b.dSo = (hi[2].Slope - lo[2].Slope) / h
	b.dSm = (hi[1].Slope - lo[1].Slope) / h
	b.dIo = (hi[2].Intercept - lo[2].Intercept) / h
	b.dk = (hi[1].Hi - lo[1].Hi) / h
	b.dkk = b.dk / b.pieces[1].Hi
	b.invT = 1 / b.t
	return finiteAll4(b.dSo, b.dSm, b.dIo, b.dkk+b.invT)
}

func finiteAll4(a, b, c, d float64) bool {
	s := a + b + c + d
	return !math.IsNaN(s) && !math.IsInf(s, 0)
}

// add queues c (a component of mean 0 and positive Var + t) or, for any other, evaluates
// the queue and then c itself by addComponent.
func (b *oddBatch) add(m *Moments, c Component) {
	if c.Mean != 0 || !(c.Var+b.t > 0) {
		b.flush(m)
		addComponent(m, c, b.pieces, b.t)
		b.slopes = false
		return
	}
	b.c[b.n] = c
	b.n++
	if b.n == oddBatchSize {
		b.flush(m)
	}
}

// flush adds the moments of the queued components to m and empties the queue.
func (b *oddBatch) flush(m *Moments) {
	n, t := b.n, b.t
	b.n = 0
	lq, mq, rq := b.pieces[0], b.pieces[1], b.pieces[2]
	var sd, ys, phis, fars [oddBatchSize]float64
	for i, c := range b.c[:n] {
		sd[i] = math.Sqrt(c.Var + t)
		// The endpoint y = -k/sd < 0 (newEndPoint).
		ys[i] = (lq.Hi - c.Mean) / sd[i]
	}
	var m0s, m2s [oddBatchSize]float64
	for i, y := range ys[:n] {
		// normalAt(u), and below u = 0.1 the middle moments narrowMoments(-u, u) from the
		// same series in one pass (the same operations, so the same numbers).
		u := -y
		if u < 0.1 {
			u2 := u * u
			var p, s0, s2 float64
			for j := len(narrowCoef) - 1; j >= 0; j-- {
				p = p*u2 + narrowPhi[j]
				s0 = s0*u2 + narrowCoef[j][0]
				s2 = s2*u2 + narrowCoef[j][2]
			}
			phis[i], fars[i] = p, 0.5-s0*u
			m0s[i], m2s[i] = 2*u*s0, 2*u*u2*s2
			continue
		}
		phis[i], fars[i] = math.Exp(-u*u/2)/math.Sqrt(2*math.Pi), math.Erfc(u/math.Sqrt2)/2
	}
	for i, c := range b.c[:n] {
		v := c.Var + t
		sd, y, phi, far := sd[i], ys[i], phis[i], fars[i]
		mu := c.Mean
		u := -y
		// The far tail and its moments at u.
		j0, j1, j2 := tailMoments(u, phi, far)
		tails := !(j0 == 0 && j1 == 0 && j2 == 0)
		var mse, a, nz float64
		var k0l, k1l, k0r, k1r float64
		if tails {
			// Left of the mean, expanded about y.
			k1 := ((lq.Slope - 1) + t/v) * sd
			k0 := (lq.Slope-1)*mu + lq.Intercept
			k0 += k1 * y
			k1 = -k1
			mse += k0*k0*j0 + 2*k0*k1*j1 + k1*k1*j2
			a += lq.Slope * j0
			if !lq.Zero() {
				nz += j0
			}
			k0l, k1l = k0, k1
		}
		// The middle piece holds the mean.
		k1 := ((mq.Slope - 1) + t/v) * sd
		k0 := (mq.Slope-1)*mu + mq.Intercept
		var m0, m1, m2 float64
		if u < 0.1 {
			m0, m1, m2 = m0s[i], 0, m2s[i]
		} else {
			// A kink beyond the reach of the normal law has phi = 0, and its y phi terms
			// are 0 even where y overflowed to +-Inf (as in addComponent).
			m0 = 1 - far
			m1 = phi
			if phi > 0 {
				m2 = y * phi
			}
			m0 -= far
			m1 -= phi
			if phi > 0 {
				m2 -= u * phi
			}
			m2 += m0
		}
		if !(m0 == 0 && m1 == 0 && m2 == 0) {
			mse += k0*k0*m0 + 2*k0*k1*m1 + k1*k1*m2
			a += mq.Slope * m0
			if !mq.Zero() {
				nz += m0
			}
		}
		k1m := k1
		if tails {
			// Right of the mean, expanded about u.
			k1 := ((rq.Slope - 1) + t/v) * sd
			k0 := (rq.Slope-1)*mu + rq.Intercept
			k0 += k1 * u
			mse += k0*k0*j0 + 2*k0*k1*j1 + k1*k1*j2
			a += rq.Slope * j0
			if !rq.Zero() {
				nz += j0
			}
			k0r, k1r = k0, k1
		}
		if c.active() {
			m.Active += c.Weight
		}
		m.MSE += c.Weight * (mse + c.Var*t/v)
		m.A += c.Weight * a
		m.NonZero += c.Weight * nz
		if c.active() {
			m.TruePos += c.Weight * nz
		}
		if !b.slopes {
			continue
		}
		// The slopes (docs/method.md section 6), from the same quantities. With S the
		// slopes, k the kink and beta = Var/v:
		//
		//	dA/dt   = (So - Sm) u phi / v
		//	dMSE/dt = So^2 2Q + Sm^2 (1 - 2Q) + 2 (So - Sm) (Sm - beta) u phi
		//	dA/dg   = dSo 2Q + dSm (1 - 2Q) - 2 (So - Sm) phi dk / sd
		//	dMSE/dg = 2 sum over pieces of E[(xhat - E[x0|r]) d xhat/dg ; piece]
		//
		// the last in the truncated moments of the MSE: on each piece xhat - E[x0|r] =
		// k0 + k1 s and d xhat/dg = e0 + e1 s in the piece's own variable s.
		so, sm := rq.Slope, mq.Slope
		beta := 1 - t/v // Var/v, without another division (a slope needs no more digits)
		q2 := 2 * j0    // P(|r| > k)
		upv := 0.0
		if phi > 0 {
			upv = u * phi
		}
		mt := so*so*q2 + sm*sm*m0 + 2*(so-sm)*(sm-beta)*upv
		at := (so - sm) * upv * b.invT * (t / v)
		ag := b.dSo*q2 + b.dSm*m0 - 2*(so-sm)*upv*b.dkk
		mg := k1m * b.dSm * sd * m2
		if tails {
			e1 := b.dSo * sd
			e0 := -b.dIo + e1*y
			// Left: s runs away from the kink, where d xhat/dg = e0 - e1 s.
			mg += k0l*e0*j0 + (k1l*e0-k0l*e1)*j1 - k1l*e1*j2
			e0 = b.dIo + e1*u
			mg += k0r*e0*j0 + (k0r*e1+k1r*e0)*j1 + k1r*e1*j2
		}
		w := c.Weight
		b.sl.MSEg += w * 2 * mg
		b.sl.MSEt += w * mt
		b.sl.Ag += w * ag
		b.sl.At += w * at
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
// precision in 8 terms there (the eighth is below 2e-20 relative). The coefficients of the
// integrated series are in narrowCoef.
func narrowMoments(a, b float64) (m0, m1, m2 float64) {
	if a == -b {
		// A piece centred on the mean: m1 = 0 and the odd powers cancel in pairs.
		b2 := b * b
		for j := len(narrowCoef) - 1; j >= 0; j-- {
			m0 = m0*b2 + narrowCoef[j][0]
			m2 = m2*b2 + narrowCoef[j][2]
		}
		return 2 * b * m0, 0, 2 * b * b2 * m2
	}
	a2, b2 := a*a, b*b
	pa, pb := a, b // a^(2j+1), b^(2j+1)
	for j := range narrowCoef {
		c := &narrowCoef[j]
		m0 += c[0] * (pb - pa)
		m1 += c[1] * (pb*b - pa*a)
		m2 += c[2] * (pb*b2 - pa*a2)
		pa *= a2
		pb *= b2
	}
	return m0, m1, m2
}

// narrowCoef[j][k] = phi(0) (-1/2)^j / j! / (2j + 1 + k): the j-th term of the series of
// narrowMoments, integrated against s^k.
var narrowCoef, narrowPhi = func() (c [8][3]float64, p [8]float64) {
	f := 1 / math.Sqrt(2*math.Pi)
	for j := range c {
		p[j] = f
		for k := range c[j] {
			c[j][k] = f / float64(2*j+1+k)
		}
		f *= -0.5 / float64(j+1)
	}
	return c, p
}()
