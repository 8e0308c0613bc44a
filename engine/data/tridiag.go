package data

import (
	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	lapackgonum "gonum.org/v1/gonum/lapack/gonum"
)

// The native tridiagonal reduction of SingularValues: LAPACK's blocked Householder reduction
// dsytrd (Dongarra, Sorensen & Hammarling, "Block reduction of matrices to condensed forms for
// eigenvalue computations", J. Comput. Appl. Math. 27, 1989; LAPACK's dsytrd and dlatrd),
// organized for gonum's row-major storage and fast kernels.
//
// Why not gonum's Dsytrd: gonum's LAPACK is a row-major transcription of the column-major
// code, so every Householder vector is a matrix column, and the symmetric matrix-vector
// product that is half of the work (Dsymv in Dlatrd, one per column) runs gonum's scalar
// strided loop over a vector with a stride of a whole row; and the trailing rank-2nb update
// (Dsyr2k) is generic Go loops. Here instead:
//
//   - the lower triangle of the row-major k x k matrix g is, read column-major, the upper
//     triangle of the same (symmetric) matrix, so the reduction is LAPACK's UPLO = 'U' variant
//     written on column-major indices: A(r, c) (r <= c) is g[c*k + r], and each column of the
//     upper triangle (and so each Householder vector) is a contiguous row of g;
//   - the symmetric product (symv) runs over blocks of rows of the remaining leading block
//     with gonum's assembly Dgemv, which works four rows at a time;
//   - the trailing update A -= V W^T + W V^T is gonum's blocked, parallel assembly Dgemm with
//     inner dimension 2 nb, over row panels of the lower triangle (so that only about
//     triPanel/m of extra work is done right of the diagonal of an m x m update).
//
// Accuracy: the arithmetic is that of dsytrd, so it is backward stable in the same way: the
// computed tridiagonal matrix is exactly orthogonally similar to G + E with
// ||E||_2 <= p(k) eps ||G||_2, p(k) a modest function of the order (Golub & Van Loan,
// Matrix Computations, 4th ed., section 8.3.1), and each computed eigenvalue is within
// ||E||_2 of the exact one (Weyl). For singular values from the Gram route that means: with
// G = B B^T formed in floating point too (the same kind of error), lambda_i = sigma_i^2 has an
// absolute error of about p eps sigma_max^2, so sigma_i has an absolute error of about
// p eps sigma_max^2 / (2 sigma_i), a relative error of about (p eps / 2) (sigma_max/sigma_i)^2;
// and values below about sqrt(p eps) sigma_max are not resolved at all (their computed
// eigenvalue is rounding, possibly negative). A direct SVD of B would have an absolute error of
// about p eps sigma_max in every value. See SingularValues and GramTolerance.

// triBlock is the number of columns reduced per panel (LAPACK's nb), and triCross the order
// below which the rest is reduced in one panel without trailing updates (LAPACK's nx): the
// values of gonum's Ilaenv for DSYTRD. On a 1500 x 1500 Gram matrix (BenchmarkTridiagonal1500)
// nb from 24 to 48, nx from 32 to 128, triPanel from 64 to 256 and symvRows from 8 to 64 all
// measured within the machine's noise (about 10%) of each other. Variables so that the tests
// can run many panels on small orders.
var (
	triBlock = 32
	triCross = 32
)

// triPanel is the number of rows of the trailing update given to one Dgemm call, and
// symvRows the number of rows of A per block of symv.
const (
	triPanel = 128
	symvRows = 32
)

