package design

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/integrate/quad"
)

// gaussian is the Marchenko-Pastur law of an i.i.d. Gaussian design. Its part on lambda > 0
// is s times the standard law MP_c of ratio c <= 1 (mean 1, support [a, b] with
// a = (1 - sqrt c)^2 and b = (1 + sqrt c)^2, no atom): for alpha >= 1, c = 1/alpha and that
// part is all of nu; for alpha < 1 the nonzero eigenvalues of F^T F are those of F F^T,
// whose law is MP with ratio c = alpha, and nu adds the atom 1 - alpha at zero.
type gaussian struct {
	alpha, p0, q float64
	c, a, b      float64
	s, is, mean  float64 // scale of the nonzero part, its inverse, E_nu[lambda]
}

// Gaussian returns the Marchenko-Pastur law of F^T F for a design with i.i.d. Gaussian
// entries and sampling ratio alpha = m/n, scaled by s (AsGiven means entries N(0, 1/n), the
// same as Rows). Its transforms are closed forms (Marchenko & Pastur 1967; Bai & Silverstein
// 2010, Spectral Analysis of Large Dimensional Random Matrices, chapter 3), written so that
// every term is nonnegative.
// Special cases are: alpha = 1 has support reaching 0 and no atom, so S1, S2, S3 and W are
// +Inf at g = 0 while T = 1; alpha <= 0, NaN or Inf and an unknown scale give a *param.Error.
func Gaussian(alpha float64, s Scale) (Law, error) {
	if err := checkAlpha(alpha); err != nil {
		return nil, err
	}
	if err := checkScale(s); err != nil {
		return nil, err
	}
	p0, q := parts(alpha)
	// The standard law of (1/m) X^T X for an m x n matrix X of N(0, 1) entries has mean 1;
	// its nonzero part is MP_c scaled by 1 when alpha >= 1 and by n/m when alpha < 1.
	c, base := 1/alpha, 1.0
	if alpha < 1 {
		c, base = alpha, 1/alpha
	}
	f := s.factor(alpha, 1)
	if s == AsGiven {
		f = alpha
	}
	sc := math.Sqrt(c)
	return &gaussian{
		alpha: alpha, p0: p0, q: q,
		c: c, a: (1 - sc) * (1 - sc), b: (1 + sc) * (1 + sc),
		s: f * base, is: 1 / (f * base), mean: f,
	}, nil
}

func (l *gaussian) Alpha() float64 { return l.alpha }
func (l *gaussian) Mean() float64  { return l.mean }
func (l *gaussian) Atom0() float64 { return l.p0 }

// std returns the transforms of the standard law MP_c at h >= 0. With
// D = sqrt((h + a)(h + b)) and den = h + 1 - c + D, S1 = 2/den is the Stieltjes transform of
// Marchenko & Pastur 1967 at -h with its numerator rationalized; the others follow by
// differentiation and by rationalizing every difference of nearly equal terms.
func (l *gaussian) std(h float64) Transforms {
	c := l.c
	if h == 0 && c == 1 {
		inf := math.Inf(1)
		return Transforms{S1: inf, S2: inf, S3: inf, T: 1, W: inf, S2Pos: inf}
	}
	d := math.Sqrt(h+l.a) * math.Sqrt(h+l.b)
	oc := 1 - c
	iden := 1 / (h + oc + d)
	id := 1 / d
	s1 := 2 * iden
	s2 := s1 * s1 * (1 + (h+1+c)*id) / 2
	return Transforms{
		S1:    s1,
		S2:    s2,
		S3:    s1 * (d*oc + h*(1+c) + oc*oc) * id * iden,
		T:     (2*oc + 4*c*h/(d+h+oc)) * iden,
		W:     2 * c * id / (h + 1 + c + d),
		S2Pos: s2,
	}
}

func (l *gaussian) part(g float64) Transforms {
	is := l.is
	m := l.std(g * is)
	m.S1 *= is
	m.S2 *= is * is
	m.S2Pos = m.S2
	m.S3 *= is
	return m
}

