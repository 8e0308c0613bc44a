package design

// atoms is a law nu = p0 delta_0 + sum_i w[i] delta_lam[i] with every lam[i] > 0 and
// p0 + sum_i w[i] = 1. It carries the empirical shape and the discretized continuous shapes;
// its transforms are finite sums, exact for the discrete law. The sums run in blocks whose
// partial sums are then added, so that rounding grows like block + len/block rather than
// like len (blocked summation; Higham 2002, Accuracy and Stability of Numerical Algorithms,
// section 4.2).
type atoms struct {
	alpha, mean, p0 float64
	lam, w          []float64
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
