// Package penalty implements the separable convex penalties f of the estimator
//
//	xhat = argmin_x 1/2 ||y - F x||^2 + sum_i f(x_i)
//
// through their scalar proximal operators (docs/method.md sections 2 and 7):
//
//	prox(r; g) = argmin_x f(x) + (g/2)(x - r)^2,   g > 0,
//
// with g the precision of the scalar channel. Every penalty offers the prox, its derivative in r,
// the points where that derivative jumps (kinks), and, when the prox is piecewise linear, the
// exact list of its linear pieces, which lets package signal use closed forms instead of
// quadrature.
//
// Conventions, fixed once for the whole package:
//   - Pieces are half-open intervals [Lo, Hi) ordered left to right; they tile the real line.
//   - At a kink, Deriv returns the right derivative, that is the slope of the piece [Lo, Hi)
//     that contains r. A kink is a set of measure zero, so the convention changes no
//     expectation; it only has to be the same everywhere (quadrature nodes never sit on a
//     kink because integrals are split there).
//   - Weights carry the units of the loss 1/2 ||y - F x||^2: l1 per unit of |x|, l2 per unit
//     of x^2; bound and width carry the units of x0.
//   - Non-convex choices (negative weights, exponents q < 1) are refused with a *param.Error:
//     the theory of the fixed point covers convex penalties only.
package penalty
