// Package loss holds the data-fit terms L(y, z) of the estimator
//
//	xhat = argmin_x sum_mu L(y_mu, (F x)_mu) + sum_i f(x_i)
//
// of a generalized linear model (docs/method.md section 10) through their proximal operators in z:
//
//	zhat(y, p; g) = argmin_z L(y, z) + (g/2)(z - p)^2,   g > 0,
//
// and the derivative d zhat / dp, in closed form where it exists (square, Huber, absolute,
// hinge) and by a safeguarded Newton iteration otherwise (logistic). The regression losses are
// functions l(y - z) of the residual; their prox is zhat = y - R(y - p) with R the prox of l,
// which is piecewise linear for square, Huber and absolute (Parikh & Boyd 2014, Proximal
// Algorithms, sections 6.1 and 6.5). The label losses (logistic, hinge) take y in {-1, +1}.
package loss

import (
	"hdrisk/engine/param"
	"math"

	"hdrisk/engine/readout"
)

// Loss is one data-fit term.
type Loss interface {
	// Name is the registry kind.
	Name() string
	// Labels reports whether the loss needs labels y in {-1, +1}.
	Labels() bool
	// Value returns L(y, z).
	Value(y, z float64) float64
	// Prox returns zhat(y, p; g) and d zhat / dp (at a kink, the right derivative).
	Prox(y, p, g float64) (zhat, deriv float64)
	// Kinks returns the sorted p at which d zhat / dp jumps, for this y and g.
	Kinks(y, g float64) []float64
}

// Near is implemented by losses whose prox is found by iteration: ProxNear is Prox started
// at near, a prox value for a nearby p (same y and g).
type Near interface {
	ProxNear(y, p, g, near float64) (zhat, deriv float64)
}

// NearTol is implemented by a Near loss whose iteration's stopping rule depends on g alone:
// NearTol(g) returns it once, and ProxNearTol is ProxNear with it, for a caller that solves
// many proxes at one g (a quadrature).
type NearTol interface {
	Near
	NearTol(g float64) float64
	ProxNearTol(y, p, g, near, tol float64) (zhat, deriv float64)
}

// Piece is one linear piece of a residual prox: R(v) = Slope v + Intercept on [Lo, Hi).
type Piece struct{ Lo, Hi, Slope, Intercept float64 }

// Regression is implemented by the losses l(y - z) whose residual prox
// R(v; g) = argmin_r l(r) + (g/2)(r - v)^2 is piecewise linear.
type Regression interface {
	// Residual returns the pieces of R(.; g), covering the real line in increasing order.
	Residual(g float64) []Piece
}

// proxResidual evaluates zhat = y - R(y - p) from the pieces of R.
func proxResidual(pieces []Piece, y, p float64) (float64, float64) {
	v := y - p
	q := pieces[len(pieces)-1]
	for _, c := range pieces[:len(pieces)-1] {
		if v < c.Hi {
			q = c
			break
		}
	}
	return y - (q.Slope*v + q.Intercept), q.Slope
}

// kinksResidual maps the interior boundaries of R (in v = y - p) to p, sorted.
func kinksResidual(pieces []Piece, y float64) []float64 {
	k := make([]float64, 0, len(pieces)-1)
	for i := len(pieces) - 1; i >= 1; i-- {
		k = append(k, y-pieces[i].Lo)
	}
	return k
}

type square struct{}

// Square returns L = (y - z)^2 / 2.
func Square() Loss { return square{} }

func (square) Name() string { return "square" }
func (square) Labels() bool { return false }
func (square) Value(y, z float64) float64 {
	return (y - z) * (y - z) / 2
}
func (square) Residual(g float64) []Piece {
	return []Piece{{math.Inf(-1), math.Inf(1), g / (1 + g), 0}}
}
func (s square) Prox(y, p, g float64) (float64, float64) { return proxResidual(s.Residual(g), y, p) }
func (square) Kinks(float64, float64) []float64          { return nil }

type huber struct{ width float64 }

// Huber returns L = r^2/2 for |r| <= width and width |r| - width^2/2 beyond, r = y - z
// (width > 0 finite).
func Huber(width float64) (Loss, error) {
	if math.IsNaN(width) || math.IsInf(width, 0) || !(width > 0) {
		return nil, param.Errorf("width", "must be a finite number > 0 (got %v)", width)
	}
	return huber{width}, nil
}

func (huber) Name() string { return "huber" }
func (huber) Labels() bool { return false }
func (h huber) Value(y, z float64) float64 {
	r := math.Abs(y - z)
	if r <= h.width {
		return r * r / 2
	}
	return h.width * (r - h.width/2)
}

// Residual: R(v) = g v/(1+g) for |v| <= e = width (1+g)/g, v -+ width/g beyond.
func (h huber) Residual(g float64) []Piece {
	e := h.width * (1 + g) / g
	s := h.width / g
	inf := math.Inf(1)
	return []Piece{{-inf, -e, 1, s}, {-e, e, g / (1 + g), 0}, {e, inf, 1, -s}}
}
func (h huber) Prox(y, p, g float64) (float64, float64) { return proxResidual(h.Residual(g), y, p) }
func (h huber) Kinks(y, g float64) []float64            { return kinksResidual(h.Residual(g), y) }

type absolute struct{}

// Absolute returns L = |y - z|.
func Absolute() Loss { return absolute{} }

