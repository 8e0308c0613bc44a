package signal

import (
	"math"
	"math/rand/v2"
)

// MaxCoarse is the largest number of nodes Coarse builds.
const MaxCoarse = 8

// coarseFactor is how many components of positive variance a law needs per node of Coarse:
// with fewer, the surrogate would not be much cheaper than the law.
const coarseFactor = 4

// coarse is the surrogate that Coarse returns: its own mixture, and the base law for the rest.
type coarse struct {
	comps []Component
	base  Law
}

func (c coarse) Name() string                           { return c.base.Name() }
func (c coarse) Exact() bool                            { return false }
func (c coarse) Second() float64                        { return c.base.Second() }
func (c coarse) Sample(rng *rand.Rand, n int) []float64 { return c.base.Sample(rng, n) }
func (c coarse) Mixture() []Component                   { return append([]Component(nil), c.comps...) }
func (c coarse) components() []Component                { return c.comps }

// Coarse returns a surrogate of the scale mixture l for the scalar channel at noise variances
// near t > 0: the components of mean 0 and positive variance are replaced by the n-node Gauss
// rule (2 <= n <= MaxCoarse) of the discrete measure Weight (Var + t) in x = 1/sqrt(Var + t),
// each node x_j of weight W_j becoming the component (W_j x_j^2, 0, 1/x_j^2 - t); point
// masses at 0 are kept as they are. Name, Second and Sample are those of l.
//
// Why this variable (docs/method.md section 3.6): at noise t a component's moments are
// v G(x) with v = Var + t, G analytic in x on [0, 1/sqrt(t)] (the closed forms of section 6
// are functions of k x and t x^2), so that the rule integrates the moments of the whole
// mixture as it integrates G, exactly for its polynomial part of degree 2n - 1, whatever the
// tail of the mixing law (x lies in (0, 1/sqrt(t)], so every moment of the measure is finite).
// It keeps the weight and E[x0^2] exactly (the degrees 2 and 0 in x). Away from t the rule
// is still a mixture of the right weight and E[x0^2], only a coarser approximation.
//
// ok is false, and the law unusable, for a Laplace law (whose channel has closed forms), when
// a component has a nonzero mean, when fewer than
// 4n components have a positive variance (the surrogate would save little), when t is not a
// positive finite number or when the rule fails (every node must lie inside the points with
// a positive weight and give a positive variance).
func Coarse(l Law, n int, t float64) (Law, bool) {
	if n < 2 || n > MaxCoarse || !(t > 0) || math.IsInf(t, 1) {
		return nil, false
	}
	if ls, isL := l.(laplaceScaler); isL && ls.laplaceScale() > 0 {
		// Expect evaluates a Laplace law against a piecewise-linear prox in closed form
		// (laplaceform.go), at the cost of a few components: a surrogate would cost more
		// than it saves.
		return nil, false
	}
	comps := componentsOf(l)
	if f, ok := l.(folder); ok {
		// The heavy tail folded into a few components (see folded) is the same measure to
		// the accuracy the surrogate needs, and fewer points.
		if fd := f.foldedTail(); fd.comps != nil {
			comps = fd.comps
		}
	}
	count := 0
	zero := 0.0
	xmax := 0.0
	for _, c := range comps {
		if c.Mean != 0 {
			return nil, false
		}
		if c.Var > 0 {
			count++
			xmax = math.Max(xmax, 1/math.Sqrt(c.Var+t))
		} else {
			zero += c.Weight
		}
	}
	if count < coarseFactor*n || !(xmax > 0) || math.IsInf(xmax, 1) {
		return nil, false
	}
	var nodes, weights [MaxCoarse]float64
	if !gaussRule(comps, t, xmax, nodes[:n], weights[:n]) {
		return nil, false
	}
	out := make([]Component, 0, n+1)
	for j := range n {
		x := nodes[j] * xmax
		v := 1/(x*x) - t
		w := weights[j] * x * x
		if !(v > 0) || math.IsInf(v, 1) || !(w > 0) || math.IsInf(w, 1) {
			return nil, false
		}
		out = append(out, Component{w, 0, v})
	}
	if zero > 0 {
		out = append(out, Component{zero, 0, 0})
	}
	return coarse{out, l}, true
}

// coarseStack is how many points gaussRule holds on the stack (more are allocated).
const coarseStack = 96

// rulePoint is one point of the measure of gaussRule: its abscissa and mass, and the values
// of the last two orthogonal polynomials there.
type rulePoint struct{ x, mu, prev, cur float64 }

