package signal

import "math"

// lapBranchSmall and lapBranchLarge bound S = sqrt(t)/b where expectBranch integrates a
// Laplace law through its posterior in closed form (laplaceNode) instead of its mixture: the
// range TestLaplaceBranch checks. Outside it, and at t = 0, the mixture serves.
const (
	lapBranchSmall = 1e-6
	lapBranchLarge = 1e6
)

// laplaceNode returns, at r >= 0 for the Laplace law of scale b at noise sigma = sqrt(t), the
// density p(r) of r = x0 + sigma z and the conditional error p(r) E[(x - x0)^2 | r] of an
// estimate x (docs/method.md section 6.2). The posterior is the sum of two truncated normal
// laws: x0 > 0 with x0 = sigma (Y - c), Y standard normal beyond c = S - w, and x0 < 0 its
// mirror image with c = S + w (S = sigma/b, w = r/sigma); each comes with its weight in p.
func laplaceNode(b, sigma, r, x float64) (p, e float64) {
	S, w := sigma/b, r/sigma
	for _, side := range [2]float64{1, -1} {
		wt, m1, v := lapPosterior(S, side*w)
		wt /= 2 * b
		d := x - side*sigma*m1
		p += wt
		e += wt * (d*d + sigma*sigma*v)
	}
	return p, e
}

// lapPosterior returns, for the half x0 > 0 seen from w (w = r/sigma, or -r/sigma for the other
// half), with c = S - w: 2b times its weight in the density of r, exp(S^2/2 - w S) P(Y > c);
// the mean m1 = E[Y - c | Y > c] and the variance v = Var[Y | Y > c]. For c >= 0 the weight is
// phi(w) times the Mills ratio at c (exp(S^2/2 - w S) phi(c) = phi(w): nothing overflows) and
// the moments are the tail moments of Y about c (millsMoments); for c < 0 the exponent is
// below -S^2/2, P(Y > c) >= 1/2, and the inverse Mills ratio lambda = phi(c)/P(Y > c) is
// small: m1 = lambda - c, v = 1 + c lambda - lambda^2 (Johnson, Kotz & Balakrishnan 1994,
// Continuous Univariate Distributions, vol. 1, section 10.1).
func lapPosterior(S, w float64) (wt, m1, v float64) {
	c := S - w
	if c >= 0 {
		r0, r1, r2 := millsMoments(c)
		m1 = r1 / r0
		return math.Exp(-w*w/2) / math.Sqrt(2*math.Pi) * r0, m1, math.Max(r2/r0-m1*m1, 0)
	}
	phi := math.Exp(-c*c/2) / math.Sqrt(2*math.Pi)
	q := math.Erfc(c/math.Sqrt2) / 2
	lambda := phi / q
	return math.Exp(S*S/2-w*S) * q, lambda - c, 1 + c*lambda - lambda*lambda
}
