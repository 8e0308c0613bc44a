package design

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// lawCase is one law under test with the moments of its unscaled nonzero part:
// e1 = E[sigma^2] and e2 = E[sigma^4] over the law of the nonzero singular values (or the
// eigenvalues of F^T F on lambda > 0), from which the scaled E_nu[lambda] and E_nu[lambda^2]
// follow; zero gives the atom at zero that the shape adds beyond max(0, 1 - alpha).
type lawCase struct {
	name       string
	alpha      float64
	scale      Scale
	make       func() (Law, error)
	e1, e2     float64
	extraZero  float64
	givenScale float64 // factor of AsGiven relative to the unscaled moments
	touches0   bool    // the support of the nonzero part reaches 0
}

// cases covers every shape at sampling ratios below, at and above 1, in every scale.
func cases() []lawCase {
	var out []lawCase
	rng := rand.New(rand.NewPCG(1, 2))
	many := make([]float64, MaxValues)
	for i := range many {
		many[i] = 0.1 + 3*rng.Float64()
	}
	var e1, e2 float64
	for _, v := range many {
		e1 += v * v / MaxValues
		e2 += v * v * v * v / MaxValues
	}
	for _, alpha := range []float64{0.3, 1, 2.5} {
		for _, s := range []Scale{Rows, Columns, AsGiven} {
			a, s := alpha, s
			tag := fmt.Sprintf("alpha=%v/%v", a, s)
			// Moments of Marchenko-Pastur with y = 1/alpha: E l = 1, E l^2 = 1 + y for the
			// law of (1/m) X^T X (Bai & Silverstein 2010, Lemma 3.1); as a law of the nonzero
			// part of weight min(1, alpha) these are 1/q and (1 + y)/q.
			_, q := parts(a)
			out = append(out,
				lawCase{"gaussian/" + tag, a, s, func() (Law, error) { return Gaussian(a, s) },
					1 / q, (1 + 1/a) / q, 0, a, a == 1},
				lawCase{"orthogonal/" + tag, a, s, func() (Law, error) { return Orthogonal(a, s) },
					1, 1, 0, 1, false},
				// uniform sigma on [0.5, 2]: E s^2 = (a^2 + ab + b^2)/3, E s^4 = (b^5 - a^5)/(5(b - a)).
				lawCase{"uniform-sv/" + tag, a, s, func() (Law, error) { return UniformSV(a, 0.5, 2, s) },
					(0.25 + 1 + 4) / 3, (32 - 0.03125) / 7.5, 0, 1, false},
				lawCase{"uniform-sv-from-0/" + tag, a, s, func() (Law, error) { return UniformSV(a, 0, 2, s) },
					4.0 / 3, 32.0 / 10, 0, 1, true},
				// uniform lambda on [0, 3]: E l = 3/2, E l^2 = 3.
				lawCase{"uniform-ev/" + tag, a, s, func() (Law, error) { return UniformEV(a, 0, 3, s) },
					1.5, 3, 0, 1, true},
				lawCase{"uniform-ev-point/" + tag, a, s, func() (Law, error) { return UniformEV(a, 2, 2, s) },
					2, 4, 0, 1, false},
				// log sigma uniform on [-L, 0]: E s^2 = (1 - e^-2L)/(2L), E s^4 = (1 - e^-4L)/(4L).
				lawCase{"geometric-sv-1e4/" + tag, a, s, func() (Law, error) { return GeometricSV(a, 1e4, s) },
					(1 - 1e-8) / (2 * math.Log(1e4)), (1 - 1e-16) / (4 * math.Log(1e4)), 0, 1, false},
				lawCase{"empirical-one/" + tag, a, s, func() (Law, error) { return EmpiricalSV(a, []float64{1.7}, s) },
					1.7 * 1.7, math.Pow(1.7, 4), 0, 1, false},
				lawCase{"empirical-zeros/" + tag, a, s, func() (Law, error) { return EmpiricalSV(a, []float64{0, 3, 1, 0}, s) },
					2.5, 20.5, 0.5, 1, false},
			)
			if s == Rows {
				out = append(out, lawCase{"empirical-100000/" + tag, a, s, func() (Law, error) { return EmpiricalSV(a, many, s) },
					e1, e2, 0, 1, false})
			}
		}
	}
	return out
}

// moments returns E_nu[lambda], E_nu[lambda^2] and nu({0}) of the scaled law of c.
func (c lawCase) moments() (m1, m2, atom float64) {
	p0, q := parts(c.alpha)
	atom = p0 + q*c.extraZero
	var f float64
	switch c.scale {
	case Rows:
		f = c.alpha / (q * c.e1)
	case Columns:
		f = 1 / (q * c.e1)
	default:
		f = c.givenScale
	}
	return f * q * c.e1, f * f * q * c.e2, atom
}

// TestMeanAndAtom checks the scale conventions of docs/method.md section 1 (common practice:
// E_nu[lambda] = alpha for rows, 1 for columns) and nu({0}) = max(0, 1 - alpha) plus the
// zero singular values given.
func TestMeanAndAtom(t *testing.T) {
	for _, c := range cases() {
		l, err := c.make()
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		m1, _, atom := c.moments()
		switch c.scale {
		case Rows:
			m1 = c.alpha
		case Columns:
			m1 = 1
		}
		if !close(l.Mean(), m1, 1e-12) {
			t.Errorf("%s: Mean = %v, want %v", c.name, l.Mean(), m1)
		}
		if !close(l.Atom0(), atom, 1e-14) {
			t.Errorf("%s: Atom0 = %v, want %v", c.name, l.Atom0(), atom)
		}
		if l.Alpha() != c.alpha {
			t.Errorf("%s: Alpha = %v", c.name, l.Alpha())
		}
		// The transforms see the same mean: T(g) g -> E lambda as g -> infinity.
		g := 1e12 * m1
		if got := l.At(g).T * g; !close(got, m1, 1e-9) {
			t.Errorf("%s: g T(g) at g=%g is %v, want %v", c.name, g, got, m1)
		}
	}
}

