package study

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/integrate/quad"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/signal"
)

// BayesPoint is one fixed point of the Bayes-optimal state evolution.
type BayesPoint struct {
	MSE, NMSE, NMSEdB float64 // NMSEdB is floored at -300 dB, as in fixedpoint
	Gamma1            float64 // precision 1/t of the denoiser's input r = x0 + sqrt(t) z; +Inf on exact recovery
	Gamma2            float64 // precision of the linear step's input
	Iterations        int
	Converged         bool
	Exact             bool // the error is zero: exact recovery (noiseless problems only)
}

// BayesResult is the error of the posterior-mean estimator, reached from two starts.
type BayesResult struct {
	// Optimal is the fixed point the theory calls the minimum mean-square error: of the two
	// below, the one of lower replica free energy (docs/method.md section 4.1). It is the
	// Uninformed point unless Differ, and OptimalStart names the start that reached it.
	Optimal      BayesPoint
	OptimalStart string     // "uninformed" or "informed"
	Uninformed   BayesPoint // from no knowledge of x0 (t very large): what the algorithm reaches
	Informed     BayesPoint // from near-exact knowledge (t very small)
	// Differ reports that the two starts end at different fixed points (relative gap above
	// 1e-6): a first-order phase transition, with the uninformed error above the informed one.
	Differ bool
	// Gap is the free energy of the informed point minus that of the uninformed one, in nats
	// per entry of x0: negative where the informed point is optimal. It is 0 unless Differ,
	// and NaN where it is infinite (the informed point recovers x0 exactly at Delta = 0, and
	// the information dimension decides, see docs/method.md section 4.1).
	Gap float64
}

// Starts of the Bayes state evolution, as BayesResult.OptimalStart names them.
const (
	StartUninformed = "uninformed"
	StartInformed   = "informed"
)

// Limits of the Bayes reference.
const (
	// MaxBayesComponents bounds the Gaussian mixture of the signal law: the quadrature of the
	// posterior mean costs a number of nodes times the number of components.
	MaxBayesComponents = signal.MaxMixture
	bayesMaxIter       = 20000
	bayesTol           = 1e-12
	bayesFloor         = 1e-13 // relative to rho2: below it the error counts as zero
	bayesStart         = 1e10  // the informed start is t = rho2/bayesStart, the uninformed t = rho2*bayesStart
	differTol          = 1e-6
)