// gaussRule fills nodes and weights with the Gauss rule of the measure sum Weight (Var + t)
// delta(x - x_i/xmax), x_i = 1/sqrt(Var + t), over the components of positive variance: the
// discretized Stieltjes procedure gives the recurrence coefficients of the monic orthogonal
// polynomials, and the eigenvalues and first eigenvector components of their Jacobi matrix
// give the rule (Gautschi 2004, "Orthogonal Polynomials: Computation and Approximation",
// section 2.2.3; Golub & Welsch 1969, Math. Comp. 23), as gaussOfPoints does, here without
// allocating for mixtures of up to coarseStack components. Nodes are in units of xmax. It
// reports whether every node lies in (0, 1] with a positive weight.
func gaussRule(comps []Component, t, xmax float64, nodes, weights []float64) bool {
	n := len(nodes)
	var buf [coarseStack]rulePoint
	pts := buf[:0]
	if len(comps) > coarseStack {
		pts = make([]rulePoint, 0, len(comps))
	}
	inv := 1 / xmax
	var norm, nx float64
	for _, c := range comps {
		if c.Var > 0 {
			v := c.Var + t
			p := rulePoint{x: inv / math.Sqrt(v), mu: c.Weight * v, cur: 1}
			norm += p.mu
			nx += p.mu * p.x
			pts = append(pts, p)
		}
	}
	var alpha, beta [MaxCoarse]float64
	normPrev := 0.0
	for j := 0; j < n; j++ {
		if !(norm > 0) {
			return false
		}
		a := nx / norm
		b := norm
		if j > 0 {
			b = norm / normPrev
		}
		alpha[j], beta[j], normPrev = a, b, norm
		if j == n-1 {
			break
		}
		if j == 0 {
			b = 0 // p_(-1) = 0
		}
		// One pass forms p_(j+1) at every point and the norms of p_(j+1) and x p_(j+1)^2.
		norm, nx = 0, 0
		for i := range pts {
			p := &pts[i]
			c := (p.x-a)*p.cur - b*p.prev
			p.prev, p.cur = p.cur, c
			m := p.mu * c * c
			norm += m
			nx += m * p.x
		}
	}
	return jacobiEigen(alpha[:n], beta[:n], nodes, weights)
}

// jacobiEigen returns the Gauss rule of the Jacobi matrix with diagonal alpha and
// off-diagonal sqrt(beta[1:]), beta[0] being the total mass: the nodes are its eigenvalues and
// the weights beta[0] times the squared first components of its unit eigenvectors (Golub &
// Welsch 1969). The eigenvalues come from implicit symmetric QR steps with the Wilkinson
// shift and deflation (Golub & Van Loan 2013, "Matrix Computations", 4th ed., section 8.3),
// written on the diagonal d and the off-diagonal e with the bulge of the step held apart,
// accumulating only the first row of the product of the rotations. It reports whether the
// steps converged and every node lies in (0, 1] with a positive weight. (gonum's Dsteqr on the
// same arrays gives the same rule but moves them to the heap and updates the whole
// eigenvector matrix: measured, 1.6 -> 2.4 us a surrogate and the Student-t LASSO about 15 %
// slower; TestCoarseRuleMatchesGaussOfPoints checks this rule against gonum's EigenSym.)
func jacobiEigen(alpha, beta, nodes, weights []float64) bool {
	n := len(alpha)
	var d, e, q [MaxCoarse]float64 // q: the first row of the accumulated rotations
	for j := range n {
		d[j] = alpha[j]
		if j > 0 {
			e[j-1] = math.Sqrt(beta[j])
		}
	}
	q[0] = 1
	const eps = 0x1p-52
	small := func(k int) bool { return math.Abs(e[k]) <= eps*(math.Abs(d[k])+math.Abs(d[k+1])) }
	hi := n - 1
	for iter := 0; hi > 0; iter++ {
		if iter > 30*n {
			return false
		}
		if small(hi - 1) {
			hi--
			continue
		}
		lo := hi - 1
		for lo > 0 && !small(lo-1) {
			lo--
		}
		// The Wilkinson shift: the eigenvalue of the trailing 2 x 2 block nearer d[hi].
		h := (d[hi-1] - d[hi]) / 2
		f := e[hi-1]
		mu := d[hi] - f*f/(h+math.Copysign(math.Sqrt(h*h+f*f), h))
		x, z := d[lo]-mu, e[lo]
		bulge := 0.0
		for k := lo; k < hi; k++ {
			if k > lo {
				x, z = e[k-1], bulge
			}
			// The entries are of order one (the nodes lie in (0, 1]): no scaling is needed.
			r := math.Sqrt(x*x + z*z)
			if r == 0 {
				break
			}
			c, s := x/r, z/r
			if k > lo {
				e[k-1] = r
			}
			// T <- G^T T G on the coordinates k, k+1, G = [[c, -s], [s, c]].
			p, w, g := d[k], d[k+1], e[k]
			cs := c * s
			d[k] = c*c*p + 2*cs*g + s*s*w
			d[k+1] = s*s*p - 2*cs*g + c*c*w
			e[k] = cs*(w-p) + (c*c-s*s)*g
			if k+1 < hi {
				bulge = s * e[k+1]
				e[k+1] *= c
			}
			q[k], q[k+1] = c*q[k]+s*q[k+1], -s*q[k]+c*q[k+1]
		}
	}
	for j := range n {
		nodes[j] = d[j]
		weights[j] = beta[0] * q[j] * q[j]
		if !(nodes[j] > 0 && nodes[j] <= 1+1e-12 && weights[j] > 0) || math.IsInf(weights[j], 1) {
			return false
		}
	}
	return true
}
