package design

import "math"

// atoms is a law nu = p0 delta_0 + sum_i w[i] delta_lam[i] with every lam[i] > 0 and
// p0 + sum_i w[i] = 1. It carries the empirical shape and the discretized continuous shapes;
// its transforms are finite sums, exact for the discrete law. The sums run in blocks whose
// partial sums are then added, so that rounding grows like block + len/block rather than
// like len (blocked summation; Higham 2002, Accuracy and Stability of Numerical Algorithms,
// section 4.2).
type atoms struct {
	alpha, mean, p0 float64
	lam, w          []float64
	cell            *flatCell // a part near 0 in closed form, or nil
}

// flatCell is the part of a uniform shape's law on [0, top] (lambda, after scaling), of total
// mass mass, whose density is flat in lambda (sv false) or in sigma = sqrt(lambda) (sv true):
// below the graded panels of a shape whose support reaches 0, where the transforms'
// integrands vary on the scale g however small g is. Its parts of the transforms are
// elementary integrals (docs/method.md section 5).
type flatCell struct {
	sv        bool
	top, mass float64
}

// sums returns the cell's parts of S1, S2, S3 and T at g >= 0, and of E[(l/(l+g))^2].
//
// Flat in lambda, with u = top/g: S1 = mass log1p(u)/top, S2 = mass/(g (top + g)),
// S3 = mass (log1p(u) - u/(1+u))/top, T = mass (u - log1p(u))/u. Flat in sigma, with
// x = sqrt(top/g): S1 = mass (atan(x)/x)/g, S2 = mass (1/(top + g) + (atan(x)/x)/g)/(2g),
// S3 = mass (atan(x)/x - 1/(1+x^2))/(2g), T = mass (1 - atan(x)/x). The differences are
// taken from their series where they cancel (cellSeries). E[(l/(l+g))^2] = T - g S3.
func (c *flatCell) sums(g float64) (s1, s2, s3, t, tt float64) {
	m := c.mass
	if g == 0 {
		inf := math.Inf(1)
		return inf, inf, inf, m, m
	}
	if !c.sv {
		u := c.top / g
		l := math.Log1p(u)
		a, b := u-l, l-u/(1+u)
		if u < 0.05 {
			a, b = cellSeries(u, false)
		}
		s1, s2, s3, t = m*l/c.top, m/(g*(c.top+g)), m*b/c.top, m*a/u
		return s1, s2, s3, t, math.Max(0, t-g*s3)
	}
	x := math.Sqrt(c.top / g)
	r := math.Atan(x) / x
	j, k := 1-r, r-1/(1+x*x)
	if x < 0.2 {
		j, k = cellSeries(x, true)
	}
	s1 = m * r / g
	s2 = m * (1/(c.top+g) + r/g) / (2 * g)
	s3 = m * k / (2 * g)
	t = m * j
	return s1, s2, s3, t, math.Max(0, t-g*s3)
}

// cellSeries returns, for sv false, u - log1p(u) = sum_{k>=2} (-1)^k u^k/k and
// log1p(u) - u/(1+u) = sum_{k>=2} (-1)^k (k-1)/k u^k (u < 0.05: 16 terms reach rounding);
// for sv true, 1 - atan(x)/x = sum_{k>=1} (-1)^(k+1) x^(2k)/(2k+1) and
// atan(x)/x - 1/(1+x^2) = sum_{k>=1} (-1)^(k+1) 2k/(2k+1) x^(2k) (x < 0.2: 16 terms).
func cellSeries(u float64, sv bool) (a, b float64) {
	step := u // the ratio of successive powers
	if sv {
		step = u * u
	}
	p, sign := u*u, 1.0
	for k := 1; k <= 16; k++ {
		if sv {
			a += sign * p / float64(2*k+1)
			b += sign * p * float64(2*k) / float64(2*k+1)
		} else {
			n := float64(k + 1)
			a += sign * p / n
			b += sign * p * (n - 1) / n
		}
		p *= step
		sign = -sign
	}
	return a, b
}

const block = 256

func (d *atoms) Alpha() float64 { return d.alpha }
func (d *atoms) Mean() float64  { return d.mean }
func (d *atoms) Atom0() float64 { return d.p0 }