// Bayes returns the error of the posterior-mean (minimum mean-square error) estimator
// through the state evolution of vector approximate message passing with the
// posterior-mean denoiser and the matched linear step (Rangan, Schniter & Fletcher 2019,
// "Vector approximate message passing", IEEE Trans. Inf. Theory, Algorithm 3 and its state
// evolution). With gamma1 the precision of the denoiser's input, t = 1/gamma1:
//
//	E1      = mmse(t) = E[(E[x0|r] - x0)^2],  r = x0 + sqrt(t) z
//	gamma2  = 1/E1 - gamma1            = (1 - E1/t)/E1
//	E2      = E_nu[1/(lambda/Delta + gamma2)] = Delta S1(Delta gamma2)
//	gamma1 <- 1/E2 - gamma2            = T(Delta gamma2) / (Delta S1(Delta gamma2))
//
// each subtraction replaced by its cancellation-free form (T = E_nu[lambda/(lambda + g)]; for
// a Gaussian mixture 1 - E1/t = sum_k w_k t/(v_k + t) - M/t, with M the mixing term below).
// The MSE is E1 at the fixed point. The map is monotone, so the iteration runs undamped from
// t = rho2 * 1e10 (uninformed) and from t = rho2 / 1e10 (informed) to the highest and the
// lowest fixed point; they differ across a first-order transition. Optimal is then the one of
// lower replica free energy (docs/method.md section 4.1): the difference is integrated along
// the path g2 = 1/mmse - gamma1 from the mismatch of the linear step, and at Delta = 0 an exact
// recovery wins where the share of nonzero eigenvalues exceeds the information dimension of
// the signal. The penalty of p is not used.
//
// The posterior mean is computed numerically from the signal law's Gaussian-mixture form: exact
// for the Gaussian, Bernoulli-Gaussian, Bernoulli-Rademacher, Gaussian-mixture and empirical
// laws, and the law's discretization for the Laplace, Student-t and uniform laws (accurate to
// the discretization, see package signal). With components (w_k, m_k, v_k),
// mmse(t) = sum_k w_k v_k t/(v_k + t) + M,
// M = E[sum_k pi_k(r) (mu_k(r) - E[x0|r])^2], pi_k the posterior weight of component k and
// mu_k(r) its posterior mean. M has no cancellation; it is integrated by 16-point
// Gauss-Legendre panels one standard deviation wide over +-12 standard deviations of every
// component (breaks closer than half the local narrowest standard deviation merged), so that
// narrow components (small t) are resolved.
//
// Special cases are: Delta = 0 uses the limit Delta -> 0 of the linear step, gamma1 =
// gamma2 (1 - nu({0}))/nu({0}) (E2 -> nu({0})/gamma2), and exact recovery (an error below
// 1e-13 rho2 that is still falling) is reported as MSE = 0 with Exact set; a design without an
// atom at zero and Delta = 0 recovers exactly at once. Errors are returned for a nil design or
// signal, a negative or non-finite Delta, more than MaxBayesComponents components, and a
// signal without power.
func Bayes(p fixedpoint.Problem) (BayesResult, error) {
	if p.Design == nil || p.Signal == nil {
		return BayesResult{}, specErr("problem", "the Bayes reference needs a design and a signal law")
	}
	if !(p.Noise >= 0) || math.IsInf(p.Noise, 0) {
		return BayesResult{}, specErr("noise", "must be a finite number >= 0, not %v", p.Noise)
	}
	mx, err := newMixtureMMSE(p.Signal.Mixture())
	if err != nil {
		return BayesResult{}, err
	}
	rho2 := p.Signal.Second()
	if !(rho2 > 0) || math.IsInf(rho2, 0) {
		return BayesResult{}, specErr("signal", "has no power (E[x0^2] = %v), so the normalized error is undefined", rho2)
	}
	se := bayesSE{p: p, mx: mx, rho2: rho2}
	var r BayesResult
	if r.Uninformed, err = se.run(1 / (rho2 * bayesStart)); err != nil {
		return BayesResult{}, err
	}
	if r.Informed, err = se.run(bayesStart / rho2); err != nil {
		return BayesResult{}, err
	}
	r.Differ = r.Uninformed.MSE-r.Informed.MSE > differTol*r.Uninformed.MSE+bayesFloor*rho2
	r.Optimal, r.OptimalStart = r.Uninformed, StartUninformed
	if r.Differ {
		r.Gap = se.gap(r.Uninformed, r.Informed)
		if r.Gap < 0 || (math.IsNaN(r.Gap) && se.exactWins()) {
			r.Optimal, r.OptimalStart = r.Informed, StartInformed
		}
	}
	return r, nil
}

// exactWins reports, at Delta = 0, whether exact recovery is the optimal fixed point: the
// share of nonzero eigenvalues 1 - nu({0}) exceeds the information dimension of the signal,
// the weight of its components of positive variance (Wu & Verdu 2010; docs/method.md
// section 4.1). At equality the leading terms cancel and the uninformed point is kept.
func (se *bayesSE) exactWins() bool {
	d := 0.0
	for _, k := range se.mx.c {
		if k.Var > 0 {
			d += k.Weight
		}
	}
	return 1-se.p.Design.Atom0() > d
}

// gap returns Phi(b) - Phi(a), the difference of the replica free energy between the fixed
// points a (lower gamma1) and b (docs/method.md section 4.1): the integral of (E_lin(gamma2) -
// mmse(gamma1))/2 d gamma2 along the path gamma2 = 1/mmse(gamma1) - gamma1, which increases
// with gamma1. It is written as the integral of f = (E_lin - mmse) gamma2 / 2 against
// g = log gamma2, both of order one, over nodes evenly spaced in log gamma1; on each pair of
// panels f and g are replaced by their quadratic interpolants and the product f g' integrated
// exactly. The panels double from 32 until two rules agree to 1e-5 of the gap or 1e-9 nats
// (at most 2048), and the finer rule is returned. NaN where b is exact recovery.
func (se *bayesSE) gap(a, b BayesPoint) float64 {
	if b.Exact || math.IsInf(b.Gamma1, 1) {
		return math.NaN()
	}
	ua, ub := math.Log(a.Gamma1), math.Log(b.Gamma1)
	node := func(u float64) (f, g float64) {
		e, gain := se.mx.at(math.Exp(-u))
		g2 := math.Max(gain, 0) / e
		var elin float64
		if d := se.p.Noise; d > 0 {
			elin = d * se.p.Design.At(d*g2).S1
		} else {
			elin = se.p.Design.Atom0() / g2
		}
		return (elin - e) * g2 / 2, math.Log(g2)
	}
	n := 32
	fs, gs := make([]float64, n+1), make([]float64, n+1)
	for i := range fs {
		fs[i], gs[i] = node(ua + (ub-ua)*float64(i)/float64(n))
	}
	rule := func() float64 {
		var sum float64
		for i := 2; i < len(fs); i += 2 {
			f0, f1, f2 := fs[i-2], fs[i-1], fs[i]
			g0, g1, g2 := gs[i-2], gs[i-1], gs[i]
			fa, fb := (f2-f0)/2, (f2-2*f1+f0)/2
			gc, gd := (g2-g0)/2, g2-2*g1+g0
			sum += 2*f1*gc + (fa*gd+fb*gc)*2/3
		}
		return sum
	}
	prev := rule()
	for n < 2048 {
		n *= 2
		nf, ng := make([]float64, n+1), make([]float64, n+1)
		for i := range nf {
			if i%2 == 0 {
				nf[i], ng[i] = fs[i/2], gs[i/2]
			} else {
				nf[i], ng[i] = node(ua + (ub-ua)*float64(i)/float64(n))
			}
		}
		fs, gs = nf, ng
		cur := rule()
		if math.Abs(cur-prev) <= 1e-5*math.Abs(cur)+1e-9 {
			return cur
		}
		prev = cur
	}
	return prev
}

