// Package study asks the fixed point of package fixedpoint the questions a design study
// needs: how an observable moves along one field of a scenario (Sweep), over two fields at
// once (Map, MapRows), which regularization gives the lowest error (Best), how few
// measurements reach a target error (Plan), and what error no estimator can beat (Bayes).
//
// Conventions are those of docs/method.md: alpha = m/n, Delta is the noise variance, the MSE is
// lim (1/n)||xhat - x0||^2 and the NMSE is the MSE divided by rho2 = E[x0^2]. Fields of a
// scenario are named as scenario.Scenario.Get names them ("alpha", "l1", "noise",
// "density", "design.min", ...).
//
// Every point of a study carries the converged flag and the iteration count of its fixed
// point; a point that did not converge or could not be solved is marked as such and is never
// passed off as a result (its observables are left out of CSV output and out of every
// minimum and crossing searched here).
//
// Studies are deterministic: the same scenario and specification give bit-identical output,
// whatever the number of workers. Warm starts run along each row of a map, and each row
// starts cold, so that any split of the rows among workers (goroutines here, or the page's
// web workers through MapRows) computes the same numbers.
package study
