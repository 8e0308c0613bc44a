package design

import "math"

// rescaled is the law of lambda/c for a law of lambda: the solver's units, in which the mean
// eigenvalue is 1 (docs/method.md section 3).
type rescaled struct {
	base Law
	c    float64
	// own holds the atoms of a law held as atoms, divided by c once: its transforms are then
	// summed in the new units. Summed in the old ones and multiplied after, S2 = E[1/(l+g)^2]
	// overflows for eigenvalues below about 1e-154 (a singular value of 1e-134 given as is)
	// and the product with c^2 is Inf * 0.
	own *atoms
}

// asAtoms is a law held as atoms (the empirical and the discretized continuous shapes).
type asAtoms interface{ atomsOf() *atoms }

func (d *atoms) atomsOf() *atoms { return d }

// divided returns the atoms of the law of lambda/c.
func (d *atoms) divided(c float64) *atoms {
	out := &atoms{alpha: d.alpha, mean: d.mean / c, p0: d.p0, lam: make([]float64, len(d.lam)), w: d.w}
	for i, l := range d.lam {
		out.lam[i] = l / c
	}
	if d.cell != nil {
		out.cell = &flatCell{sv: d.cell.sv, top: d.cell.top / c, mass: d.cell.mass}
	}
	return out
}

// Rescaled returns the law of lambda/c (c > 0 finite) for the law l of lambda: its transforms
// are those of l at c g, S1 and S3 times c and S2 times c^2. SingularValues are divided by
// sqrt(c).
//
// Special cases are: c = 1 returns l itself.
func Rescaled(l Law, c float64) Law {
	if c == 1 {
		return l
	}
	r := rescaled{base: l, c: c}
	if a, ok := l.(asAtoms); ok {
		r.own = a.atomsOf().divided(c)
	}
	return r
}

func (l rescaled) At(g float64) Transforms {
	if l.own != nil {
		return l.own.At(g)
	}
	t := l.base.At(l.c * g)
	c := l.c
	return Transforms{S1: c * t.S1, S2: c * c * t.S2, S3: c * t.S3, T: t.T, W: t.W, S2Pos: c * c * t.S2Pos}
}

func (l rescaled) Stieltjes(g float64) (s1, s2 float64) {
	if l.own != nil {
		return l.own.Stieltjes(g)
	}
	a, b := l.base.Stieltjes(l.c * g)
	return l.c * a, l.c * l.c * b
}

func (l rescaled) Atom0() float64 { return l.base.Atom0() }
func (l rescaled) Mean() float64 {
	if l.own != nil {
		return l.own.mean
	}
	return l.base.Mean() / l.c
}
func (l rescaled) Alpha() float64    { return l.base.Alpha() }
func (l rescaled) ReachesZero() bool { return ReachesZero(l.base) }

func (l rescaled) SingularValues(m, n int) []float64 {
	sv := l.base.SingularValues(m, n)
	for i := range sv {
		sv[i] /= math.Sqrt(l.c)
	}
	return sv
}

// ReachesZero reports whether the nonzero eigenvalues of l come arbitrarily close to 0 with a
// density there, so that E[1/lambda] over them is infinite although a discretized law has a
// finite S1(0): the uniform shapes with min = 0 and the Gaussian shape at alpha = 1.
// Least squares on such a design has an infinite error whenever there is noise.
func ReachesZero(l Law) bool {
	if z, ok := l.(interface{ ReachesZero() bool }); ok {
		return z.ReachesZero()
	}
	return false
}

func (l *uniformSV) ReachesZero() bool { return l.lo == 0 }
func (l *uniformEV) ReachesZero() bool { return l.lo == 0 }
func (l *gaussian) ReachesZero() bool  { return l.a == 0 }

// Spread returns the ratio of the largest to the smallest nonzero eigenvalue of a law held
// as atoms (the empirical and the discretized continuous shapes), or 1 for the closed-form
// shapes, whose transforms keep their accuracy at any spread.
func Spread(l Law) float64 {
	if s, ok := l.(interface{ spread() float64 }); ok {
		return s.spread()
	}
	return 1
}

func (l rescaled) spread() float64 { return Spread(l.base) }

func (d *atoms) spread() float64 {
	lo, hi := math.Inf(1), 0.0
	for _, x := range d.lam {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	if hi == 0 {
		return 1
	}
	return hi / lo
}

// The uniform shapes state their spread from their bounds: their atoms are Gauss nodes
// inside the panels, so that they alone understate it. A lower bound of 0 is the case of
// ReachesZero instead.
func (l *uniformSV) spread() float64 {
	if l.lo == 0 {
		return 1
	}
	return (l.hi / l.lo) * (l.hi / l.lo)
}

func (l *uniformEV) spread() float64 {
	if l.lo == 0 {
		return 1
	}
	return l.hi / l.lo
}
