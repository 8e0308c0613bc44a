// Package noise holds the laws of the entries of the measurement noise w of a generalized
// linear model (docs/method.md section 10): Gaussian (the default, today's model), Laplace,
// Student-t and Gaussian with outliers. Every law is a Gaussian scale mixture with mean 0,
// given as a finite list of components so that the output side of the fixed point can use
// the closed forms of Gaussian integrals component by component.
//
// "variance" always names the variance of the typical entry: for gauss, laplace and
// student-t the law's own variance; for outliers the variance of the entries that are not
// outliers.
package noise