type bayesSE struct {
	p    fixedpoint.Problem
	mx   *mixtureMMSE
	rho2 float64
}

func (se *bayesSE) run(gamma1 float64) (BayesPoint, error) {
	delta := se.p.Noise
	atom0 := se.p.Design.Atom0()
	var bp BayesPoint
	for it := 1; it <= bayesMaxIter; it++ {
		t := 1 / gamma1
		e1, gain := se.mx.at(t)
		// gamma2 = Inf when the error underflows (a discrete prior at very small t); the
		// linear step then has its limit gamma1 = E_nu[lambda]/Delta (S1 ~ 1/g, T ~ E[lambda]/g).
		gamma2 := math.Inf(1)
		if e1 > 0 {
			gamma2 = math.Max(gain, 0) / e1
		}
		var next float64
		switch {
		case delta > 0 && math.IsInf(gamma2, 1):
			next = se.p.Design.Mean() / delta
		case delta > 0:
			tr := se.p.Design.At(delta * gamma2)
			next = tr.T / (delta * tr.S1)
		case atom0 > 0:
			next = gamma2 * (1 - atom0) / atom0
		default:
			next = math.Inf(1)
		}
		bp = BayesPoint{MSE: e1, Gamma1: gamma1, Gamma2: gamma2, Iterations: it}
		if math.IsNaN(next) || next < 0 || math.IsNaN(e1) {
			return BayesPoint{}, fmt.Errorf("study: the Bayes state evolution left the finite numbers at t = %v", t)
		}
		if (e1 < bayesFloor*se.rho2 && next >= gamma1) || math.IsInf(next, 1) {
			bp.MSE, bp.Gamma1, bp.Exact, bp.Converged = 0, math.Inf(1), true, true
			break
		}
		if math.Abs(next-gamma1) <= bayesTol*gamma1 {
			bp.Converged = true
			bp.MSE, _ = se.mx.at(1 / next)
			bp.Gamma1 = next
			break
		}
		gamma1 = next
	}
	bp.NMSE = bp.MSE / se.rho2
	bp.NMSEdB = -300
	if bp.NMSE > 0 {
		bp.NMSEdB = math.Max(-300, 10*math.Log10(bp.NMSE))
	}
	return bp, nil
}

// mixtureMMSE evaluates the minimum mean-square error of a Gaussian-mixture prior in the
// scalar channel r = x0 + sqrt(t) z.
type mixtureMMSE struct {
	c      []signal.Component // components of positive weight
	rho2   float64            // E[x0^2] of the mixture
	gx, gw []float64          // Gauss-Legendre nodes and weights on [-1, 1]
	lq, mu []float64          // scratch: log-density and posterior mean per component
	breaks []float64          // scratch: panel ends
	whole  []float64          // scratch: the rule on each panel
}

func newMixtureMMSE(comps []signal.Component) (*mixtureMMSE, error) {
	var c []signal.Component
	for _, k := range comps {
		if k.Weight > 0 {
			c = append(c, k)
		}
	}
	if len(c) == 0 {
		return nil, specErr("signal", "the mixture has no component of positive weight")
	}
	if len(c) > MaxBayesComponents {
		return nil, specErr("signal", "the Bayes reference takes at most %d mixture components, not %d", MaxBayesComponents, len(c))
	}
	const nodes = 16
	rho2 := 0.0
	for _, k := range c {
		rho2 += k.Weight * (k.Mean*k.Mean + k.Var)
	}
	m := &mixtureMMSE{c: c, rho2: rho2, gx: make([]float64, nodes), gw: make([]float64, nodes),
		lq: make([]float64, len(c)), mu: make([]float64, len(c))}
	quad.Legendre{}.FixedLocations(m.gx, m.gw, -1, 1)
	return m, nil
}

