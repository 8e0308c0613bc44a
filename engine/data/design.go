package data

import "hdrisk/engine/design"

// EmpiricalDesign returns the law of F^T F (docs/method.md section 5, empirical) of a user's m x n
// matrix F given its min(m, n) singular values sv, in any order: the sampling ratio is the
// shape's alpha = m/n, and when m < n the n - m missing eigenvalues of F^T F are the atom
// at zero that design.EmpiricalSV adds. The scale s is applied as for any other design.
//
// Special cases are: m or n below 1 and a length other than min(m, n) are a *ParamError
// of this package; values that design.EmpiricalSV refuses (negative, NaN, Inf, all zero,
// more than design.MaxValues) give its *param.Error.
func EmpiricalDesign(sv []float64, m, n int, s design.Scale) (design.Law, error) {
	switch {
	case m < 1:
		return nil, paramErr("rows", "must be at least 1, got %d", m)
	case n < 1:
		return nil, paramErr("cols", "must be at least 1, got %d", n)
	case len(sv) != min(m, n):
		return nil, paramErr("values", "a %d x %d matrix has %d singular values, got %d", m, n, min(m, n), len(sv))
	}
	return design.EmpiricalSV(float64(m)/float64(n), sv, s)
}
