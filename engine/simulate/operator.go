package simulate

import (
	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
)

// Operator is an m x n matrix known through its products.
type Operator interface {
	// Dims returns m and n.
	Dims() (m, n int)
	// Mul sets dst = F x (x of length n, dst of length m).
	Mul(dst, x []float64)
	// MulT sets dst = F^T y (y of length m, dst of length n).
	MulT(dst, y []float64)
}

// Matrix is a dense m x n matrix stored by columns: entry (i, j) is Data[j*Rows+i]. Coordinate
// descent reads one column at a time, so the columns are contiguous.
type Matrix struct {
	Rows, Cols int
	Data       []float64
}

// Dims returns the number of rows and columns.
func (a *Matrix) Dims() (m, n int) { return a.Rows, a.Cols }

// Col returns column j (sharing storage).
func (a *Matrix) Col(j int) []float64 { return a.Data[j*a.Rows : (j+1)*a.Rows] }

// asTranspose views the column-major m x n matrix as the row-major n x m matrix F^T.
func (a *Matrix) asTranspose() blas64.General {
	return blas64.General{Rows: a.Cols, Cols: a.Rows, Stride: a.Rows, Data: a.Data}
}

// Mul sets dst = F x.
func (a *Matrix) Mul(dst, x []float64) {
	blas64.Gemv(blas.Trans, 1, a.asTranspose(), vec(x), 0, vec(dst))
}

// MulT sets dst = F^T y.
func (a *Matrix) MulT(dst, y []float64) {
	blas64.Gemv(blas.NoTrans, 1, a.asTranspose(), vec(y), 0, vec(dst))
}

func vec(x []float64) blas64.Vector { return blas64.Vector{N: len(x), Inc: 1, Data: x} }

// SVD is the m x n matrix F = U S V^T with U (m x m) and V (n x n) orthogonal and S holding the
// r = min(m, n) singular values on its diagonal. Products cost one product with U and one with V.
type SVD struct {
	U, V   Orthogonal
	S      []float64 // length min(m, n)
	bm, bn []float64
}

// NewSVD returns U diag(s) V^T. It needs len(s) = min(U.Dim(), V.Dim()).
func NewSVD(u, v Orthogonal, s []float64) *SVD {
	return &SVD{U: u, V: v, S: s, bm: make([]float64, u.Dim()), bn: make([]float64, v.Dim())}
}

// Dims returns m and n.
func (f *SVD) Dims() (m, n int) { return f.U.Dim(), f.V.Dim() }

// Mul sets dst = U S V^T x.
func (f *SVD) Mul(dst, x []float64) {
	f.V.MulT(f.bn, x)
	clear(f.bm)
	for i, s := range f.S {
		f.bm[i] = s * f.bn[i]
	}
	f.U.Mul(dst, f.bm)
}

// MulT sets dst = V S^T U^T y.
func (f *SVD) MulT(dst, y []float64) {
	f.U.MulT(f.bm, y)
	clear(f.bn)
	for i, s := range f.S {
		f.bn[i] = s * f.bm[i]
	}
	f.V.Mul(dst, f.bn)
}

// DenseOf returns F in full as a Matrix, at the cost of n products with F.
func DenseOf(f Operator) *Matrix {
	if s, ok := f.(*SVD); ok {
		return s.dense()
	}
	m, n := f.Dims()
	a := &Matrix{Rows: m, Cols: n, Data: make([]float64, m*n)}
	e := make([]float64, n)
	for j := 0; j < n; j++ {
		e[j] = 1
		f.Mul(a.Col(j), e)
		e[j] = 0
	}
	return a
}

// dense forms F = U S V^T with r = min(m, n) products with U and m with V: row i of F is
// V C e_i with C = S^T U^T, whose nonzero rows are s_k (U e_k)^T.
func (f *SVD) dense() *Matrix {
	m, n := f.Dims()
	r := len(f.S)
	c := make([]float64, r*m) // row k of C, k < r, at c[k*m:]
	e := make([]float64, m)
	for k := 0; k < r; k++ {
		e[k] = 1
		row := c[k*m : (k+1)*m]
		f.U.Mul(row, e)
		e[k] = 0
		for i := range row {
			row[i] *= f.S[k]
		}
	}
	a := &Matrix{Rows: m, Cols: n, Data: make([]float64, m*n)}
	col := make([]float64, n)
	for i := 0; i < m; i++ {
		clear(col)
		for k := 0; k < r; k++ {
			col[k] = c[k*m+i]
		}
		f.V.Mul(col, col)
		for j, v := range col {
			a.Data[j*m+i] = v
		}
	}
	return a
}

// FromDense copies a gonum matrix into a column-major Matrix.
func FromDense(a mat.Matrix) *Matrix {
	m, n := a.Dims()
	out := &Matrix{Rows: m, Cols: n, Data: make([]float64, m*n)}
	for j := 0; j < n; j++ {
		col := out.Data[j*m : (j+1)*m]
		for i := range col {
			col[i] = a.At(i, j)
		}
	}
	return out
}