// tridiagonalizeBlocked reduces the symmetric k x k matrix whose lower triangle the row-major
// g holds (stride k) to tridiagonal form: diagonal d (length k), off-diagonal e (length k-1).
// g is overwritten by the Householder vectors; tau is set too (length k-1).
func tridiagonalizeBlocked(g []float64, k int, d, e, tau []float64) {
	if k == 0 {
		return
	}
	nb, nx := triBlock, max(triBlock, triCross)
	kk := k
	if nb > 1 && nx < k {
		// Columns kk..k-1 are reduced in panels of nb, as in dsytrd.
		kk = k - ((k-nx+nb-1)/nb)*nb
	}
	t := newTriWork(k, max(nb, kk))
	for i0 := k - nb; i0 >= kk; i0 -= nb {
		// Reduce columns i0..i0+nb-1 and form W for the update of A(0:i0, 0:i0).
		t.panel(g, k, i0+nb, nb, e, tau)
		t.update(g, k, i0, nb)
		for j := i0; j < i0+nb; j++ {
			g[j*k+j-1] = e[j-1] // where the unit of the reflector was, as in dsytrd
			d[j] = g[j*k+j]
		}
	}
	// The leading kk x kk block: one panel of all its columns.
	t.panel(g, k, kk, kk, e, tau)
	for j := 0; j < kk; j++ {
		d[j] = g[j*k+j]
	}
}

// triWork holds the workspace of tridiagonalizeBlocked.
type triWork struct {
	w    []float64 // W of dlatrd, column-major with leading dimension ldw: W(r, c) = w[c*ldw+r]
	ldw  int
	x, y []float64 // [V W] and [W V] for the trailing update, k x 2nb row-major
}

func newTriWork(k, nb int) *triWork {
	return &triWork{
		w:   make([]float64, k*nb),
		ldw: k,
		x:   make([]float64, 2*triBlock*k),
		y:   make([]float64, 2*triBlock*k),
	}
}

// panel is LAPACK's dlatrd with UPLO = 'U' on the column-major view of g (A(r, c) = g[c*lda+r]
// for r <= c): it reduces the last nb columns of the leading n x n block A and returns in
// t.w the n x nb matrix W such that the update A(0:n-nb, 0:n-nb) -= V W^T + W V^T, with V the
// reflectors stored in columns n-nb..n-1 of A, completes the similarity transformation.
// e[i-1] and tau[i-1] are set for the columns i reduced; A(i-1, i) is left holding the unit
// element of v, as in dlatrd (the trailing update reads it).
func (t *triWork) panel(a []float64, lda, n, nb int, e, tau []float64) {
	bi := blas64.Implementation()
	var impl lapackgonum.Implementation
	w, ldw := t.w, t.ldw
	for i := n - 1; i >= n-nb; i-- {
		iw := i - n + nb
		col := a[i*lda : i*lda+i+1] // A(0:i+1, i), contiguous
		if i < n-1 {
			// Update A(0:i+1, i) by the columns already reduced in this panel:
			// A(0:i+1, i) -= A(0:i+1, i+1:n) W(i, iw+1:nb)^T + W(0:i+1, iw+1:nb) A(i, i+1:n)^T.
			// A column-major block A(0:m, c0:c1) is the row-major (c1-c0) x m matrix at a[c0*lda:].
			bi.Dgemv(blas.Trans, n-i-1, i+1, -1, a[(i+1)*lda:], lda,
				w[(iw+1)*ldw+i:], ldw, 1, col, 1)
			bi.Dgemv(blas.Trans, nb-iw-1, i+1, -1, w[(iw+1)*ldw:], ldw,
				a[(i+1)*lda+i:], lda, 1, col, 1)
		}
		if i == 0 {
			continue
		}
		// The reflector H(i) = I - tau v v^T annihilating A(0:i-1, i); v(i-1) = 1.
		ei, ti := impl.Dlarfg(i, a[i*lda+i-1], a[i*lda:], 1)
		e[i-1], tau[i-1] = ei, ti
		a[i*lda+i-1] = 1
		v := a[i*lda : i*lda+i]
		wc := w[iw*ldw : iw*ldw+i] // W(0:i, iw)
		// W(0:i, iw) = A(0:i, 0:i) v, then less the panel's part not yet applied to A:
		// (V W^T + W V^T) v over the columns i+1..n-1 already reduced in this panel.
		symv(a, lda, i, v, wc)
		if i < n-1 {
			tmp := w[iw*ldw+i+1 : iw*ldw+n] // W(i+1:n, iw), scratch
			bi.Dgemv(blas.NoTrans, nb-iw-1, i, 1, w[(iw+1)*ldw:], ldw, v, 1, 0, tmp, 1)
			bi.Dgemv(blas.Trans, n-i-1, i, -1, a[(i+1)*lda:], lda, tmp, 1, 1, wc, 1)
			bi.Dgemv(blas.NoTrans, n-i-1, i, 1, a[(i+1)*lda:], lda, v, 1, 0, tmp, 1)
			bi.Dgemv(blas.Trans, nb-iw-1, i, -1, w[(iw+1)*ldw:], ldw, tmp, 1, 1, wc, 1)
		}
		bi.Dscal(i, ti, wc, 1)
		alpha := -0.5 * ti * bi.Ddot(i, wc, 1, v, 1)
		bi.Daxpy(i, alpha, v, 1, wc, 1)
	}
}

