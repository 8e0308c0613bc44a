// Package design holds the laws of the design matrix: the limiting eigenvalue law nu of
// F^T F and the transforms of it that the state evolution needs.
//
// # Model
//
// The measurements are y = F x0 + w with F of m rows and n columns, sampling ratio
// alpha = m/n, and F = U S V^T with U, V Haar-distributed; everything about F that matters
// is nu, the limiting law of the eigenvalues of F^T F (n x n). A shape gives the law of the
// nonzero singular values sigma, and
//
//	nu = max(0, 1 - alpha) delta_0 + min(1, alpha) * law(sigma^2),
//
// so nu has an atom of mass 1 - alpha at zero when alpha < 1. The shapes are gaussian
// (i.i.d. entries: Marchenko-Pastur), orthogonal (all nonzero singular values equal),
// uniform singular values, uniform eigenvalues, geometric singular values with a given
// condition number, and the user's own singular values.
//
// # Conventions
//
// A Scale then fixes the size of F: Rows makes E_nu[lambda] = alpha (rows of unit norm on
// average, Gaussian entries N(0, 1/n), F F^T = I for a row-orthogonal design), Columns makes
// E_nu[lambda] = 1 (Gaussian entries N(0, 1/m)), AsGiven keeps the numbers of the shape.
//
// For g >= 0 (g > 0 when nu has an atom at zero) a Law returns
//
//	S1 = E[1/(l+g)]   S2 = E[1/(l+g)^2]   S3 = E[l/(l+g)^2]
//	T  = E[l/(l+g)] = 1 - g S1            W  = Var[1/(l+g)]/S1^2 = S2/S1^2 - 1
//
// and S2Pos, S2 without the atom at zero. The fixed point ties them to the penalty side by
// S1(g2) = V and g1 = T(g2)/S1(g2) (docs/method.md sections 2 and 3); InverseS1 solves the first
// relation. None of these is ever formed by the subtractions on the right, which lose every
// digit when g is large: the closed forms are rationalized so that all their terms are
// nonnegative, and sums over atoms compute the variance behind W by a centered second pass.
// Each transform keeps its relative accuracy from 1e-10 to 1e10 times the scale of the
// spectrum.
//
// The Gaussian and orthogonal laws are closed forms. The continuous shapes are discretized
// once, when the law is made, by composite Gauss-Legendre rules (gonum integrate/quad) in
// the variable in which their density is flat, graded towards a support that reaches zero;
// the empirical shape keeps the user's values as atoms. Their transforms are then exact sums
// over the nodes, without allocation.
//
// # Sources
//
// Marchenko & Pastur 1967, Distribution of eigenvalues for some sets of random matrices,
// Math. USSR-Sbornik 1(4); Bai & Silverstein 2010, Spectral Analysis of Large Dimensional
// Random Matrices, chapter 3 (the Marchenko-Pastur law and its Stieltjes transform);
// Muirhead 1982, Aspects of Multivariate Statistical Theory (mean of the inverted Wishart,
// used in the tests); Chan, Golub & LeVeque 1983, Algorithms for computing the sample
// variance, The American Statistician 37(3) (corrected two-pass variance); Bogaert 2014,
// SIAM J. Sci. Comput. 36(3) (the Gauss-Legendre nodes behind gonum's rule); Trefethen 2013,
// Approximation Theory and Approximation Practice, chapter 19 (convergence of Gauss
// quadrature for integrands with nearby poles).
package design
