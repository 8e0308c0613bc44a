package simulate

import (
	"math/rand/v2"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
)

// Orthogonal is an n x n orthogonal matrix known through its products with vectors.
type Orthogonal interface {
	// Dim returns n.
	Dim() int
	// Mul sets dst = Q x. dst and x have length n and may be the same slice.
	Mul(dst, x []float64)
	// MulT sets dst = Q^T x. dst and x have length n and may be the same slice.
	MulT(dst, x []float64)
}

// DenseOrthogonal is an orthogonal matrix stored in full; products cost O(n^2).
type DenseOrthogonal struct {
	Q   *mat.Dense
	tmp []float64
}

// Dim returns the order of the matrix.
func (d *DenseOrthogonal) Dim() int { r, _ := d.Q.Dims(); return r }

// Mul sets dst = Q x.
func (d *DenseOrthogonal) Mul(dst, x []float64) { d.gemv(false, dst, x) }

// MulT sets dst = Q^T x.
func (d *DenseOrthogonal) MulT(dst, x []float64) { d.gemv(true, dst, x) }

func (d *DenseOrthogonal) gemv(trans bool, dst, x []float64) {
	n := d.Dim()
	if len(d.tmp) != n {
		d.tmp = make([]float64, n)
	}
	copy(d.tmp, x)
	t := blas.NoTrans
	if trans {
		t = blas.Trans
	}
	blas64.Gemv(t, 1, d.Q.RawMatrix(), blas64.Vector{N: n, Inc: 1, Data: d.tmp},
		0, blas64.Vector{N: n, Inc: 1, Data: dst})
}

// HaarQR returns an n x n orthogonal matrix drawn from the Haar measure: the Q factor of the QR
// decomposition of a matrix of i.i.d. N(0, 1) entries, with the signs of diag(R) moved into Q so
// that the factorization is unique (Mezzadri 2007, "How to generate random matrices from the
// classical compact groups", Notices of the AMS 54, 592-604). Without the sign fix the law of Q
// depends on the QR routine and is not Haar. Cost O(n^3) time and O(n^2) memory.
//
// Special cases are: n = 1 gives the 1 x 1 matrix +1 or -1 with equal probability.
func HaarQR(rng *rand.Rand, n int) *DenseOrthogonal {
	g := mat.NewDense(n, n, normals(rng, n*n))
	var qr mat.QR
	qr.Factorize(g)
	var q, r mat.Dense
	qr.QTo(&q)
	qr.RTo(&r)
	for j := 0; j < n; j++ {
		if r.At(j, j) < 0 {
			for i := 0; i < n; i++ {
				q.Set(i, j, -q.At(i, j))
			}
		}
	}
	return &DenseOrthogonal{Q: &q}
}

// Householder is a Haar-distributed orthogonal matrix held as the product of n - 1 random
// Householder reflections and a diagonal of signs (Stewart 1980, "The efficient generation of
// random orthogonal matrices with an application to condition estimators", SIAM J. Numer.
// Anal. 17, 403-409). It costs O(n^2) to draw and O(n^2) per product, with no factorization.
type Householder struct {
	n    int
	v    [][]float64 // v[k] has length n - k; H_k = I - 2 v v^T / (v^T v) acting on rows k..n-1
	vv   []float64   // v[k]^T v[k]
	sign []float64
}

// HaarHouseholder draws an n x n Haar orthogonal matrix by Stewart's method: Q = H_0 ... H_{n-2} D,
// where H_k reflects a fresh N(0, I_{n-k}) vector onto the k-th axis and D holds the signs that
// make the implied R factor positive on its diagonal (the same choice as in HaarQR).
//
// Special cases are: n = 1 gives +1 or -1 with equal probability.
func HaarHouseholder(rng *rand.Rand, n int) *Householder {
	h := &Householder{n: n, v: make([][]float64, n), vv: make([]float64, n), sign: make([]float64, n)}
	for k := 0; k < n; k++ {
		x := normals(rng, n-k)
		s := 1.0
		if x[0] < 0 {
			s = -1
		}
		if k == n-1 {
			h.sign[k] = s
			break
		}
		norm := blas64.Nrm2(blas64.Vector{N: len(x), Inc: 1, Data: x})
		// The reflection maps x to -s ||x|| e_1, so the diagonal of R is -s ||x|| and D
		// multiplies by -s to make it positive.
		x[0] += s * norm
		h.v[k] = x
		h.vv[k] = blas64.Dot(blas64.Vector{N: len(x), Inc: 1, Data: x}, blas64.Vector{N: len(x), Inc: 1, Data: x})
		h.sign[k] = -s
	}
	return h
}

// Dim returns the order of the matrix.
func (h *Householder) Dim() int { return h.n }

func (h *Householder) reflect(k int, x []float64) {
	v := h.v[k]
	if h.vv[k] == 0 {
		return
	}
	seg := x[k:]
	a := blas64.Vector{N: len(v), Inc: 1, Data: v}
	b := blas64.Vector{N: len(v), Inc: 1, Data: seg}
	c := 2 * blas64.Dot(a, b) / h.vv[k]
	blas64.Axpy(-c, a, b)
}

// Mul sets dst = Q x.
func (h *Householder) Mul(dst, x []float64) {
	copy(dst, x)
	for i := range dst {
		dst[i] *= h.sign[i]
	}
	for k := h.n - 2; k >= 0; k-- {
		h.reflect(k, dst)
	}
}

// MulT sets dst = Q^T x.
func (h *Householder) MulT(dst, x []float64) {
	copy(dst, x)
	for k := 0; k <= h.n-2; k++ {
		h.reflect(k, dst)
	}
	for i := range dst {
		dst[i] *= h.sign[i]
	}
}

// Dense returns Q in full, at O(n^3) cost.
func Dense(q Orthogonal) *mat.Dense {
	n := q.Dim()
	out := mat.NewDense(n, n, nil)
	e := make([]float64, n)
	col := make([]float64, n)
	for j := 0; j < n; j++ {
		e[j] = 1
		q.Mul(col, e)
		e[j] = 0
		out.SetCol(j, col)
	}
	return out
}

func normals(rng *rand.Rand, n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = rng.NormFloat64()
	}
	return x
}

func nrm2(x []float64) float64 {
	return blas64.Nrm2(blas64.Vector{N: len(x), Inc: 1, Data: x})
}

func dot(x, y []float64) float64 {
	return blas64.Dot(blas64.Vector{N: len(x), Inc: 1, Data: x}, blas64.Vector{N: len(y), Inc: 1, Data: y})
}

func axpy(a float64, x, y []float64) {
	blas64.Axpy(a, blas64.Vector{N: len(x), Inc: 1, Data: x}, blas64.Vector{N: len(y), Inc: 1, Data: y})
}

func sq(x float64) float64 { return x * x }
