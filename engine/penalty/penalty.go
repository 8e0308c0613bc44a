package penalty

import (
	"fmt"
	"math"

	"hdrisk/engine/param"
)

// Piece is one linear piece of a proximal operator: prox(r) = Slope*r + Intercept for r in
// [Lo, Hi). Lo may be -Inf and Hi may be +Inf.
type Piece struct{ Lo, Hi, Slope, Intercept float64 }

// Zero reports whether the piece maps its whole interval to exactly 0.
func (p Piece) Zero() bool { return p.Slope == 0 && p.Intercept == 0 }

// Penalty is a separable convex penalty f seen through its proximal operator at precision g.
// Every method requires g > 0 and finite; results for other g are unspecified. r is in the
// units of x0.
//
// Special cases are: Prox(+-Inf, g) = +-Inf except for the box (+-bound); Prox(NaN, g) = NaN;
// Deriv at a kink is the slope of the piece on its right.
type Penalty interface {
	// Name is the registry kind, for example "elastic-net".
	Name() string
	// Prox returns argmin_x f(x) + (g/2)(x - r)^2.
	Prox(r, g float64) float64
	// Deriv returns d prox / dr; at a kink the right derivative.
	Deriv(r, g float64) float64
	// Kinks returns the sorted r where prox' jumps (empty if the prox is C^1).
	Kinks(g float64) []float64
	// Pieces returns the exact piecewise-linear form of the prox, if it has one.
	Pieces(g float64) ([]Piece, bool)
	// HasZeroRegion reports whether the prox is exactly 0 on an interval of positive length.
	HasZeroRegion() bool
	// StartG returns a first g1 for the fixed point when t1 = t (docs/method.md section 3).
	StartG(t float64) float64
	// Strengths returns the penalty's strengths (the parameters of its registry kind with
	// the role param.Strength), in the registry's order, with their values.
	Strengths() []Strength
}

// Strength is one strength of a penalty and its value, for example l1 = 0.05.
type Strength struct {
	Name  string
	Value float64
}

// LinearForm is implemented by every penalty of this package. Linear(g) returns the same
// pieces as Pieces(g), without allocating for up to four pieces; ok is false when the prox
// is not piecewise linear.
type LinearForm interface {
	Linear(g float64) (l Linear, ok bool)
}

// checkWeight accepts finite w >= 0.
func checkWeight(field string, w float64) error {
	switch {
	case math.IsNaN(w) || math.IsInf(w, 0):
		return &param.Error{Field: field, Reason: fmt.Sprintf("must be a finite number (got %v)", w)}
	case w < 0:
		return &param.Error{Field: field, Reason: fmt.Sprintf("must be >= 0 (got %v): a negative weight makes the penalty non-convex, which the theory does not cover", w)}
	}
	return nil
}

// checkPositive accepts finite w > 0.
func checkPositive(field string, w float64) error {
	switch {
	case math.IsNaN(w) || math.IsInf(w, 0):
		return &param.Error{Field: field, Reason: fmt.Sprintf("must be a finite number (got %v)", w)}
	case w <= 0:
		return &param.Error{Field: field, Reason: fmt.Sprintf("must be > 0 (got %v)", w)}
	}
	return nil
}