func (l *gaussian) At(g float64) Transforms {
	m := l.part(g)
	if l.p0 == 0 {
		return m
	}
	return mix(l.p0, l.q, g, m)
}

func (l *gaussian) Stieltjes(g float64) (s1, s2 float64) {
	is, c := l.is, l.c
	h := g * is
	if h == 0 && c == 1 {
		return math.Inf(1), math.Inf(1)
	}
	d := math.Sqrt(h+l.a) * math.Sqrt(h+l.b)
	s1 = 2 / (h + (1 - c) + d)
	s2 = s1 * s1 * (1 + (h+1+c)/d) / 2
	s1 *= is
	s2 *= is * is
	if l.p0 > 0 {
		ig := 1 / g
		s1 = l.p0*ig + l.q*s1
		s2 = l.p0*ig*ig + l.q*s2
	}
	return s1, s2
}

func (l *gaussian) SingularValues(m, n int) []float64 {
	p := quantileProbs(m, n)
	if p == nil {
		return nil
	}
	lam := mpQuantiles(l.c, p)
	for i, v := range lam {
		lam[i] = math.Sqrt(l.s * v)
	}
	return lam
}

// mpQuantiles returns the quantiles at the probabilities p of the standard Marchenko-Pastur
// law MP_c, c <= 1. With lambda = a + (b - a) sin^2(theta/2) the distribution function has
// the smooth density (2/pi) sin^2 theta / ((1 - sqrt c)^2 + 4 sqrt c sin^2(theta/2)) in
// theta on [0, pi]; it is tabulated on cells by Gauss-Legendre and inverted in each cell by
// Newton's method guarded by bisection. For c near 1 the density rises from 0 to its bulk
// over a width of about 1 - sqrt c, so the first cell is graded towards 0.
func mpQuantiles(c float64, p []float64) []float64 {
	const cells, nodes = 256, 16
	var x, w [nodes]float64
	quad.Legendre{}.FixedLocations(x[:], w[:], -1, 1)
	sc := math.Sqrt(c)
	e := (1 - sc) * (1 - sc)
	dens := func(th float64) float64 {
		s, h := math.Sin(th), math.Sin(th/2)
		return 2 / math.Pi * s * s / (e + 4*sc*h*h)
	}
	integral := func(lo, hi float64) float64 {
		mid, half := (lo+hi)/2, (hi-lo)/2
		var sum float64
		for j, xj := range x {
			sum += w[j] * dens(mid+half*xj)
		}
		return sum * half
	}
	width := math.Pi / cells
	breaks := []float64{0}
	for t := width * 1e-10; t < width; t /= panelRatio {
		breaks = append(breaks, t)
	}
	for j := 1; j <= cells; j++ {
		breaks = append(breaks, float64(j)*width)
	}
	cdf := make([]float64, len(breaks))
	for j := 1; j < len(breaks); j++ {
		cdf[j] = cdf[j-1] + integral(breaks[j-1], breaks[j])
	}
	last := len(breaks) - 1
	total := cdf[last]
	a, b := (1-sc)*(1-sc), (1+sc)*(1+sc)
	out := make([]float64, len(p))
	for i, pi := range p {
		target := pi * total
		j, _ := slices.BinarySearch(cdf, target)
		j = max(0, min(j-1, last-1))
		lo, hi := breaks[j], breaks[j+1]
		th := lo + (hi-lo)*(target-cdf[j])/(cdf[j+1]-cdf[j])
		for range 60 {
			f := cdf[j] + integral(breaks[j], th) - target
			if math.Abs(f) <= 4*eps*total {
				break
			}
			if f > 0 {
				hi = th
			} else {
				lo = th
			}
			next := th - f/dens(th)
			if !(next > lo && next < hi) {
				next = (lo + hi) / 2
			}
			th = next
			if hi-lo <= eps*hi {
				break
			}
		}
		h := math.Sin(th / 2)
		out[i] = a + (b-a)*h*h
	}
	return out
}
