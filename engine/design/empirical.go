package design

import (
	"fmt"
	"math"
	"slices"

	"hdrisk/engine/param"
)

// MaxValues is the largest number of singular values EmpiricalSV accepts.
const MaxValues = 100000

// empirical keeps the user's singular values (scaled, increasing) for its quantiles.
type empirical struct {
	atoms
	sv []float64
}

// EmpiricalSV returns the law of F^T F whose nonzero part is the empirical law of the given
// singular values: atoms at f values[i]^2 of weight min(1, alpha)/len(values), where f is the
// factor of the scale, plus the atom max(0, 1 - alpha) at zero. Zero values are allowed and
// add to the atom at zero; equal values are merged into one atom; order does not matter.
// Special cases are: an empty list, more than MaxValues values, a negative, NaN or Inf value,
// all values zero, a value whose square overflows under AsGiven (the other scales divide by
// the largest value first), alpha <= 0 and an unknown scale give a *param.Error.
func EmpiricalSV(alpha float64, values []float64, s Scale) (Law, error) {
	if err := checkAlpha(alpha); err != nil {
		return nil, err
	}
	if err := checkScale(s); err != nil {
		return nil, err
	}
	k := len(values)
	if k == 0 {
		return nil, &param.Error{Field: "values", Reason: "empty: give at least one singular value"}
	}
	if k > MaxValues {
		return nil, &param.Error{Field: "values", Reason: fmt.Sprintf("%d values exceed the cap of %d", k, MaxValues)}
	}
	sv := slices.Clone(values)
	for i, v := range sv {
		if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
			return nil, &param.Error{Field: "values", Reason: fmt.Sprintf("entry %d is %v: singular values must be finite and nonnegative", i, v)}
		}
		if s == AsGiven && math.IsInf(v*v, 0) {
			return nil, &param.Error{Field: "values", Reason: fmt.Sprintf("entry %d is %v: its square overflows", i, v)}
		}
	}
	slices.Sort(sv)
	if sv[k-1] == 0 {
		return nil, &param.Error{Field: "values", Reason: "all zero: the design would carry no information"}
	}
	p0, q := parts(alpha)
	// The mean of the squares, relative to the largest value so that it cannot underflow.
	top := sv[k-1]
	var m2 float64
	for _, v := range sv {
		r := v / top
		m2 += r * r
	}
	m2 /= float64(k)
	// f multiplies the squared values; fr is f times top^2, applied to squared ratios.
	fr := s.factor(alpha, q*m2)
	if s == AsGiven {
		fr = top * top
	}
	// Weights are counts times q/k, so that equal values merge without rounding drift.
	d := atoms{alpha: alpha, mean: fr * q * m2, p0: p0}
	var zeros int
	var counts []int
	for _, v := range sv {
		r := v / top
		lam := fr * r * r
		switch {
		case lam == 0:
			zeros++
		case len(d.lam) > 0 && d.lam[len(d.lam)-1] == lam:
			counts[len(counts)-1]++
		default:
			d.lam = append(d.lam, lam)
			counts = append(counts, 1)
		}
	}
	d.p0 += q * float64(zeros) / float64(k)
	d.w = make([]float64, len(counts))
	for i, c := range counts {
		d.w[i] = q * float64(c) / float64(k)
	}
	rf := math.Sqrt(fr) / top
	for i, v := range sv {
		sv[i] = rf * v
	}
	return &empirical{atoms: d, sv: sv}, nil
}

// SingularValues returns the quantiles of the empirical law of the scaled values (the
// left-continuous inverse of its distribution function); for min(m, n) = len(values) they
// are the values themselves, sorted.
func (l *empirical) SingularValues(m, n int) []float64 {
	p := quantileProbs(m, n)
	k := len(l.sv)
	for i, pi := range p {
		j := int(math.Ceil(pi*float64(k))) - 1
		p[i] = l.sv[max(0, min(k-1, j))]
	}
	return p
}
