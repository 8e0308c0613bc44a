package data

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	lapackgonum "gonum.org/v1/gonum/lapack/gonum"
)

// gramOf returns the row-major k x k Gram matrix B B^T (both triangles) of a k x n matrix B
// with singular values sv: B = U diag(sv) V^T for random U (k x k) and V^T (k x n) with
// orthonormal rows.
func gramOf(rng *rand.Rand, sv []float64, n int) []float64 {
	k := len(sv)
	u := orthonormalRows(rng, k, k)
	v := orthonormalRows(rng, k, n)
	b := make([]float64, k*n)
	for i := range k {
		for p := range k {
			blas64.Implementation().Daxpy(n, u[i*k+p]*sv[p], v[p*n:], 1, b[i*n:], 1)
		}
	}
	g := make([]float64, k*k)
	blas64.Implementation().Dgemm(blas.NoTrans, blas.Trans, k, k, n, 1, b, n, b, n, 0, g, k)
	return g
}

// orthonormalRows returns a k x n (k <= n) row-major matrix with orthonormal rows
// (Gram-Schmidt, twice, on Gaussian rows).
func orthonormalRows(rng *rand.Rand, k, n int) []float64 {
	bi := blas64.Implementation()
	q := make([]float64, k*n)
	for i := range q {
		q[i] = rng.NormFloat64()
	}
	for i := range k {
		r := q[i*n : (i+1)*n]
		for range 2 {
			for j := range i {
				bi.Daxpy(n, -bi.Ddot(n, q[j*n:], 1, r, 1), q[j*n:], 1, r, 1)
			}
		}
		bi.Dscal(n, 1/bi.Dnrm2(n, r, 1), r, 1)
	}
	return q
}

// eigenvaluesBy returns the ascending eigenvalues of the symmetric k x k matrix g (row-major,
// lower triangle read) after the reduction reduce and Dsterf.
func eigenvaluesBy(t *testing.T, g []float64, k int, reduce func(g []float64, k int, d, e, tau []float64)) []float64 {
	g = slices.Clone(g)
	d, e, tau := make([]float64, k), make([]float64, max(0, k-1)), make([]float64, max(0, k-1))
	reduce(g, k, d, e, tau)
	var impl lapackgonum.Implementation
	if !impl.Dsterf(k, d, e) {
		t.Fatal("Dsterf did not converge")
	}
	return d
}

// gonumDsytrd is the reference: gonum's LAPACK Dsytrd (blocked, lower triangle).
func gonumDsytrd(g []float64, k int, d, e, tau []float64) {
	var impl lapackgonum.Implementation
	work := make([]float64, 1)
	impl.Dsytrd(blas.Lower, k, g, k, d, e, tau, work, -1)
	work = make([]float64, int(work[0]))
	impl.Dsytrd(blas.Lower, k, g, k, d, e, tau, work, len(work))
}

// tridiagonalizeBlocked gives the eigenvalues that gonum's Dsytrd + Dsterf give, to
// 1e-13 ||G|| in each (both reductions are backward stable: each eigenvalue is within a small
// multiple of eps ||G|| of the exact one), for orders 1, 2, 3 and orders below, at and above
// the panel width and the crossover, most not multiples of them; on Gram matrices of
// well-conditioned matrices and of ill-conditioned ones (singular values spread evenly in
// log from 1 down to 1e-6, eigenvalues 1..1e-12), where every eigenvalue is also checked
// against its exact value sigma^2 to 1e-13 absolute (||G|| = 1). The panel width and crossover
// are also set to other values, small ones (3 and 5, 8 and 8) so that many panels and trailing
// updates run.
func TestTridiagonalizeBlockedMatchesDsytrd(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	for _, blk := range [][2]int{{triBlock, triCross}, {32, 128}, {3, 5}, {8, 8}} {
		oldB, oldC := triBlock, triCross
		triBlock, triCross = blk[0], blk[1]
		for _, k := range []int{1, 2, 3, 4, 7, 31, 32, 33, 64, 129, 160, 161, 300, 517} {
			for _, ill := range []bool{false, true} {
				sv := make([]float64, k)
				for i := range sv {
					if ill {
						sv[i] = math.Pow(10, -6*float64(i)/float64(max(1, k-1))) // 1 .. 1e-6
					} else {
						sv[i] = math.Abs(rng.NormFloat64()) + 0.1
					}
				}
				g := gramOf(rng, sv, k+3)
				got := eigenvaluesBy(t, g, k, tridiagonalizeBlocked)
				want := eigenvaluesBy(t, g, k, gonumDsytrd) // reference: gonum lapack Dsytrd + Dsterf
				norm := slices.Max(want)
				for i := range want {
					if d := math.Abs(got[i] - want[i]); !(d <= 1e-13*norm) {
						t.Errorf("nb %d nx %d k %d ill %v: eigenvalue %d = %v, gonum Dsytrd %v (diff %.2g, bound %.2g)",
							blk[0], blk[1], k, ill, i, got[i], want[i], d, 1e-13*norm)
					}
				}
				if ill && k >= 2 {
					// The exact eigenvalues are sv^2; within the backward error bound.
					for i := range sv {
						exact := sv[k-1-i] * sv[k-1-i]
						if d := math.Abs(got[i] - exact); !(d <= 1e-13) {
							t.Errorf("nb %d nx %d k %d: eigenvalue %d = %v, exact %v", blk[0], blk[1], k, i, got[i], exact)
						}
					}
				}
			}
		}
		triBlock, triCross = oldB, oldC
	}
}
