package signal

import (
	"math"

	"hdrisk/engine/penalty"
)

// The channel's moments for a Laplace law against a piecewise-linear prox in closed form
// (docs/method.md section 6.1). With x0 = +-X, X exponential of mean b, and r = x0 + sigma z,
// every moment of a piece is a combination of six integrals E[X^j Z^k ; r in the piece],
// and each of these is, at a piece end a, a normal tail at w = a/sigma plus
// exp(-a/b + S^2/2) times truncated normal moments at x = S - w, S = sigma/b: the exponential
// density times the normal one is again a normal density, shifted by S (the convolution of
// an exponential and a normal law, common practice). Where x >= 0 that product is written
// phi(w) R(x) with the Mills ratio R, so that it neither overflows nor underflows. Compared
// with the 63-node mixture that Laplace holds (1e-8), this is exact to rounding and evaluates
// a handful of normal tails instead of some thirty components.

// laplaceSmall is the smallest S = sigma/b for which expect uses the closed forms, the
// smallest that TestLaplaceClosedForm checks; below, the mixture serves. Where S and the
// kinks are both far below b, the moments of the middle piece come as differences of numbers
// of size b^2: measured, with a threshold of 1e-3 b the MSE is within 1e-10 relative at
// S = 1e-3 to 1e-6 (the mixture's error there is 8e-10), and within 1e-14 with thresholds
// of the order of b.
const laplaceSmall = 1e-6

// laplaceLarge is the largest S for which expect uses the closed forms (S^2 stays far from
// overflow).
const laplaceLarge = 1e100

// laplaceScaler is a law that is a Laplace law: laplaceScale returns its scale b in the units
// Expect sees, 0 for any other law.
type laplaceScaler interface{ laplaceScale() float64 }

func (l laplace) laplaceScale() float64 { return l.scale }

func (l scaled) laplaceScale() float64 {
	if b, ok := l.base.(laplace); ok {
		return b.scale / l.s
	}
	return 0
}

// lapEnd holds, at a finite piece end a, for the half law R = X + sigma Z (X exponential of
// mean b, Z standard normal, independent), the six integrals f = E[X^j Z^k ; R >= a] when
// upper (a >= 0) or E[X^j Z^k ; R < a] otherwise, in the order of lapTotals; p is the density
// of R at a and m1 = E[X ; R in da]/da.
type lapEnd struct {
	a     float64
	upper bool
	f     [6]float64
	p, m1 float64
}

// lapTotals returns E[X^j Z^k] in the order (j, k) = (0,0), (1,0), (2,0), (0,1), (1,1), (0,2).
func lapTotals(b float64) [6]float64 { return [6]float64{1, b, 2 * b * b, 0, 0, 1} }

// newLapEnd evaluates the integrals at a (docs/method.md section 6.1).
//
// Split at Z = w = a/sigma. Above w, X >= a - sigma Z holds for every X >= 0, which gives
// E[X^j] E[Z^k ; Z >= w]. Below, y = a - sigma Z > 0 and E[X^j ; X >= y] = exp(-y/b) P_j(y),
// P_0 = 1, P_1 = y + b, P_2 = y^2 + 2 b y + 2 b^2; the factor exp(sigma Z/b) turns phi(Z) into
// exp(S^2/2) phi(Z - S), so that with Y' = S - Z, which is standard normal, the part below w
// is g = exp(-a/b + S^2/2) E[(S - Y')^k P_j(sigma (Y' - x)) ; Y' >= x], x = S - w. The lower
// integrals are E[X^j] E[Z^k ; Z < w] - g. Where x >= 0, g is expanded in s = Y' - x >= 0 with
// the tail moments of Y' about x, scaled by phi(x) (millsMoments), and
// exp(-a/b + S^2/2) phi(x) = phi(w); where x < 0 the moments of Y' itself enter, and the
// exponent is below -S^2/2.
func newLapEnd(a, b, sigma float64) lapEnd {
	S := sigma / b
	w := a / sigma
	x := S - w
	phi, q := normalAt(math.Abs(w)) // phi(w), P(Z > |w|)
	var g [6]float64
	var j1 float64 // exp(-a/b + S^2/2) E[Y' - x ; Y' >= x]
	if x >= 0 {
		if sc := phi; sc > 0 {
			r0, r1, r2 := millsMoments(x)
			// In s: Z = w - s, y = sigma s.
			g = [6]float64{
				r0,
				b*r0 + sigma*r1,
				2*b*b*r0 + 2*b*sigma*r1 + sigma*sigma*r2,
				w*r0 - r1,
				w*b*r0 + (w*sigma-b)*r1 - sigma*r2,
				w*w*r0 - 2*w*r1 + r2,
			}
			for i := range g {
				g[i] *= sc
			}
			j1 = sc * r1
		}
	} else if e := math.Exp(-a/b + S*S/2); e > 0 {
		px, qx := normalAt(-x)
		g0, g1 := 1-qx, px // E[1 ; Y' >= x], E[Y' ; Y' >= x] for x < 0
		g2 := g0 + x*g1
		y0 := -sigma * x // y at Y' = 0: a - sigma S >= 0
		// In Y': Z = S - Y', y = y0 + sigma Y'.
		g = [6]float64{
			g0,
			(b+y0)*g0 + sigma*g1,
			(y0*y0+2*b*y0+2*b*b)*g0 + 2*sigma*(y0+b)*g1 + sigma*sigma*g2,
			S*g0 - g1,
			S*(b+y0)*g0 + (S*sigma-b-y0)*g1 - sigma*g2,
			S*S*g0 - 2*S*g1 + g2,
		}
		for i := range g {
			g[i] *= e
		}
		j1 = e * (g1 - x*g0)
	}
	e := lapEnd{a: a, upper: a >= 0, p: g[0] / b, m1: S * j1}
	exj := [3]float64{1, b, 2 * b * b}
	wphi := 0.0
	if phi > 0 {
		wphi = w * phi
	}
	if e.upper {
		// E[Z^k ; Z >= w] for w >= 0, plus g.
		tk := [3]float64{q, phi, q + wphi}
		for i := range e.f {
			e.f[i] = exj[lapJ[i]]*tk[lapK[i]] + g[i]
		}
		return e
	}
	// E[Z^k ; Z < w] for w < 0, minus g.
	tk := [3]float64{q, -phi, q - wphi}
	for i := range e.f {
		e.f[i] = exj[lapJ[i]]*tk[lapK[i]] - g[i]
	}
	return e
}

