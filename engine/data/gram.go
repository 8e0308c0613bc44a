package data

import (
	"runtime"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	lapackgonum "gonum.org/v1/gonum/lapack/gonum"
)

// portableKernels chooses, for the Gram product and the tridiagonal reduction of
// SingularValues, the routes that are fastest where gonum has no assembly: under
// GOOS=js GOARCH=wasm (the page's workers) gonum's Dgemm runs its generic Go loops at about
// 0.3 billion multiply-adds a second and its blocked Dsytrd is slower than the unblocked
// Dsytd2, so there the product is gramRows's register-blocked loop (about 0.8 billion a second
// in V8) and the reduction is Dsytd2. Elsewhere gonum's parallel assembly Dgemm and the
// blocked reduction of tridiag.go (LAPACK's dsytrd around gonum's assembly Dgemv and Dgemm)
// are the faster. Both routes compute the same lower triangle with backward-stable Householder
// reductions; a package variable so that the tests run both natively.
var portableKernels = runtime.GOARCH == "wasm"

// gramBlockRows sets rows i0..i1 of the lower triangle of G = B B^T (left of column i1) for
// the row-major k x n matrix b, k <= n.
func gramBlockRows(b blas64.General, i0, i1 int, g []float64, k int) {
	if !portableKernels {
		blas64.Implementation().Dgemm(blas.NoTrans, blas.Trans, i1-i0, i1, b.Cols, 1,
			b.Data[i0*b.Stride:], b.Stride, b.Data, b.Stride, 0, g[i0*k:], k)
		return
	}
	gramRows(b, i0, i1, g, k)
}

// gramRows is gramBlockRows as plain Go: 4 x 4 blocks of dot products held in sixteen local
// sums, so that each entry loaded from memory is used four times. Entries right of the diagonal
// that a block reaches are set too (G is symmetric), which the reduction ignores.
func gramRows(b blas64.General, i0, i1 int, g []float64, k int) {
	n, s := b.Cols, b.Stride
	row := func(i int) []float64 { return b.Data[i*s : i*s+n] }
	i := i0
	for ; i+4 <= i1; i += 4 {
		r0, r1, r2, r3 := row(i), row(i+1), row(i+2), row(i+3)
		r1, r2, r3 = r1[:len(r0)], r2[:len(r0)], r3[:len(r0)]
		j := 0
		for ; j+4 <= i+4; j += 4 {
			s0, s1, s2, s3 := row(j), row(j+1), row(j+2), row(j+3)
			s0, s1, s2, s3 = s0[:len(r0)], s1[:len(r0)], s2[:len(r0)], s3[:len(r0)]
			var c00, c01, c02, c03, c10, c11, c12, c13, c20, c21, c22, c23, c30, c31, c32, c33 float64
			for p, x0 := range r0 {
				x1, x2, x3 := r1[p], r2[p], r3[p]
				y0, y1, y2, y3 := s0[p], s1[p], s2[p], s3[p]
				c00 += x0 * y0
				c01 += x0 * y1
				c02 += x0 * y2
				c03 += x0 * y3
				c10 += x1 * y0
				c11 += x1 * y1
				c12 += x1 * y2
				c13 += x1 * y3
				c20 += x2 * y0
				c21 += x2 * y1
				c22 += x2 * y2
				c23 += x2 * y3
				c30 += x3 * y0
				c31 += x3 * y1
				c32 += x3 * y2
				c33 += x3 * y3
			}
			copy(g[i*k+j:], []float64{c00, c01, c02, c03})
			copy(g[(i+1)*k+j:], []float64{c10, c11, c12, c13})
			copy(g[(i+2)*k+j:], []float64{c20, c21, c22, c23})
			copy(g[(i+3)*k+j:], []float64{c30, c31, c32, c33})
		}
	}
	// The rows left over when i1 - i0 is not a multiple of 4, one dot product an entry.
	for ; i < i1; i++ {
		r := row(i)
		for j := 0; j <= i; j++ {
			c := row(j)[:len(r)]
			sum := 0.0
			for p, x := range r {
				sum += x * c[p]
			}
			g[i*k+j] = sum
		}
	}
}

// tridiagonalize reduces the symmetric k x k matrix whose lower triangle g holds to
// tridiagonal form (diagonal d, off-diagonal e), overwriting g; see portableKernels for the
// choice between the blocked tridiagonalizeBlocked (LAPACK's dsytrd) and gonum's unblocked
// Dsytd2 (the same Householder reduction, one column at a time).
func tridiagonalize(g []float64, k int, d, e []float64) {
	var impl lapackgonum.Implementation
	tau := make([]float64, max(0, k-1))
	if portableKernels {
		impl.Dsytd2(blas.Lower, k, g, k, d, e, tau)
		return
	}
	tridiagonalizeBlocked(g, k, d, e, tau)
}
