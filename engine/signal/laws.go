package signal

import (
	"cmp"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"

	"hdrisk/engine/param"
)

// Sizes of the discretizations and caps on user lists.
const (
	// UniformNodes is the number of Gauss-Legendre atoms of the uniform law.
	UniformNodes = 64
	// MaxEmpirical is the largest number of values of an empirical law.
	MaxEmpirical = 100000
	// MaxMixture is the largest number of components of a Gaussian mixture.
	MaxMixture = 1000
	// weightSumTol is how far the weights of a Gaussian mixture may sum from 1 (they are then
	// rescaled to sum to 1 exactly).
	weightSumTol = 1e-9
)

type gauss struct {
	mixture
	variance float64
}

// Gauss returns x0 ~ N(0, variance), variance >= 0 finite (units of x0 squared).
//
// Special cases are: variance = 0 is the point mass at 0 (a zero signal).
func Gauss(variance float64) (Law, error) {
	if err := nonnegative("variance", variance); err != nil {
		return nil, err
	}
	return gauss{mixture{[]Component{{1, 0, variance}}}, variance}, nil
}

func (l gauss) Name() string    { return "gauss" }
func (l gauss) Exact() bool     { return true }
func (l gauss) Second() float64 { return l.variance }
func (l gauss) Sample(rng *rand.Rand, n int) []float64 {
	s := math.Sqrt(l.variance)
	return draw(n, func() float64 { return s * rng.NormFloat64() })
}

type bernoulliGauss struct {
	mixture
	density, variance float64
}

// BernoulliGauss returns x0 = 0 with probability 1 - density and x0 ~ N(0, variance) otherwise
// (density in [MinDensity, 1], variance >= 0 finite).
//
// Special cases are: density = 1 is Gauss(variance).
func BernoulliGauss(density, variance float64) (Law, error) {
	if err := checkDensity(density); err != nil {
		return nil, err
	}
	if err := nonnegative("variance", variance); err != nil {
		return nil, err
	}
	comps := []Component{{density, 0, variance}}
	if density < 1 {
		comps = append(comps, Component{1 - density, 0, 0})
	}
	return bernoulliGauss{mixture{comps}, density, variance}, nil
}

func (l bernoulliGauss) Name() string    { return "bernoulli-gauss" }
func (l bernoulliGauss) Exact() bool     { return true }
func (l bernoulliGauss) Second() float64 { return l.density * l.variance }
func (l bernoulliGauss) Sample(rng *rand.Rand, n int) []float64 {
	s := math.Sqrt(l.variance)
	return draw(n, func() float64 {
		if rng.Float64() < l.density {
			return s * rng.NormFloat64()
		}
		return 0
	})
}

type bernoulliRademacher struct {
	mixture
	density, amplitude float64
}

// BernoulliRademacher returns x0 = 0 with probability 1 - density and +-amplitude with
// probability density/2 each (density in [MinDensity, 1], amplitude >= 0 finite, units of x0).
func BernoulliRademacher(density, amplitude float64) (Law, error) {
	if err := checkDensity(density); err != nil {
		return nil, err
	}
	if err := nonnegative("amplitude", amplitude); err != nil {
		return nil, err
	}
	comps := []Component{{density / 2, -amplitude, 0}, {density / 2, amplitude, 0}}
	if density < 1 {
		comps = append(comps, Component{1 - density, 0, 0})
	}
	return bernoulliRademacher{mixture{comps}, density, amplitude}, nil
}

func (l bernoulliRademacher) Name() string    { return "bernoulli-rademacher" }
func (l bernoulliRademacher) Exact() bool     { return true }
func (l bernoulliRademacher) Second() float64 { return l.density * l.amplitude * l.amplitude }
func (l bernoulliRademacher) Sample(rng *rand.Rand, n int) []float64 {
	return draw(n, func() float64 {
		u := rng.Float64()
		switch {
		case u < l.density/2:
			return -l.amplitude
		case u < l.density:
			return l.amplitude
		}
		return 0
	})
}

type laplace struct {
	mixture
	scale   float64
	unitSec *scaled // the law in the solver's units (see unitSecond)
}

func (l laplace) atUnitSecond() *scaled { return l.unitSec }

