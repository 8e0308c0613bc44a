package design

import (
	"errors"
	"math"
	"testing"

	"hdrisk/engine/param"
)

// TestInverseS1RoundTrip solves S1(g) = S1(g0) over a log grid of g0 for every shape. The
// residual must be at rounding level, and g must match g0 to the accuracy that the slope
// allows: a relative error eps in S1 moves g by eps S1/S2 (first-order perturbation, common
// practice).
func TestInverseS1RoundTrip(t *testing.T) {
	for _, c := range cases() {
		l, err := c.make()
		if err != nil {
			t.Fatal(err)
		}
		for e := -8.0; e <= 8; e++ {
			g0 := math.Pow(10, e) * l.Mean()
			v, s2 := l.Stieltjes(g0)
			g, err := InverseS1(l, v)
			if err != nil {
				t.Errorf("%s g0=%g: %v", c.name, g0, err)
				continue
			}
			back, _ := l.Stieltjes(g)
			if !close(back, v, 8*eps) {
				t.Errorf("%s g0=%g: S1(g) = %.17g, want %.17g", c.name, g0, back, v)
			}
			if tol := 1e-13*g0 + 16*eps*v/s2; math.Abs(g-g0) > tol {
				t.Errorf("%s g0=%g: g = %.17g (error %.2g, allowed %.2g)", c.name, g0, g, math.Abs(g-g0), tol)
			}
		}
	}
}

// TestInverseS1Reach checks the ends: without an atom at zero v = S1(0) gives g = 0 and a
// larger v is refused; with an atom every v > 0 is reached, and g ~ p0/v for large v.
func TestInverseS1Reach(t *testing.T) {
	l, err := Gaussian(2, Rows)
	if err != nil {
		t.Fatal(err)
	}
	s0 := l.At(0).S1 // 1/(alpha - 1) = 1 (Muirhead 1982, see TestGaussianInverseWishart)
	if g, err := InverseS1(l, s0); err != nil || g != 0 {
		t.Errorf("v = S1(0): g = %v, err = %v", g, err)
	}
	if g, err := InverseS1(l, s0*(1+1e-14)); err != nil || g != 0 {
		t.Errorf("v just above S1(0) by rounding: g = %v, err = %v", g, err)
	}
	_, err = InverseS1(l, 1.1*s0)
	var pe *param.Error
	if !errors.As(err, &pe) || pe.Field != "v" {
		t.Errorf("v beyond reach: err = %v", err)
	}
	for _, mk := range []func() (Law, error){
		func() (Law, error) { return Gaussian(0.5, Rows) },
		func() (Law, error) { return Orthogonal(0.5, Columns) },
		func() (Law, error) { return EmpiricalSV(2, []float64{0, 1, 2}, AsGiven) },
	} {
		l, err := mk()
		if err != nil {
			t.Fatal(err)
		}
		for _, v := range []float64{1e-6, 1, 1e6, 1e12} {
			g, err := InverseS1(l, v)
			if err != nil || g <= 0 {
				t.Fatalf("atom %v, v=%v: g = %v, err = %v", l.Atom0(), v, g, err)
			}
			if s1, _ := l.Stieltjes(g); !close(s1, v, 4*eps) {
				t.Errorf("atom %v, v=%v: S1(g) = %v", l.Atom0(), v, s1)
			}
		}
		if g, _ := InverseS1(l, 1e12); !close(g, l.Atom0()/1e12, 1e-6) {
			t.Errorf("atom %v: g = %v at v = 1e12, want about p0/v", l.Atom0(), g)
		}
	}
	for _, v := range []float64{0, -1, math.NaN(), math.Inf(1)} {
		if _, err := InverseS1(l, v); !errors.As(err, &pe) || pe.Field != "v" {
			t.Errorf("v=%v: err = %v", v, err)
		}
	}
}