// The powers (j, k) of X^j Z^k of each of lapEnd's integrals.
var lapJ, lapK = [6]int{0, 1, 2, 0, 1, 0}, [6]int{0, 0, 0, 1, 1, 2}

// millsMoments returns, for x >= 0, the right-tail moments of the standard normal about x,
// E[(Z - x)^m ; Z > x] for m = 0, 1, 2, divided by phi(x): as in tailMoments, from erfc up to
// x = 4 and beyond from the continued fraction of the Mills ratio (Abramowitz & Stegun
// 26.2.14), which keeps them finite where phi(x) underflows.
func millsMoments(x float64) (r0, r1, r2 float64) {
	if x <= 4 {
		phi, q := normalAt(x)
		r0 = q / phi
		r1 = 1 - x*r0
		return r0, r1, r0 - x*r1
	}
	k := 0.0
	for n := 8 + int(500/(x*x)); n >= 2; n-- {
		k = float64(n) / (x + k)
	}
	k1 := 1 / (x + k)
	r0 = 1 / (x + k1)
	return r0, r0 * k1, r0 * k1 * k
}

// lapPiece is a piece of the prox with the derivatives in g of its slope, intercept and upper
// end.
type lapPiece struct {
	penalty.Piece
	dSlope, dIntercept, dHi float64
}

// lapMaxPieces bounds the pieces the closed forms take (on the stack); expect gives more to
// the mixture.
const lapMaxPieces = 8

// expectLaplace returns the moments of the channel for the Laplace law of scale b and the
// pieces (at most lapMaxPieces) at noise t > 0, with their slopes when d (the derivatives of
// the pieces) is given; ok is false where the closed forms do not serve (S out of
// [laplaceSmall, laplaceLarge], a result that is not finite), and the caller then uses the
// mixture.
func expectLaplace(b float64, pieces []penalty.Piece, d []lapPiece, t float64) (m Moments, sl Slopes, ok bool) {
	sigma := math.Sqrt(t)
	if S := sigma / b; !(S >= laplaceSmall && S <= laplaceLarge) {
		return m, sl, false
	}
	n := len(pieces)
	var pos, neg [lapMaxPieces]lapPiece
	symmetric := true
	if d != nil {
		copy(pos[:], d)
	} else {
		for i, q := range pieces {
			pos[i].Piece = q
		}
	}
	// The law of -X against the prox is the law of X against its mirror image: r -> -r maps
	// [Lo, Hi) to (-Hi, -Lo] with the same slope and the opposite intercept.
	for i := range n {
		p := pos[n-1-i]
		lo := math.Inf(-1)
		if i > 0 {
			lo = neg[i-1].Hi
		}
		neg[i] = lapPiece{penalty.Piece{Lo: lo, Hi: -p.Lo, Slope: p.Slope, Intercept: -p.Intercept}, p.dSlope, -p.dIntercept, 0}
		if i < n-1 {
			neg[i].dHi = -pos[n-2-i].dHi
		}
		if neg[i].Hi != pos[i].Hi || neg[i].Slope != pos[i].Slope || neg[i].Intercept != pos[i].Intercept {
			symmetric = false
		}
	}
	// Each half has weight 1/2; for a symmetric prox the two halves are the same.
	var h lapHalf
	h.add(b, sigma, t, pos[:n], d != nil)
	w := 1.0
	if !symmetric {
		h.add(b, sigma, t, neg[:n], d != nil)
		w = 0.5
	}
	m = Moments{MSE: w * h.mse, A: w * h.a, NonZero: w * h.nz, TruePos: w * h.nz, Active: 1}
	sl = Slopes{MSEg: w * h.sl.MSEg, MSEt: w * h.sl.MSEt, Ag: w * h.sl.Ag, At: w * h.sl.At}
	if !finiteAll4(m.MSE, m.A, m.NonZero, 0) || !finiteAll4(sl.MSEg, sl.MSEt, sl.Ag, sl.At) {
		return Moments{}, Slopes{}, false
	}
	return m, sl, true
}