// Laplace returns the law with density exp(-|x|/scale)/(2 scale) (scale > 0 finite, units of
// x0); E[x0^2] = 2 scale^2.
//
// It is a Gaussian scale mixture, x0 ~ N(0, V) with V exponential of mean 2 scale^2 (Andrews &
// Mallows 1974, J. R. Stat. Soc. B 36:99-102). The exponential has positive density at V = 0
// (the cusp of the Laplace density), so that for a small channel noise t the integrand
// F(V + t) varies on the scale t near V = 0, where a Gauss-Laguerre rule in V has no nodes.
// The mixture therefore uses the trapezoidal rule in u = log(V / (2 scale^2)), on which the
// integrand is analytic in the strip |Im u| < pi/2 whatever t is, so that the error falls like
// exp(-pi^2 / h) with the step h (Trefethen & Weideman 2014, SIAM Review 56:385-458, section 5;
// here the weight exp(-e^u) stops decaying at the edge of the strip, and the error measured
// for E[V] is 3e-9 at h = 0.4). The nodes are then rescaled so that the mixture's E[V], hence
// E[x0^2], is exact, which also makes the ridge moments exact (they are affine in V).
// Against a piecewise-linear prox, and along the branch of the power prox, Expect does not use
// the mixture but closed forms, exact to rounding (laplaceform.go, laplacebranch.go;
// docs/method.md sections 6.1 and 6.2); the mixture serves the other proxes, the noiseless
// channel and the Bayes reference.
func Laplace(scale float64) (Law, error) {
	if err := positive("scale", scale); err != nil {
		return nil, err
	}
	y, w := laplaceRule(laplaceStep, laplaceLow, laplaceHigh)
	comps := make([]Component, len(y))
	for i := range y {
		comps[i] = Component{w[i], 0, 2 * scale * scale * y[i]}
	}
	l := laplace{mixture: mixture{comps}, scale: scale}
	l.unitSec = prepareUnitSecond(l)
	return l, nil
}

// Trapezoidal rule for the standard exponential law in u = log(s): 63 nodes.
const (
	laplaceStep = 0.4  // h
	laplaceLow  = 1e-9 // below: mass 1e-9, spread over the nodes by the normalization
	laplaceHigh = 40   // above: mass and mean below 2e-16
)

// laplaceRule returns nodes s_k = c exp(u_k) and normalized weights h s_k exp(-s_k) of the
// trapezoidal rule of step h in u from log(low) to log(high) for E[f(S)], S exponential of
// mean 1, with c chosen so that the rule gives E[S] = 1 exactly.
func laplaceRule(h, low, high float64) (s, w []float64) {
	lo, hi := math.Log(low), math.Log(high)
	n := int(math.Ceil((hi-lo)/h)) + 1
	sum, mean := 0.0, 0.0
	for k := range n {
		x := math.Exp(lo + float64(k)*h)
		s = append(s, x)
		w = append(w, h*x*math.Exp(-x))
		sum += w[k]
		mean += w[k] * x
	}
	for k := range w {
		w[k] /= sum
		s[k] *= sum / mean
	}
	return s, w
}

func (l laplace) Name() string    { return "laplace" }
func (l laplace) Exact() bool     { return false }
func (l laplace) Second() float64 { return 2 * l.scale * l.scale }
func (l laplace) Sample(rng *rand.Rand, n int) []float64 {
	return draw(n, func() float64 {
		if rng.Uint64()&1 == 0 {
			return -l.scale * rng.ExpFloat64()
		}
		return l.scale * rng.ExpFloat64()
	})
}

type uniform struct {
	mixture
	halfwidth float64
}

// Uniform returns x0 uniform on [-halfwidth, halfwidth] (halfwidth > 0 finite, units of x0);
// E[x0^2] = halfwidth^2 / 3. Its mixture is UniformNodes Gauss-Legendre atoms (point masses),
// exact for polynomial integrands of degree < 2 UniformNodes. The channel moments are smooth
// in x0 on the scale sqrt(t), so the atoms give them to rounding error while sqrt(t) is above
// about halfwidth/12; below, the error grows (measured with the LASSO: 5e-5 relative in A at
// sqrt(t) = halfwidth/38, 1e-2 at halfwidth/120).
func Uniform(halfwidth float64) (Law, error) {
	if err := positive("halfwidth", halfwidth); err != nil {
		return nil, err
	}
	x := make([]float64, UniformNodes)
	w := make([]float64, UniformNodes)
	quad.Legendre{}.FixedLocations(x, w, -halfwidth, halfwidth)
	comps := make([]Component, len(x))
	for i := range x {
		comps[i] = Component{w[i] / (2 * halfwidth), x[i], 0}
	}
	return uniform{mixture{comps}, halfwidth}, nil
}

