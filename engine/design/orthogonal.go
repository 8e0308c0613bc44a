package design

import "math"

// orthogonal is nu = p0 delta_0 + q delta_lam: every nonzero singular value equals sqrt(lam).
type orthogonal struct {
	alpha, p0, q, lam float64
}

// Orthogonal returns the law of F^T F for a design whose nonzero singular values are all
// equal: row-orthogonal when alpha <= 1, column-orthogonal when alpha > 1. The nonzero
// eigenvalue is fixed by the scale: Rows gives 1 when alpha <= 1 (F F^T = I) and alpha when
// alpha > 1, Columns gives 1/alpha and 1, AsGiven gives 1. All transforms are closed forms
// over the two atoms.
// Special cases are: for alpha >= 1 there is no atom at zero and W = 0; alpha <= 0, NaN or
// Inf and an unknown scale give a *param.Error.
func Orthogonal(alpha float64, s Scale) (Law, error) {
	if err := checkAlpha(alpha); err != nil {
		return nil, err
	}
	if err := checkScale(s); err != nil {
		return nil, err
	}
	p0, q := parts(alpha)
	return &orthogonal{alpha: alpha, p0: p0, q: q, lam: s.factor(alpha, q)}, nil
}

func (l *orthogonal) Alpha() float64 { return l.alpha }
func (l *orthogonal) Mean() float64  { return l.q * l.lam }
func (l *orthogonal) Atom0() float64 { return l.p0 }

func (l *orthogonal) At(g float64) Transforms {
	r := 1 / (l.lam + g)
	m := Transforms{S1: r, S2: r * r, S3: l.lam * r * r, T: l.lam * r, S2Pos: r * r}
	if l.p0 == 0 {
		return m
	}
	return mix(l.p0, l.q, g, m)
}

func (l *orthogonal) Stieltjes(g float64) (s1, s2 float64) {
	r := 1 / (l.lam + g)
	if l.p0 == 0 {
		return r, r * r
	}
	ig := 1 / g
	return l.p0*ig + l.q*r, l.p0*ig*ig + l.q*r*r
}

func (l *orthogonal) SingularValues(m, n int) []float64 {
	k := min(m, n)
	if k < 1 {
		return nil
	}
	out := make([]float64, k)
	sv := math.Sqrt(l.lam)
	for i := range out {
		out[i] = sv
	}
	return out
}
