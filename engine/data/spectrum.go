package data

import (
	"context"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// SingularValues returns the min(m, n) singular values of the m x n matrix a in decreasing
// order, from gonum's SVD without singular vectors (mat.SVDNone; LAPACK's dgesvd path:
// reduction to bidiagonal form, then the implicit zero-shift QR of Demmel and Kahan 1990).
//
// progress, when not nil, is called with 0 before the factorization and 1 after it: gonum
// performs the SVD as one call, so progress between the two ends cannot be observed and
// the caller (a page worker) shows an indeterminate bar in between. ctx is checked before
// and after the factorization for the same reason; a factorization once started runs to
// its end.
//
// Special cases are: a matrix with a NaN or Inf entry is refused (*ParamError "matrix");
// a failed factorization is an error; a canceled ctx returns ErrCanceled.
func SingularValues(ctx context.Context, a *mat.Dense, progress func(frac float64)) ([]float64, error) {
	if a == nil || a.IsEmpty() {
		return nil, paramErr("matrix", "is empty")
	}
	m, _ := a.Dims()
	for i := 0; i < m; i++ {
		for _, v := range a.RawRowView(i) {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, paramErr("matrix", "holds a NaN or Inf entry")
			}
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, ErrCanceled
	}
	if progress != nil {
		progress(0)
	}
	var svd mat.SVD
	if !svd.Factorize(a, mat.SVDNone) {
		return nil, paramErr("matrix", "the singular value decomposition did not converge")
	}
	if err := ctx.Err(); err != nil {
		return nil, ErrCanceled
	}
	if progress != nil {
		progress(1)
	}
	return svd.Values(nil), nil
}

// Summary describes the singular values of an m x n design.
type Summary struct {
	Rows, Cols int     // m and n
	Alpha      float64 // m/n, the sampling ratio of method.md M1
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
