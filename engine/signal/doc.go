// Package signal holds the laws of the entries of the unknown x0 and the expectations of the
// scalar channel that the fixed point needs (docs/method.md sections 2, 3 and 6):
//
//	r = x0 + sqrt(t) z,   z ~ N(0, 1) independent of x0,   xhat = prox(r; g),
//
// with MSE = E[(xhat - x0)^2], A = E[prox'(r; g)] and the support counts of section 4.
//
// Every law is a finite Gaussian mixture, a list of components N(Mean, Var) with weights
// (Var = 0 is a point mass). The mixture is the law itself for the Gaussian, Bernoulli-Gaussian,
// Bernoulli-Rademacher, Gaussian-mixture and empirical laws; for the Laplace and Student-t laws
// (Gaussian scale mixtures) it is a trapezoidal rule in the logarithm of the mixing variance, and
// for the uniform law a Gauss-Legendre quadrature of x0 itself. Exact reports which.
//
// With a piecewise-linear prox, Expect uses closed forms: for each component the posterior of x0
// given r is Gaussian, and on each linear piece the error reduces to truncated normal moments.
// For the power penalty, whose prox has an explicit inverse r = x + k x^(q-1), Expect integrates
// along that inverse, where no prox is solved and the nodes are shared by every component
// (docs/method.md section 11). ExpectQuad computes the same numbers by Gauss-Legendre quadrature
// split at the kinks; it serves every other penalty and cross-checks the faster paths.
package signal