func (d *atoms) Stieltjes(g float64) (s1, s2 float64) {
	for i := 0; i < len(d.lam); i += block {
		j := min(i+block, len(d.lam))
		a, b := stieltjesSums(g, d.lam[i:j], d.w[i:j])
		s1 += a
		s2 += b
	}
	if d.cell != nil {
		a, b, _, _, _ := d.cell.sums(g)
		s1 += a
		s2 += b
	}
	if d.p0 > 0 {
		s1 += d.p0 / g
		s2 += d.p0 / g / g
	}
	return s1, s2
}

func stieltjesSums(g float64, lam, w []float64) (s1, s2 float64) {
	w = w[:len(lam)]
	for i, l := range lam {
		r := 1 / (l + g)
		wr := w[i] * r
		s1 += wr
		s2 += wr * r
	}
	return s1, s2
}

// At sums over the atoms. The variance behind W is a centered second pass with the
// correction term of the corrected two-pass algorithm (Chan, Golub & LeVeque 1983, The
// American Statistician 37(3)). It is centered in the variable that keeps the deviations
// well conditioned: 1/(l+g) - S1 while g S1 <= 1/2, and otherwise l/(l+g) - T, using
// Var[1/(l+g)] = Var[l/(l+g)]/g^2; the two forms lose eps g S1/T and eps T/(g S1) of the
// deviations respectively.
func (d *atoms) At(g float64) Transforms {
	var s1p, s2p, s3, t float64
	for i := 0; i < len(d.lam); i += block {
		j := min(i+block, len(d.lam))
		a, b, c, e := atSums(g, d.lam[i:j], d.w[i:j])
		s1p += a
		s2p += b
		s3 += c
		t += e
	}
	var cs1, cs2, ct, ctt float64
	if d.cell != nil {
		var c3 float64
		cs1, cs2, c3, ct, ctt = d.cell.sums(g)
		s1p += cs1
		s2p += cs2
		s3 += c3
		t += ct
	}
	p0 := d.p0
	s1, s2 := s1p, s2p
	if p0 > 0 {
		s1 += p0 / g
		s2 += p0 / g / g
	}
	gs1 := p0 + g*s1p
	var sd, sdd, norm float64
	inT := gs1 > 0.5
	if p0 > 0 {
		if inT {
			sd, sdd = -p0*t, p0*t*t
		} else {
			d0 := t / g
			sd, sdd = p0*d0, p0*d0*d0
		}
	}
	for i := 0; i < len(d.lam); i += block {
		j := min(i+block, len(d.lam))
		var a, b float64
		if inT {
			a, b = devSumsT(g, t, d.lam[i:j], d.w[i:j])
		} else {
			a, b = devSums(g, s1, d.lam[i:j], d.w[i:j])
		}
		sd += a
		sdd += b
	}
	if c := d.cell; c != nil {
		// The cell's deviations from its parts: sum w (x - mu) and sum w (x - mu)^2.
		if inT {
			sd += ct - t*c.mass
			sdd += ctt - 2*t*ct + t*t*c.mass
		} else {
			sd += cs1 - s1*c.mass
			sdd += cs2 - 2*s1*cs1 + s1*s1*c.mass
		}
	}
	norm = s1
	if inT {
		norm = gs1
	}
	return Transforms{
		S1:    s1,
		S2:    s2,
		S3:    s3,
		T:     t,
		W:     max(0, sdd-sd*sd) / (norm * norm),
		S2Pos: s2p,
	}
}

func atSums(g float64, lam, w []float64) (s1, s2, s3, t float64) {
	w = w[:len(lam)]
	for i, l := range lam {
		r := 1 / (l + g)
		wr := w[i] * r
		s1 += wr
		s2 += wr * r
		wt := wr * l
		t += wt
		s3 += wt * r
	}
	return s1, s2, s3, t
}

// devSums returns the weighted sum and sum of squares of 1/(l+g) - s1.
func devSums(g, s1 float64, lam, w []float64) (sd, sdd float64) {
	w = w[:len(lam)]
	for i, l := range lam {
		dev := 1/(l+g) - s1
		wd := w[i] * dev
		sd += wd
		sdd += wd * dev
	}
	return sd, sdd
}

// devSumsT returns the weighted sum and sum of squares of l/(l+g) - t.
func devSumsT(g, t float64, lam, w []float64) (sd, sdd float64) {
	w = w[:len(lam)]
	for i, l := range lam {
		dev := l/(l+g) - t
		wd := w[i] * dev
		sd += wd
		sdd += wd * dev
	}
	return sd, sdd
}