// TestIdentities checks T + g S1 = 1, S3 + g S2 = S1, S1^2 (1 + W) = S2 and
// S2Pos + nu({0})/g^2 = S2 (definitions in docs/method.md section 2) from 1e-10 to 1e10 times
// the mean eigenvalue. Written as sums of nonnegative terms they are well conditioned at
// every g, so each side is held to a few rounding errors; S1 and T must decrease.
func TestIdentities(t *testing.T) {
	for _, c := range cases() {
		l, err := c.make()
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		prev := Transforms{S1: math.Inf(1), T: math.Inf(1)}
		for e := -10.0; e <= 10; e += 0.5 {
			g := math.Pow(10, e) * l.Mean()
			x := l.At(g)
			for _, v := range []float64{x.S1, x.S2, x.S3, x.T, x.W, x.S2Pos} {
				if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
					t.Fatalf("%s g=%g: %+v", c.name, g, x)
				}
			}
			checks := []struct {
				n         string
				got, want float64
				tol       float64
			}{
				{"T + g S1", x.T + g*x.S1, 1, 1e-14},
				{"S3 + g S2", x.S3 + g*x.S2, x.S1, 1e-13},
				{"S1^2 (1 + W)", x.S1 * x.S1 * (1 + x.W), x.S2, 1e-13},
				{"S2Pos + atom/g^2", x.S2Pos + l.Atom0()/g/g, x.S2, 1e-13},
			}
			for _, k := range checks {
				if !close(k.got, k.want, k.tol) {
					t.Errorf("%s g=%g: %s = %.17g, want %.17g", c.name, g, k.n, k.got, k.want)
				}
			}
			s1, s2 := l.Stieltjes(g)
			if !close(s1, x.S1, 1e-14) || !close(s2, x.S2, 1e-14) {
				t.Errorf("%s g=%g: Stieltjes = %v, %v; At gives %v, %v", c.name, g, s1, s2, x.S1, x.S2)
			}
			if x.S1 > prev.S1 || x.T > prev.T {
				t.Errorf("%s g=%g: S1 or T not monotone", c.name, g)
			}
			prev = x
		}
	}
}

// TestLargeG checks the expansions in 1/g of docs/method.md section 2 (common practice: expand
// 1/(l + g) in powers of l/g): g T = E l - E l^2/g + O(g^-2), g^2 S3 = E l - 2 E l^2/g +
// O(g^-2), g^2 W = Var l + O(1/g). At g = 1e8 times the mean, a T or S3 formed by a
// subtraction would be wrong in the eighth digit and a W formed as S2/S1^2 - 1 in the first;
// at 1e12 a W centered on 1/(l + g) would be wrong in the fourth. The forms here must hold
// to 1e-12 (T, S3) and 1e-6, 1e-9 (W).
func TestLargeG(t *testing.T) {
	for _, c := range cases() {
		l, err := c.make()
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		m1, m2, _ := c.moments()
		for _, k := range []struct{ g, tolW float64 }{{1e8, 1e-6}, {1e12, 1e-9}} {
			g := k.g * m1
			x := l.At(g)
			if got, want := g*x.T, m1-m2/g; !close(got, want, 1e-12) {
				t.Errorf("%s g=%g: g T = %.17g, want %.17g", c.name, g, got, want)
			}
			if got, want := g*g*x.S3, m1-2*m2/g; !close(got, want, 1e-12) {
				t.Errorf("%s g=%g: g^2 S3 = %.17g, want %.17g", c.name, g, got, want)
			}
			if got := g * x.S1; !close(got, 1, 2e-8) {
				t.Errorf("%s g=%g: g S1 = %.17g, want about 1", c.name, g, got)
			}
			v := m2 - m1*m1
			if v < 1e-12*m1*m1 {
				if x.W > 1e-24 {
					t.Errorf("%s g=%g: W = %v for a law of a single value", c.name, g, x.W)
				}
				continue
			}
			if got := g * g * x.W; !close(got, v, k.tolW) {
				t.Errorf("%s g=%g: g^2 W = %.17g, want Var = %.17g", c.name, g, got, v)
			}
		}
	}
}

// TestSmallG checks the limits as g -> 0: with an atom p0 at zero, g S1 -> p0,
// g^2 S2 -> p0 and W -> (1 - p0)/p0 (the variance of 1/(l + g) is then carried by the
// atom); without one, the transforms tend to the finite values that At(0) returns whenever
// E[1/l^2] is finite (the support stays away from 0).
func TestSmallG(t *testing.T) {
	for _, c := range cases() {
		l, err := c.make()
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		p0 := l.Atom0()
		g := 1e-16 * l.Mean()
		x := l.At(g)
		if p0 > 0 {
			if !close(g*x.S1, p0, 1e-6) || !close(g*g*x.S2, p0, 1e-6) || !close(x.W, (1-p0)/p0, 1e-5) {
				t.Errorf("%s: g S1 = %v, g^2 S2 = %v, W = %v; atom %v", c.name, g*x.S1, g*g*x.S2, x.W, p0)
			}
			continue
		}
		if c.touches0 {
			continue
		}
		z := l.At(0)
		if !close(x.S1, z.S1, 1e-6) || !close(x.S2, z.S2, 1e-6) || !close(x.W, z.W, 1e-6) || !close(z.T, 1, 1e-14) {
			t.Errorf("%s: At(%g) = %+v, At(0) = %+v", c.name, g, x, z)
		}
	}
}
