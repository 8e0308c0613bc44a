package design

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/integrate/quad"

	"hdrisk/engine/param"
)

// Discretization of the continuous shapes. Each is integrated in the variable in which its
// density is flat (sigma, lambda or log sigma) by composite Gauss-Legendre. Every integrand
// of a transform is analytic there except for poles that sit at distance at least the
// distance to 0 (sigma and lambda) or pi/2 (log sigma), so panels that shrink geometrically
// towards 0 keep each pole at least 2 r/(1 - r) half-widths away from its panel and the rule
// converges like rho^(-2 panelNodes) with rho near 1.9 (Trefethen 2013, Approximation Theory
// and Approximation Practice, chapter 19).
const (
	panelNodes = 24    // Gauss-Legendre nodes per panel
	panelRatio = 0.1   // ratio of the ends of a graded panel
	logPanel   = 3.0   // longest panel in log sigma
	floorRel   = 1e-12 // panels of a support reaching 0 stop at this fraction of the largest eigenvalue
	maxCond    = 1e15  // largest condition number accepted by GeometricSV
)

// flatRule returns nodes and weights of a composite Gauss-Legendre rule for a uniform shape
// whose density is flat in x on [lo, hi], 0 <= lo < hi: panels [r t, t] shrinking from hi
// towards 0. When lo > 0 they reach lo (the last panel ends there), which keeps every pole
// of the transforms' integrands at least 2 r/(1 - r) half-widths from its panel whatever g
// (docs/method.md section 5; the solver's MaxSpread bounds the panels to some 30), and the
// weights sum to hi - lo. When lo = 0 they stop at floor, and the rest, [0, cell], is left to
// the closed form of flatCell, since there the integrand 1/(x + g) varies on the scale g,
// which may be far below any panel.
func flatRule(lo, hi, floor float64) (x, w []float64, cell float64) {
	if lo > 0 {
		floor = 0
	}
	top := hi
	for top*panelRatio > lo && top*panelRatio >= floor {
		x, w = appendPanel(x, w, top*panelRatio, top)
		top *= panelRatio
	}
	if lo > 0 {
		x, w = appendPanel(x, w, lo, top)
		return x, w, 0
	}
	return x, w, top
}

func appendPanel(x, w []float64, lo, hi float64) ([]float64, []float64) {
	n := len(x)
	x = append(x, make([]float64, panelNodes)...)
	w = append(w, make([]float64, panelNodes)...)
	quad.Legendre{}.FixedLocations(x[n:], w[n:], lo, hi)
	return x, w
}

// newAtoms turns a rule (x, w) for a flat density on an interval of length width into the law
// p0 delta_0 + q sum_i (w_i/width) delta_{f lam(x_i)}.
func newAtoms(alpha, mean, f float64, x, w []float64, width float64, lam func(float64) float64) atoms {
	p0, q := parts(alpha)
	d := atoms{alpha: alpha, mean: mean, p0: p0, lam: make([]float64, len(x)), w: make([]float64, len(x))}
	for i, xi := range x {
		d.lam[i] = f * lam(xi)
		d.w[i] = q * w[i] / width
	}
	return d
}

func checkRange(lo, hi float64) error {
	if math.IsNaN(lo) || math.IsInf(lo, 0) || lo < 0 {
		return &param.Error{Field: "min", Reason: fmt.Sprintf("%v: must be finite and nonnegative", lo)}
	}
	if math.IsNaN(hi) || math.IsInf(hi, 0) || hi <= 0 {
		return &param.Error{Field: "max", Reason: fmt.Sprintf("%v: must be finite and positive", hi)}
	}
	if lo > hi {
		return &param.Error{Field: "min", Reason: fmt.Sprintf("%v exceeds max %v", lo, hi)}
	}
	return nil
}

// uniformSV has nonzero singular values uniform on [lo, hi] (already scaled).
type uniformSV struct {
	atoms
	lo, hi float64
}

// UniformSV returns the law of F^T F when the nonzero singular values of F are uniform on
// [min, max] before scaling. The law is discretized once, by composite Gauss-Legendre in
// sigma graded towards 0; the transforms are sums over its nodes.
// Special cases are: min = max is a single value; min < 0, max <= 0, min > max, NaN or Inf
// bounds, alpha <= 0 and an unknown scale give a *param.Error.
func UniformSV(alpha, min, max float64, s Scale) (Law, error) {
	if err := checkAlpha(alpha); err != nil {
		return nil, err
	}
	if err := checkRange(min, max); err != nil {
		return nil, err
	}
	if err := checkScale(s); err != nil {
		return nil, err
	}
	_, q := parts(alpha)
	// E[sigma^2] for sigma uniform on [min, max], written without a difference.
	m2 := (min*min + min*max + max*max) / 3
	f := s.factor(alpha, q*m2)
	sq := func(x float64) float64 { return x * x }
	var d atoms
	if min == max {
		d = newAtoms(alpha, 0, f, []float64{max}, []float64{1}, 1, sq)
	} else {
		x, w, cell := flatRule(min, max, math.Sqrt(floorRel)*max)
		d = newAtoms(alpha, 0, f, x, w, max-min, sq)
		if cell > 0 {
			// Flat in sigma on [0, cell]: in lambda, [0, f cell^2].
			d.cell = &flatCell{sv: true, top: f * cell * cell, mass: q * cell / (max - min)}
		}
	}
	d.mean = f * q * m2
	rf := math.Sqrt(f)
	return &uniformSV{atoms: d, lo: rf * min, hi: rf * max}, nil
}