// at returns mmse(t) and 1 - mmse(t)/t, each without cancellation.
func (m *mixtureMMSE) at(t float64) (mmse, gain float64) {
	var within, keep float64
	for _, k := range m.c {
		s := k.Var + t
		within += k.Weight * k.Var * (t / s)
		keep += k.Weight * (t / s)
	}
	mix := m.mixing(t, within)
	return within + mix, keep - mix/t
}

// mixing integrates M(t) = int sum_k q_k(r) (mu_k(r) - xhat(r))^2 dr, q_k(r) = w_k N(r; m_k,
// v_k + t), to a relative accuracy of about 1e-12 of within + M. The panels are one standard
// deviation wide around every component; a panel is halved where the 16-point rule on it
// disagrees with the rule on its halves, because the posterior weights switch over a width
// of (v + t)/|m_k - m_j|, which for point masses can be far below a standard deviation.
func (m *mixtureMMSE) mixing(t, within float64) float64 {
	if len(m.c) == 1 {
		return 0
	}
	m.breaks = m.breaks[:0]
	for _, k := range m.c {
		sd := math.Sqrt(k.Var + t)
		for j := -windowSD; j <= windowSD; j++ {
			m.breaks = append(m.breaks, k.Mean+float64(j)*sd)
		}
	}
	slices.Sort(m.breaks)
	m.breaks = m.prune(m.breaks, t)
	m.whole = m.whole[:0]
	var rough float64
	for i := 1; i < len(m.breaks); i++ {
		q := m.panel(m.breaks[i-1], m.breaks[i], t)
		m.whole = append(m.whole, q)
		rough += q
	}
	// The tolerance is relative to the error, but never below 1e-16 E[x0^2]: an
	// exponentially small mixing term (well-separated point masses at small t) would
	// otherwise be refined to the full depth on every panel.
	tol := mixingTol * math.Max(within+rough, 1e-4*m.rho2) / float64(len(m.whole))
	var sum float64
	for i, q := range m.whole {
		sum += m.refine(m.breaks[i], m.breaks[i+1], t, q, tol, 0)
	}
	return sum
}

// prune drops the breaks closer to the last kept one than half the narrowest standard
// deviation of the components whose window holds them: a scale mixture's windows overlap
// and would otherwise put 25 breaks per component in the same place.
func (m *mixtureMMSE) prune(b []float64, t float64) []float64 {
	if len(m.c) <= 8 {
		return slices.Compact(b)
	}
	out := b[:1]
	for _, x := range b[1:] {
		w := math.Inf(1)
		for _, k := range m.c {
			sd := math.Sqrt(k.Var + t)
			if math.Abs(x-k.Mean) <= windowSD*sd {
				w = math.Min(w, sd)
			}
		}
		if x-out[len(out)-1] >= w/2 || x == b[len(b)-1] {
			out = append(out, x)
		}
	}
	return out
}

const (
	windowSD    = 12 // half-width of the window around each component, in standard deviations
	mixingTol   = 1e-12
	refineDepth = 30
)

// panel applies the 16-point Gauss-Legendre rule on [a, b].
func (m *mixtureMMSE) panel(a, b, t float64) float64 {
	h, c := (b-a)/2, (b+a)/2
	var s float64
	for j, x := range m.gx {
		s += m.gw[j] * m.integrand(c+h*x, t)
	}
	return h * s
}

func (m *mixtureMMSE) refine(a, b, t, whole, tol float64, depth int) float64 {
	c := (a + b) / 2
	l, r := m.panel(a, c, t), m.panel(c, b, t)
	if math.Abs(l+r-whole) <= tol || depth >= refineDepth {
		return l + r
	}
	return m.refine(a, c, t, l, tol/2, depth+1) + m.refine(c, b, t, r, tol/2, depth+1)
}

func (m *mixtureMMSE) integrand(r, t float64) float64 {
	lmax := math.Inf(-1)
	for i, k := range m.c {
		s := k.Var + t
		d := r - k.Mean
		m.lq[i] = math.Log(k.Weight) - 0.5*math.Log(2*math.Pi*s) - d*d/(2*s)
		m.mu[i] = k.Mean + k.Var/s*d
		lmax = math.Max(lmax, m.lq[i])
	}
	var q, qmu float64
	for i := range m.c {
		e := math.Exp(m.lq[i] - lmax)
		m.lq[i] = e
		q += e
		qmu += e * m.mu[i]
	}
	xhat := qmu / q
	var v float64
	for i := range m.c {
		d := m.mu[i] - xhat
		v += m.lq[i] * d * d
	}
	return math.Exp(lmax) * v
}