// lapHalf accumulates the moments of the half law R = X + sigma Z against pieces.
type lapHalf struct {
	mse, a, nz float64
	sl         Slopes
}

// add adds the moments of R against the pieces (docs/method.md section 6.1). On a piece
// xhat - x0 = (s - 1) X + s sigma Z + c, so its MSE is a quadratic form in the piece's
// integrals; the slopes in t follow from Stein's lemma in z (the jumps of the prox's slope at
// the kinks weigh the density of R and its first x-moment there), those in g from the
// derivatives of the pieces, as in section 6.
func (h *lapHalf) add(b, sigma, t float64, pc []lapPiece, slopes bool) {
	tot := lapTotals(b)
	var ends [lapMaxPieces]lapEnd
	for i := range pc[:len(pc)-1] {
		ends[i] = newLapEnd(pc[i].Hi, b, sigma)
	}
	for i, q := range pc {
		// The integrals over the piece [Lo, Hi): differences of integrals of one side,
		// so that a piece in a tail is never the difference of two totals.
		var f [6]float64
		loInf, hiInf := i == 0, i == len(pc)-1
		switch {
		case !hiInf && !ends[i].upper:
			for k := range f {
				f[k] = ends[i].f[k]
				if !loInf {
					f[k] -= ends[i-1].f[k]
				}
			}
		case !loInf && ends[i-1].upper:
			for k := range f {
				f[k] = ends[i-1].f[k]
				if !hiInf {
					f[k] -= ends[i].f[k]
				}
			}
		default:
			for k := range f {
				f[k] = tot[k]
				if !loInf {
					f[k] -= ends[i-1].f[k]
				}
				if !hiInf {
					f[k] -= ends[i].f[k]
				}
			}
		}
		if f == [6]float64{} {
			continue // beyond the reach of the law: the intercept may be huge
		}
		// M is the matrix of second moments of (X, Z, 1) over the piece; the error is
		// u . (X, Z, 1) and its derivative in g is v . (X, Z, 1).
		M := [3][3]float64{{f[2], f[4], f[1]}, {f[4], f[5], f[3]}, {f[1], f[3], f[0]}}
		u := [3]float64{q.Slope - 1, q.Slope * sigma, q.Intercept}
		var mse float64
		for r := range 3 {
			for c := range 3 {
				mse += u[r] * M[r][c] * u[c]
			}
		}
		h.mse += mse
		h.a += q.Slope * f[0]
		if !q.Zero() {
			h.nz += f[0]
		}
		if !slopes {
			continue
		}
		v := [3]float64{q.dSlope, q.dSlope * sigma, q.dIntercept}
		var mg float64
		for r := range 3 {
			for c := range 3 {
				mg += u[r] * M[r][c] * v[c]
			}
		}
		h.sl.MSEg += 2 * mg
		h.sl.MSEt += q.Slope * q.Slope * f[0]
		h.sl.Ag += q.dSlope * f[0]
	}
	if !slopes {
		return
	}
	for i := range pc[:len(pc)-1] {
		e := ends[i]
		right := pc[i+1]
		ds := right.Slope - pc[i].Slope
		if ds == 0 || e.p == 0 {
			continue
		}
		xhat := right.Slope*e.a + right.Intercept
		h.sl.MSEt += ds * (xhat*e.p - e.m1)
		// dA/dt = -1/2 sum ds p'(a), with p'(a) = -(a p(a) - m1(a))/t.
		h.sl.At += ds * (e.a*e.p - e.m1) / (2 * t)
		h.sl.Ag -= pc[i].dHi * e.p * ds
	}
}

// lapDerivs sets d to the pieces with their derivatives in g, by forward differences of
// relative step slopeStep (as oddBatch.pieceSlopes), and reports whether the pieces keep
// their number and every derivative is finite.
func lapDerivs(p penalty.Penalty, g float64, pieces []penalty.Piece, d []lapPiece) bool {
	h := slopeStep * g
	var lin penalty.Linear
	hi, ok := piecesOf(p, g+h, &lin)
	if !ok || len(hi) != len(pieces) {
		return false
	}
	for i, q := range pieces {
		d[i] = lapPiece{Piece: q, dSlope: (hi[i].Slope - q.Slope) / h, dIntercept: (hi[i].Intercept - q.Intercept) / h}
		if i < len(pieces)-1 {
			d[i].dHi = (hi[i].Hi - q.Hi) / h
		}
		if !finiteAll4(d[i].dSlope, d[i].dIntercept, d[i].dHi, 0) {
			return false
		}
	}
	return true
}