func (l *uniformSV) SingularValues(m, n int) []float64 {
	p := quantileProbs(m, n)
	for i, pi := range p {
		p[i] = l.lo + pi*(l.hi-l.lo)
	}
	return p
}

// uniformEV has nonzero eigenvalues uniform on [lo, hi] (already scaled).
type uniformEV struct {
	atoms
	lo, hi float64
}

// UniformEV returns the law of F^T F when its nonzero eigenvalues (the squared nonzero
// singular values of F) are uniform on [min, max] before scaling. The law is discretized
// once, by composite Gauss-Legendre in lambda graded towards 0.
// Special cases are: min = max is a single value; min < 0, max <= 0, min > max, NaN or Inf
// bounds, alpha <= 0 and an unknown scale give a *param.Error.
func UniformEV(alpha, min, max float64, s Scale) (Law, error) {
	if err := checkAlpha(alpha); err != nil {
		return nil, err
	}
	if err := checkRange(min, max); err != nil {
		return nil, err
	}
	if err := checkScale(s); err != nil {
		return nil, err
	}
	_, q := parts(alpha)
	m1 := min/2 + max/2
	f := s.factor(alpha, q*m1)
	id := func(x float64) float64 { return x }
	var d atoms
	if min == max {
		d = newAtoms(alpha, 0, f, []float64{max}, []float64{1}, 1, id)
	} else {
		x, w, cell := flatRule(min, max, floorRel*max)
		d = newAtoms(alpha, 0, f, x, w, max-min, id)
		if cell > 0 {
			d.cell = &flatCell{top: f * cell, mass: q * cell / (max - min)}
		}
	}
	d.mean = f * q * m1
	return &uniformEV{atoms: d, lo: f * min, hi: f * max}, nil
}

func (l *uniformEV) SingularValues(m, n int) []float64 {
	p := quantileProbs(m, n)
	for i, pi := range p {
		p[i] = math.Sqrt(l.lo + pi*(l.hi-l.lo))
	}
	return p
}

// geometricSV has nonzero singular values exp(u) sqrt(f), u uniform on [-L, 0].
type geometricSV struct {
	atoms
	logCond, f float64
}

// GeometricSV returns the law of F^T F when the nonzero singular values of F are
// log-uniform between 1/condition and 1 before scaling (an ill-conditioned design of the
// given condition number). The law is discretized once, by composite Gauss-Legendre in
// log sigma on panels no longer than 3.
// Special cases are: condition = 1 is the orthogonal design; condition < 1, above 1e15,
// NaN or Inf, alpha <= 0 and an unknown scale give a *param.Error.
func GeometricSV(alpha, condition float64, s Scale) (Law, error) {
	if err := checkAlpha(alpha); err != nil {
		return nil, err
	}
	if math.IsNaN(condition) || condition < 1 || condition > maxCond {
		return nil, &param.Error{Field: "condition", Reason: fmt.Sprintf("%v: must lie in [1, %g]", condition, maxCond)}
	}
	if err := checkScale(s); err != nil {
		return nil, err
	}
	_, q := parts(alpha)
	ll := math.Log(condition)
	// E[sigma^2] = (1 - condition^-2)/(2 log condition), through expm1 to keep it accurate
	// near condition = 1.
	m2 := 1.0
	if ll > 0 {
		m2 = -math.Expm1(-2*ll) / (2 * ll)
	}
	f := s.factor(alpha, q*m2)
	ex := func(u float64) float64 { return math.Exp(2 * u) }
	var d atoms
	if ll == 0 {
		d = newAtoms(alpha, 0, f, []float64{0}, []float64{1}, 1, ex)
	} else {
		panels := int(math.Ceil(ll / logPanel))
		var x, w []float64
		for k := range panels {
			x, w = appendPanel(x, w, -ll*float64(k+1)/float64(panels), -ll*float64(k)/float64(panels))
		}
		d = newAtoms(alpha, 0, f, x, w, ll, ex)
	}
	d.mean = f * q * m2
	return &geometricSV{atoms: d, logCond: ll, f: f}, nil
}

func (l *geometricSV) SingularValues(m, n int) []float64 {
	p := quantileProbs(m, n)
	rf := math.Sqrt(l.f)
	for i, pi := range p {
		p[i] = rf * math.Exp((pi-1)*l.logCond)
	}
	return p
}
