package signal

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// laguerre returns the n-point generalized Gauss-Laguerre rule for the weight
// y^alpha e^-y / Gamma(alpha + 1) on (0, Inf) (alpha > -1), normalized so that the weights sum
// to 1. It is exact for polynomials of degree < 2n.
//
// The nodes are the eigenvalues of the Jacobi matrix of the monic Laguerre recurrence
// (diagonal 2k + alpha + 1, off-diagonal sqrt(k (k + alpha))) and the weights the squared first
// components of the normalized eigenvectors (Golub & Welsch 1969, Math. Comp. 23:221-230);
// gonum's symmetric eigensolver does the work.
func laguerre(n int, alpha float64) (x, w []float64) {
	j := mat.NewSymDense(n, nil)
	for k := range n {
		j.SetSym(k, k, 2*float64(k)+alpha+1)
		if k > 0 {
			j.SetSym(k-1, k, math.Sqrt(float64(k)*(float64(k)+alpha)))
		}
	}
	var e mat.EigenSym
	if !e.Factorize(j, true) {
		// The Jacobi matrix is symmetric tridiagonal with positive off-diagonal, for which the
		// QL iteration always converges; a failure is a bug.
		panic("signal: Gauss-Laguerre eigen-decomposition failed")
	}
	x = e.Values(nil)
	var v mat.Dense
	e.VectorsTo(&v)
	w = make([]float64, n)
	sum := 0.0
	for i := range n {
		w[i] = v.At(0, i) * v.At(0, i)
		sum += w[i]
	}
	for i := range w {
		w[i] /= sum
	}
	return x, w
}
