package data

import (
	"context"
	"math"
	"slices"

	"gonum.org/v1/gonum/blas/blas64"
	lapackgonum "gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// Step names a stage of SingularValues, for its progress.
type Step int

const (
	StepGram        Step = iota // the product of the matrix with its transpose
	StepTridiagonal             // reduction of the Gram matrix to tridiagonal form
	StepEigenvalues             // the eigenvalues of the tridiagonal matrix
)

// gramBlock is the number of rows of the Gram matrix formed per product: large enough for
// gonum's blocked, parallel Dgemm to run at speed, small enough for progress and cancel; a
// multiple of 4, as gramRows's blocks need.
const gramBlock = 128

// SingularValues returns the min(m, n) singular values of the m x n matrix a in decreasing
// order, as the square roots of the eigenvalues of the smaller Gram matrix: G = A A^T (m <= n)
// or A^T A, formed in blocks of rows (its lower triangle only; gonum's Dgemm, or a plain-Go
// loop in the browser: portableKernels), reduced to tridiagonal form by LAPACK's blocked
// Householder reduction dsytrd (tridiag.go, on gonum's Dgemv and Dgemm; in the browser gonum's
// unblocked Dsytd2) and solved for its eigenvalues alone by gonum's Dsterf (the root-free
// QL/QR of Pal, Walker and Kahan). No singular vector is ever formed. Rows and columns that
// are entirely zero are left out first (they add only zero singular values), so the work is
// bounded by the data, not by the stated shape.
//
// Accuracy: each eigenvalue of G comes with an absolute error of a small multiple of
// eps sigma_max^2 (eps = 2^-52), from forming G and from the backward-stable reduction, so a
// singular value sigma has an absolute error of about eps sigma_max^2 / (2 sigma), that is a
// relative error of about (eps/2) (sigma_max/sigma)^2: the Gram route squares the condition
// number. Values above 1e-4 sigma_max keep about 8 correct digits; values below about
// sqrt(k eps) sigma_max (k = max(m, n), the length of the inner products that form G;
// GramTolerance) are at the level of the rounding and
// may come out as any number down to 0 (a negative eigenvalue is returned as 0). A direct
// SVD would be accurate to eps sigma_max in every value, at about four times the cost.
//
// progress, when not nil, is called with the step and the fraction of it done. ctx is checked
// between blocks of the Gram product and between steps; the reduction, once started, runs to
// its end.
//
// Special cases are: a matrix with a NaN or Inf entry is refused (*ParamError "matrix");
// a failed eigenvalue iteration is an error; a canceled ctx returns ErrCanceled.
func SingularValues(ctx context.Context, a *mat.Dense, progress func(step Step, frac float64)) ([]float64, error) {
	if a == nil || a.IsEmpty() {
		return nil, paramErr("matrix", "is empty")
	}
	if progress == nil {
		progress = func(Step, float64) {}
	}
	m, n := a.Dims()
	raw := a.RawMatrix()
	rows := make([]bool, m)
	cols := make([]bool, n)
	top := 0.0
	for i := 0; i < m; i++ {
		for j, v := range raw.Data[i*raw.Stride : i*raw.Stride+n] {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, paramErr("matrix", "holds a NaN or Inf entry")
			}
			if v != 0 {
				rows[i], cols[j] = true, true
				top = math.Max(top, math.Abs(v))
			}
		}
	}
	out := make([]float64, min(m, n))
	if top == 0 {
		return out, nil
	}
	b := compact(raw, rows, cols, top)
	k := b.Rows
	g := make([]float64, k*k)
	for i0 := 0; i0 < k; i0 += gramBlock {
		if ctx.Err() != nil {
			return nil, ErrCanceled
		}
		i1 := min(k, i0+gramBlock)
		gramBlockRows(b, i0, i1, g, k)
		progress(StepGram, float64(i1)*float64(i1)/(float64(k)*float64(k)))
	}
	b = blas64.General{}
	if ctx.Err() != nil {
		return nil, ErrCanceled
	}
	progress(StepTridiagonal, 0)
	d, e := make([]float64, k), make([]float64, max(0, k-1))
	tridiagonalize(g, k, d, e)
	g = nil
	if ctx.Err() != nil {
		return nil, ErrCanceled
	}
	progress(StepEigenvalues, 0)
	var impl lapackgonum.Implementation
	if !impl.Dsterf(k, d, e) {
		return nil, paramErr("matrix", "the eigenvalue iteration of its Gram matrix did not converge")
	}
	progress(StepEigenvalues, 1)
	for i := range k {
		out[i] = top * math.Sqrt(math.Max(0, d[k-1-i]))
	}
	return out, nil
}