func (l uniform) Name() string    { return "uniform" }
func (l uniform) Exact() bool     { return false }
func (l uniform) Second() float64 { return l.halfwidth * l.halfwidth / 3 }
func (l uniform) Sample(rng *rand.Rand, n int) []float64 {
	return draw(n, func() float64 { return l.halfwidth * (2*rng.Float64() - 1) })
}

type studentT struct {
	mixture
	dof, scale float64
	unit       []Component // the mixture of scale 1, which Scaled rescales without overflow
	// fold and unitFold are comps and unit with the heavy tail folded (foldTail), which
	// Expect uses while every kink lies close enough to 0 (see folded).
	fold, unitFold folded
	unitSec        *scaled // the law in the solver's units (see unitSecond)
}

func (l studentT) atUnitSecond() *scaled { return l.unitSec }

func (l studentT) unitComponents() ([]Component, float64) { return l.unit, l.scale }
func (l studentT) foldedTail() folded                     { return l.fold }
func (l studentT) unitFoldedTail() folded                 { return l.unitFold }

// StudentT returns x0 = scale z / sqrt(G) with z ~ N(0, 1) and G ~ Gamma(dof/2, rate dof/2),
// the Student-t law with dof degrees of freedom (dof > 2 so that E[x0^2] = scale^2 dof/(dof - 2)
// is finite; scale > 0; both finite).
//
// Its mixture discretizes y = (dof/2) G ~ Gamma(a = dof/2, 1), the component variance being
// scale^2 a / y, by the trapezoidal rule in u = log(y) (as for Laplace: the integrand is analytic
// in a strip about the real u axis whatever the channel noise; a Gauss-Laguerre rule in y
// converges only algebraically here, because the moments behave like sqrt(y) as y -> 0). The
// step shrinks like 1/sqrt(a), the width of the law of u. The mass 1e-14 below the first node
// (the heaviest tail) is one component carrying its exact share of E[x0^2]; the node variances
// are rescaled so that the mixture's E[x0^2] is exact.
//
// Special cases are: dof above StudentTGaussFrom is the Gaussian law N(0, scale^2 dof/(dof-2)).
func StudentT(dof, scale float64) (Law, error) {
	if err := finite("dof", dof); err != nil {
		return nil, err
	}
	if !(dof > 2) {
		return nil, &param.Error{Field: "dof", Reason: fmt.Sprintf("must be > 2 (got %v): with 2 or fewer degrees of freedom E[x0^2] is infinite", dof)}
	}
	if err := positive("scale", scale); err != nil {
		return nil, err
	}
	l := studentT{mixture: mixture{studentTMixture(dof, scale, studentStep, studentLow)}, dof: dof, scale: scale, unit: studentTMixture(dof, 1, studentStep, studentLow)}
	l.fold.comps, l.fold.vmin = foldTail(l.comps, studentTailShare, studentTailNodes)
	l.unitFold.comps, l.unitFold.vmin = foldTail(l.unit, studentTailShare, studentTailNodes)
	l.unitSec = prepareUnitSecond(l)
	return l, nil
}

const (
	studentStep = 0.4   // trapezoidal step in log(y), times 1/sqrt(max(a, 1))
	studentLow  = 1e-14 // about the mass of the lumped heavy tail
	// studentTailShare and studentTailNodes: the heaviest components carrying at most this
	// share of E[x0^2] are replaced by a Gauss rule of this many nodes (see foldTail).
	studentTailShare = 1e-3
	studentTailNodes = 3
	// StudentTGaussFrom is the number of degrees of freedom above which the Student-t law
	// is replaced by the Gaussian law of the same variance: their excess kurtosis differ by
	// 6/(dof - 4) < 1e-9, below the accuracy of the discretization, and the mixture would
	// otherwise need nodes finer than the rounding of log(dof).
	StudentTGaussFrom = 1e10
)