func (absolute) Name() string               { return "absolute" }
func (absolute) Labels() bool               { return false }
func (absolute) Value(y, z float64) float64 { return math.Abs(y - z) }

// Residual: the soft threshold at 1/g.
func (absolute) Residual(g float64) []Piece {
	e := 1 / g
	inf := math.Inf(1)
	return []Piece{{-inf, -e, 1, e}, {-e, e, 0, 0}, {e, inf, 1, -e}}
}
func (a absolute) Prox(y, p, g float64) (float64, float64) { return proxResidual(a.Residual(g), y, p) }
func (a absolute) Kinks(y, g float64) []float64            { return kinksResidual(a.Residual(g), y) }

type logistic struct{}

// Logistic returns L = log(1 + exp(-y z)) for labels y = +-1.
func Logistic() Loss { return logistic{} }

func (logistic) Name() string { return "logistic" }
func (logistic) Labels() bool { return true }
func (logistic) Value(y, z float64) float64 {
	s := -y * z
	if s > 0 {
		return s + math.Log1p(math.Exp(-s))
	}
	return math.Log1p(math.Exp(s))
}

// Prox: with s = y z and q = y p, s solves g (s - q) = sigma(-s), a strictly increasing
// equation whose root lies in (q, q + 1/g); Newton steps kept inside that bracket.
func (l logistic) Prox(y, p, g float64) (float64, float64) {
	return l.ProxNear(y, p, g, y*p+0.5*y/g)
}

// ProxNear is Prox with the Newton steps started at near, a nearby prox value (for
// instance that of the neighbouring node of a quadrature), which saves steps.
func (l logistic) ProxNear(y, p, g, near float64) (float64, float64) {
	return l.ProxNearTol(y, p, g, near, l.NearTol(g))
}

// NearTol is the Newton step below which ProxNear ends with one Halley step.
func (logistic) NearTol(g float64) float64 {
	// The Halley step's error is about K step^3 with K = |f''^2/(4 f'^2) - f'''/(6 f')|
	// <= 0.0025/g^2 + 0.021/g (f' >= g, |sigma''| < 0.1, |sigma'''| < 0.125), below
	// 1e-16 max(1, |s|) with this tol.
	return math.Cbrt(1e-16 / (0.0025/(g*g) + 0.021/g))
}

// ProxNearTol is ProxNear with tol = NearTol(g).
func (logistic) ProxNearTol(y, p, g, near, tol float64) (float64, float64) {
	q := y * p
	lo, hi := q, q+1/g
	s := y * near
	if !(s > lo && s < hi) {
		s = q + 0.5/g
	}
	// Once the Newton step is below tol, one Halley step (Press et al., section 9.4; cubic
	// convergence) ends the iteration (NearTol).
	sm, done := 0.0, false
	// Safeguarded as rtsafe (Press et al., Numerical Recipes, 3rd ed., section 9.4): a
	// bisection of the bracket replaces a Newton step that leaves the bracket or does not halve
	// the step before last. Plain Newton steps can cycle on this sigmoid-shaped equation when g
	// is small (g = 0.01, q = -2.65 cycles between s = -2.55 and 9.45).
	dx, dxOld := hi-lo, hi-lo
	for range 200 {
		sm = readout.Sigmoid(-s)
		f := g*(s-q) - sm
		if f > 0 {
			hi = s
		} else {
			lo = s
		}
		d := sm * (1 - sm)
		step := f / (g + d)
		if math.Abs(step) <= tol*math.Max(1, math.Abs(s)) {
			// f'' = sigma''(s) = d (2 sigma(-s) - 1); sigma(-s) at the new point from its
			// Taylor series to second order. Tested before the bracket: s may have just
			// become one of its ends.
			fpp := d * (2*sm - 1)
			step /= 1 - step*fpp/(2*(g+d))
			sm += d*step + d*(1-2*sm)*step*step/2
			s, done = s-step, true
			break
		}
		n := s - step
		if !(n > lo && n < hi) || math.Abs(step) > math.Abs(dxOld)/2 {
			n = (lo + hi) / 2
		}
		dxOld, dx = dx, n-s
		if math.Abs(n-s) <= 1e-15*math.Max(1, math.Abs(s)) || hi-lo <= 1e-15*math.Max(1, math.Abs(s)) {
			s = n
			break
		}
		s = n
	}
	if !done {
		sm = readout.Sigmoid(-s)
	}
	return y * s, g / (g + sm*(1-sm))
}
func (logistic) Kinks(float64, float64) []float64 { return nil }

type hinge struct{}

// Hinge returns L = max(0, 1 - y z) for labels y = +-1.
func Hinge() Loss { return hinge{} }

func (hinge) Name() string               { return "hinge" }
func (hinge) Labels() bool               { return true }
func (hinge) Value(y, z float64) float64 { return math.Max(0, 1-y*z) }

// Prox: with q = y p, s = y zhat is q + 1/g for q < 1 - 1/g, 1 up to q = 1, q beyond.
func (hinge) Prox(y, p, g float64) (float64, float64) {
	q := y * p
	switch {
	case q >= 1:
		return p, 1
	case q < 1-1/g:
		return p + y/g, 1
	}
	return y, 0
}
func (hinge) Kinks(y, g float64) []float64 {
	if y > 0 {
		return []float64{1 - 1/g, 1}
	}
	return []float64{-1, -(1 - 1/g)}
}