// compact copies the nonzero rows and columns of raw, divided by top so that the Gram matrix
// can neither overflow nor underflow, with the shorter side as its rows (transposed when raw
// has more nonzero rows than columns), so that the Gram matrix of the result's rows is the
// smaller one.
func compact(raw blas64.General, rows, cols []bool, top float64) blas64.General {
	var ri, ci []int
	for i, ok := range rows {
		if ok {
			ri = append(ri, i)
		}
	}
	for j, ok := range cols {
		if ok {
			ci = append(ci, j)
		}
	}
	if len(ri) <= len(ci) {
		out := blas64.General{Rows: len(ri), Cols: len(ci), Stride: len(ci), Data: make([]float64, len(ri)*len(ci))}
		for r, i := range ri {
			src := raw.Data[i*raw.Stride:]
			dst := out.Data[r*out.Stride : (r+1)*out.Stride]
			for c, j := range ci {
				dst[c] = src[j] / top
			}
		}
		return out
	}
	out := blas64.General{Rows: len(ci), Cols: len(ri), Stride: len(ri), Data: make([]float64, len(ri)*len(ci))}
	for r, i := range ri {
		src := raw.Data[i*raw.Stride:]
		for c, j := range ci {
			out.Data[c*out.Stride+r] = src[j] / top
		}
	}
	return out
}

// GramTolerance is the level below which SingularValues's values are rounding, not data:
// sqrt(max(m, n) eps) sigma_max (see SingularValues on accuracy).
func GramTolerance(m, n int, sigmaMax float64) float64 {
	return math.Sqrt(float64(max(m, n))*0x1p-52) * sigmaMax
}

// Summary describes the singular values of an m x n design.
type Summary struct {
	Rows, Cols int     // m and n
	Alpha      float64 // m/n, the sampling ratio of docs/method.md section 1
	Min, Max   float64 // smallest and largest of the min(m, n) singular values
	Condition  float64 // Max/Min; +Inf when Min is 0
	Rank       int     // how many singular values exceed Tolerance
	Tolerance  float64 // max(m, n) * Max * machine epsilon
	Histogram  Histogram
}

// Summarize describes the singular values sv of an m x n matrix; sv holds min(m, n)
// values in any order. bins is passed to NewHistogram (0 chooses the count).
//
// The rank tolerance max(m, n) * sigma_max * eps is the default of LAPACK-based rank
// decisions (common practice; Golub & Van Loan, Matrix Computations, 4th ed., section 5.4.1).
//
// Special cases are: m or n below 1, a length other than min(m, n), and negative, NaN or
// Inf values are refused with a *ParamError; an all-zero spectrum has Rank 0 and
// Condition +Inf.
func Summarize(sv []float64, m, n, bins int) (Summary, error) {
	switch {
	case m < 1:
		return Summary{}, paramErr("rows", "must be at least 1, got %d", m)
	case n < 1:
		return Summary{}, paramErr("cols", "must be at least 1, got %d", n)
	case len(sv) != min(m, n):
		return Summary{}, paramErr("values", "a %d x %d matrix has %d singular values, got %d", m, n, min(m, n), len(sv))
	}
	for i, v := range sv {
		if !(v >= 0) || math.IsInf(v, 0) {
			return Summary{}, paramErr("values", "entry %d (%g) is not a finite nonnegative number", i, v)
		}
	}
	h, err := NewHistogram(sv, bins)
	if err != nil {
		return Summary{}, err
	}
	s := Summary{
		Rows: m, Cols: n,
		Alpha:     float64(m) / float64(n),
		Min:       slices.Min(sv),
		Max:       slices.Max(sv),
		Histogram: h,
	}
	s.Condition = s.Max / s.Min
	if s.Max == 0 {
		s.Condition = math.Inf(1)
	}
	s.Tolerance = float64(max(m, n)) * s.Max * 0x1p-52
	for _, v := range sv {
		if v > s.Tolerance {
			s.Rank++
		}
	}
	return s, nil
}

// SummarizeComputed is Summarize for values computed by SingularValues: the rank counts the
// values above GramTolerance, the level that route resolves, and the condition number is
// +Inf when the smallest value lies below it (it is then not resolved).
func SummarizeComputed(sv []float64, m, n, bins int) (Summary, error) {
	s, err := Summarize(sv, m, n, bins)
	if err != nil {
		return s, err
	}
	s.Tolerance = GramTolerance(m, n, s.Max)
	s.Rank = 0
	for _, v := range sv {
		if v > s.Tolerance {
			s.Rank++
		}
	}
	if !(s.Min > s.Tolerance) {
		s.Condition = math.Inf(1)
	}
	return s, nil
}