// studentTMixture returns the trapezoidal mixture of StudentT(dof, scale) with the given step
// (before the 1/sqrt(a) scaling) and about the given lumped tail mass.
//
// Node k stands for the cell |u - u_k| < h/2; the nodes start where the mass below is about
// low (P(a, y) ~ y^a / Gamma(a + 1) for small y) and stop at a + 10 sqrt(a) + 40, beyond which
// the mass is negligible. The last component lumps the cells below the first: its weight is
// the exact mass there, P(a, y_0 e^(-h/2)) (gonum mathext.GammaIncReg), and its variance
// carries all of E[x0^2] that the nodes miss. The nodes themselves are left as the rule gives
// them (rescaling them instead would spread the endpoint error of the heavy tail over the
// whole mixture).
func studentTMixture(dof, scale, step, low float64) []Component {
	a := dof / 2
	if dof > StudentTGaussFrom {
		return []Component{{1, 0, scale * scale * dof / (dof - 2)}}
	}
	// The nodes are written in d = u - log(a), in which the law of u concentrates about 0
	// with width 1/sqrt(a): the log-weights a u - e^u then read -a (expm1(d) - d) up to a
	// constant that the normalization removes, without the cancellation of two numbers of
	// size a log(a), and the component variances are scale^2 e^(-d).
	lgA1, _ := math.Lgamma(a + 1)
	dlo := (math.Log(low) + lgA1 - a*math.Log(a)) / a
	sa := math.Sqrt(a)
	if sa > 10 {
		// Ten standard deviations below the mean of the gamma law, whose lower tail is
		// lighter than the normal one (mass below 1e-23): the crude bound above is far too
		// low for large a and would cost about sqrt(a) nodes.
		dlo = math.Max(dlo, math.Log1p(-10/sa))
	}
	dhi := math.Log1p(10/sa + 40/a)
	h := step / math.Sqrt(math.Max(a, 1))
	n := int(math.Ceil((dhi-dlo)/h)) + 1
	comps := make([]Component, n, n+1)
	logw := make([]float64, n)
	top := math.Inf(-1)
	for k := range comps {
		d := dlo + float64(k)*h
		logw[k] = -a * (math.Expm1(d) - d)
		top = math.Max(top, logw[k])
		comps[k].Var = scale * scale * math.Exp(-d)
	}
	sum, second := 0.0, 0.0
	for k := range comps {
		comps[k].Weight = math.Exp(logw[k] - top)
		sum += comps[k].Weight
	}
	lumpMass := mathext.GammaIncReg(a, a*math.Exp(dlo-h/2))
	c := scale * scale * a
	for k := range comps {
		comps[k].Weight *= (1 - lumpMass) / sum
		second += comps[k].Weight * comps[k].Var
	}
	if rest := c/(a-1) - second; lumpMass > 0 && rest > 1e-12*c/(a-1) {
		return append(comps, Component{lumpMass, 0, rest / lumpMass})
	}
	// The lumped tail is too light to carry the E[x0^2] that the nodes miss (large dof, or
	// rounding): the node variances are rescaled so that E[x0^2] stays exact. A rest below
	// 1e-12 of E[x0^2] is the rounding of the sum: as a lump it would be a component of
	// weight 1e-31 and variance 1e15 scale^2, which overflows from a scale of 1e147 on.
	for k := range comps {
		comps[k].Weight /= 1 - lumpMass
		comps[k].Var *= c / (a - 1) / (second / (1 - lumpMass))
	}
	return comps
}

// foldTail replaces the components of largest variance that together carry at most the given
// share of E[x0^2] (sum Weight Var) by the n-node Gauss rule of the discrete measure
// Weight Var in x = 1/sqrt(Var). A component's moments read (Var + t) G(x) with G analytic
// about x = 0 (the closed forms of section 6 of docs/method.md are functions of
// k/sqrt(Var + t) and Var/(Var + t)), so the rule integrates the polynomial part of G of degree
// 2n - 1 exactly; with n >= 2 it keeps the total weight and E[x0^2] exactly (the degrees 0
// and 2 in x). Each node x_j of weight W_j becomes the component (W_j x_j^2, 0, 1/x_j^2).
// The components must have mean 0; they are returned with the folded ones last. Nothing is
// folded unless more than n components qualify (nil is then returned).
func foldTail(comps []Component, share float64, n int) (out []Component, vmin float64) {
	order := make([]int, len(comps))
	total := 0.0
	for k := range comps {
		order[k] = k
		total += comps[k].Weight * comps[k].Var
	}
	slices.SortFunc(order, func(i, j int) int { return cmp.Compare(comps[j].Var, comps[i].Var) })
	m, acc := 0, 0.0
	for m < len(order) {
		c := comps[order[m]]
		if acc+c.Weight*c.Var > share*total {
			break
		}
		acc += c.Weight * c.Var
		m++
	}
	if share <= 0 || m <= n || !(total > 0) || math.IsInf(total, 1) {
		// Nothing to fold, or a mixture beyond the range of doubles (a huge scale; the
		// solver reads such a law through its mixture of scale 1).
		return nil, 0
	}
	x := make([]float64, m)
	mu := make([]float64, m)
	xc := 0.0
	for i, k := range order[:m] {
		x[i] = 1 / math.Sqrt(comps[k].Var)
		mu[i] = comps[k].Weight * comps[k].Var
		xc = math.Max(xc, x[i])
	}
	for i := range x {
		x[i] /= xc // in (0, 1]: the recurrence below stays well scaled
	}
	nodes, weights, ok := gaussOfPoints(x, mu, n)
	if !ok {
		return nil, 0
	}
	isFolded := make(map[int]bool, m)
	for _, k := range order[:m] {
		isFolded[k] = true
	}
	out = make([]Component, 0, len(comps)-m+n)
	for k, c := range comps {
		if !isFolded[k] {
			out = append(out, c)
		}
	}
	vmin = math.Inf(1)
	for j := range nodes {
		xj := nodes[j] * xc
		sd := 1 / xj
		if math.IsInf(sd*sd, 1) {
			return nil, 0
		}
		out = append(out, Component{weights[j] * xj * xj, 0, sd * sd})
		vmin = math.Min(vmin, sd*sd)
	}
	return out, vmin
}

