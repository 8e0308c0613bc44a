package design

// atoms is a law nu = p0 delta_0 + sum_i w[i] delta_lam[i] with every lam[i] > 0 and
// p0 + sum_i w[i] = 1. It carries the empirical shape and the discretized continuous shapes;
// its transforms are finite sums, exact for the discrete law.
type atoms struct {
	alpha, mean, p0 float64
	lam, w          []float64
}

func (d *atoms) Alpha() float64 { return d.alpha }
func (d *atoms) Mean() float64  { return d.mean }
func (d *atoms) Atom0() float64 { return d.p0 }

func (d *atoms) Stieltjes(g float64) (s1, s2 float64) {
	w := d.w[:len(d.lam)]
	for i, l := range d.lam {
		r := 1 / (l + g)
		wr := w[i] * r
		s1 += wr
		s2 += wr * r
	}
	if d.p0 > 0 {
		s1 += d.p0 / g
		s2 += d.p0 / g / g
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
	w := d.w[:len(d.lam)]
	var s1p, s2p, s3, t float64
	for i, l := range d.lam {
		r := 1 / (l + g)
		wr := w[i] * r
		s1p += wr
		s2p += wr * r
		wt := wr * l
		t += wt
		s3 += wt * r
	}
	p0 := d.p0
	s1, s2 := s1p, s2p
	if p0 > 0 {
		s1 += p0 / g
		s2 += p0 / g / g
	}
	gs1 := p0 + g*s1p
	var sd, sdd, norm float64
	if gs1 <= 0.5 {
		if p0 > 0 {
			d0 := t / g
			sd, sdd = p0*d0, p0*d0*d0
		}
		for i, l := range d.lam {
			dev := 1/(l+g) - s1
			wd := w[i] * dev
			sd += wd
			sdd += wd * dev
		}
		norm = s1
	} else {
		if p0 > 0 {
			sd, sdd = -p0*t, p0*t*t
		}
		for i, l := range d.lam {
			dev := l/(l+g) - t
			wd := w[i] * dev
			sd += wd
			sdd += wd * dev
		}
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