// symv sets y = A x for the symmetric n x n matrix whose lower triangle the row-major a holds
// (stride lda), by blocks of symvRows rows: the rectangle R = A[r0:r1, 0:r0] left of the
// diagonal block adds R x[0:r0] to y[r0:r1] and R^T x[r0:r1] to y[0:r0] (gonum's Dgemv, whose
// assembly runs four rows at a time; R is read the second time from cache), and the diagonal
// block adds its own product (gonum's Dsymv). One goroutine: by measurement on this 2-CPU
// machine, splitting the rows over two gained nothing (the product is limited by reading A).
func symv(a []float64, lda, n int, x, y []float64) {
	bi := blas64.Implementation()
	clear(y[:n])
	for r0 := 0; r0 < n; r0 += symvRows {
		r1 := min(n, r0+symvRows)
		if r0 > 0 {
			bi.Dgemv(blas.NoTrans, r1-r0, r0, 1, a[r0*lda:], lda, x, 1, 1, y[r0:], 1)
			bi.Dgemv(blas.Trans, r1-r0, r0, 1, a[r0*lda:], lda, x[r0:], 1, 1, y, 1)
		}
		bi.Dsymv(blas.Lower, r1-r0, 1, a[r0*lda+r0:], lda, x[r0:], 1, 1, y[r0:], 1)
	}
}

// update applies A(0:m, 0:m) -= V W^T + W V^T (lower triangle of the row-major g, stride lda)
// with V = A(0:m, m:m+nb) and W = t.w(0:m, 0:nb), as X Y^T with the m x 2nb row-major
// X = [V W] and Y = [W V], by gonum's Dgemm on row panels of triPanel rows. (Dgemm's
// NoTrans x Trans form, dot products along the rows of X and Y, measured faster here than its
// Trans x NoTrans form on [V W]^T, which would need no transposing copy.)
func (t *triWork) update(g []float64, lda, m, nb int) {
	ld := 2 * nb
	x, y := t.x[:m*ld], t.y[:m*ld]
	for c := 0; c < nb; c++ {
		v := g[(m+c)*lda : (m+c)*lda+m] // V(0:m, c), a row of g
		wc := t.w[c*t.ldw : c*t.ldw+m]
		for r, vr := range v {
			x[r*ld+c] = vr
			y[r*ld+nb+c] = vr
		}
		for r, wr := range wc {
			x[r*ld+nb+c] = wr
			y[r*ld+c] = wr
		}
	}
	bi := blas64.Implementation()
	for r0 := 0; r0 < m; r0 += triPanel {
		r1 := min(m, r0+triPanel)
		// Rows r0..r1-1, columns 0..r1-1 (entries right of the diagonal are set too; g's upper
		// triangle is not read).
		bi.Dgemm(blas.NoTrans, blas.Trans, r1-r0, r1, ld, -1, x[r0*ld:], ld, y, ld, 1, g[r0*lda:], lda)
	}
}