// gaussOfPoints returns the n-node Gauss rule of the discrete measure sum mu_i delta(x - x_i)
// (n below the number of points): the recurrence coefficients of its orthogonal polynomials by
// the discretized Stieltjes procedure, then the eigenvalues and first eigenvector components of
// the Jacobi matrix (Golub & Welsch 1969, "Calculation of Gauss quadrature rules", Math. Comp.
// 23; Gautschi 2004, "Orthogonal Polynomials: Computation and Approximation", section 2.2.3).
//
// ok is false, and the rule unusable, unless every node lies in (0, max x] with a positive
// finite weight.
func gaussOfPoints(x, mu []float64, n int) (nodes, weights []float64, ok bool) {
	prev := make([]float64, len(x))
	cur := make([]float64, len(x))
	for i := range cur {
		cur[i] = 1
	}
	alpha := make([]float64, n)
	beta := make([]float64, n)
	normPrev := 0.0
	for j := 0; j < n; j++ {
		norm, nx := 0.0, 0.0
		for i := range x {
			norm += mu[i] * cur[i] * cur[i]
			nx += mu[i] * x[i] * cur[i] * cur[i]
		}
		alpha[j] = nx / norm
		if j > 0 {
			beta[j] = norm / normPrev
		} else {
			beta[0] = norm
		}
		normPrev = norm
		for i := range x {
			next := (x[i]-alpha[j])*cur[i] - beta[j]*prev[i]
			if j == 0 {
				next = (x[i] - alpha[j]) * cur[i]
			}
			prev[i], cur[i] = cur[i], next
		}
	}
	jac := mat.NewSymDense(n, nil)
	for j := 0; j < n; j++ {
		jac.SetSym(j, j, alpha[j])
		if j > 0 {
			jac.SetSym(j, j-1, math.Sqrt(beta[j]))
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(jac, true) {
		return nil, nil, false
	}
	var vec mat.Dense
	eig.VectorsTo(&vec)
	nodes = eig.Values(nil)
	weights = make([]float64, n)
	for j := range weights {
		weights[j] = beta[0] * vec.At(0, j) * vec.At(0, j)
		if !(nodes[j] > 0 && nodes[j] <= slices.Max(x) && weights[j] > 0 && !math.IsInf(weights[j], 1)) {
			return nil, nil, false
		}
	}
	return nodes, weights, true
}

func (l studentT) Name() string    { return "student-t" }
func (l studentT) Exact() bool     { return false }
func (l studentT) Second() float64 { return l.scale * l.scale * l.dof / (l.dof - 2) }
func (l studentT) Sample(rng *rand.Rand, n int) []float64 {
	g := distuv.Gamma{Alpha: l.dof / 2, Beta: l.dof / 2, Src: rng}
	return draw(n, func() float64 { return l.scale * rng.NormFloat64() / math.Sqrt(g.Rand()) })
}

type gaussMixture struct {
	mixture
	second float64
}

// GaussMixture returns the mixture sum_i weights[i] N(means[i], variances[i]). The three lists
// have the same length, 1 to MaxMixture; weights are >= 0 and sum to 1 within 1e-9 (they are
// then rescaled to sum to 1 exactly); means are finite; variances >= 0 finite (0 is a point mass).
//
// Special cases are: components of weight 0 are dropped from the mixture.
func GaussMixture(weights, means, variances []float64) (Law, error) {
	n := len(weights)
	switch {
	case n == 0:
		return nil, &param.Error{Field: "weights", Reason: "must hold at least one weight"}
	case n > MaxMixture:
		return nil, &param.Error{Field: "weights", Reason: fmt.Sprintf("holds %d components, more than the maximum %d", n, MaxMixture)}
	case len(means) != n:
		return nil, &param.Error{Field: "means", Reason: fmt.Sprintf("holds %d values, but weights holds %d", len(means), n)}
	case len(variances) != n:
		return nil, &param.Error{Field: "variances", Reason: fmt.Sprintf("holds %d values, but weights holds %d", len(variances), n)}
	}
	sum := 0.0
	for i := range n {
		if err := nonnegative(fmt.Sprintf("weights[%d]", i), weights[i]); err != nil {
			return nil, err
		}
		if err := finite(fmt.Sprintf("means[%d]", i), means[i]); err != nil {
			return nil, err
		}
		if err := nonnegative(fmt.Sprintf("variances[%d]", i), variances[i]); err != nil {
			return nil, err
		}
		sum += weights[i]
	}
	if math.Abs(sum-1) > weightSumTol {
		return nil, &param.Error{Field: "weights", Reason: fmt.Sprintf("must sum to 1 (they sum to %.17g)", sum)}
	}
	comps := make([]Component, 0, n)
	second := 0.0
	for i := range n {
		c := Component{weights[i] / sum, means[i], variances[i]}
		second += c.Weight * (c.Mean*c.Mean + c.Var)
		if c.Weight > 0 {
			comps = append(comps, c)
		}
	}
	return gaussMixture{mixture{comps}, second}, nil
}

func (l gaussMixture) Name() string    { return "gauss-mixture" }
func (l gaussMixture) Exact() bool     { return true }
func (l gaussMixture) Second() float64 { return l.second }
func (l gaussMixture) Sample(rng *rand.Rand, n int) []float64 {
	cum := make([]float64, len(l.comps))
	s := 0.0
	for i, c := range l.comps {
		s += c.Weight
		cum[i] = s
	}
	return draw(n, func() float64 {
		i := min(searchCum(cum, rng.Float64()*s), len(cum)-1)
		c := l.comps[i]
		return c.Mean + math.Sqrt(c.Var)*rng.NormFloat64()
	})
}

type empirical struct {
	mixture
	values []float64
	second float64
}

// Empirical returns the empirical law of values: each of the 1 to MaxEmpirical finite values
// with probability 1/len(values) (equal values are merged into one atom).
func Empirical(values []float64) (Law, error) {
	switch {
	case len(values) == 0:
		return nil, &param.Error{Field: "values", Reason: "must hold at least one value"}
	case len(values) > MaxEmpirical:
		return nil, &param.Error{Field: "values", Reason: fmt.Sprintf("holds %d values, more than the maximum %d", len(values), MaxEmpirical)}
	}
	second := 0.0
	for i, v := range values {
		if err := finite(fmt.Sprintf("values[%d]", i), v); err != nil {
			return nil, err
		}
		second += v * v
	}
	sorted := slices.Clone(values)
	slices.Sort(sorted)
	w := 1 / float64(len(values))
	var comps []Component
	for i, v := range sorted {
		if i > 0 && v == sorted[i-1] {
			comps[len(comps)-1].Weight += w
			continue
		}
		comps = append(comps, Component{w, v, 0})
	}
	return empirical{mixture{comps}, slices.Clone(values), second / float64(len(values))}, nil
}

func (l empirical) Name() string    { return "empirical" }
func (l empirical) Exact() bool     { return true }
func (l empirical) Second() float64 { return l.second }
func (l empirical) Sample(rng *rand.Rand, n int) []float64 {
	return draw(n, func() float64 { return l.values[rng.IntN(len(l.values))] })
}

// searchCum returns the first index i with cum[i] > u (cum increasing).
func searchCum(cum []float64, u float64) int {
	i, _ := slices.BinarySearch(cum, u)
	for i < len(cum) && cum[i] <= u {
		i++
	}
	return i
}

func draw(n int, f func() float64) []float64 {
	out := make([]float64, max(n, 0))
	for i := range out {
		out[i] = f()
	}
	return out
}
