// Package simulate checks the asymptotic predictions of package fixedpoint on finite instances
// (docs/method.md section 8).
//
// An instance is y = F x0 + w with x0 drawn from the signal law, w ~ N(0, Delta I_m), and an
// m x n design F with m = round(alpha n). A Gaussian design is drawn entry by entry, N(0, s)
// with s = Mean/m so that the mean eigenvalue of F^T F is the law's Mean; every other design is
// F = U S V^T with U, V orthogonal and uniformly distributed (Haar), or fast structured
// stand-ins for them, and S the design law's singular values. Each instance is solved for
//
//	xhat = argmin_x 1/2 ||y - F x||^2 + sum_i f(x_i)
//
// by coordinate descent (l1, ridge, elastic net), accelerated proximal gradient (any penalty
// with a prox) or vector approximate message passing on the design's singular value
// decomposition, each to a stated stopping rule, and the errors (1/n)||xhat - x0||^2 are averaged
// over trials and set beside the prediction.
//
// Every random number comes from an explicit math/rand/v2 PCG generator seeded by the caller's
// seed and the trial number, so that a run is reproducible on every platform and a trial does
// not depend on the ones before it.
package simulate
