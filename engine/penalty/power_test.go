package penalty

import (
	"math"
	"math/big"
	"testing"
)

// TestPowOf checks the products and square roots that stand for math.Pow in Branch against
// the same powers in 200-bit arithmetic (math/big), from subnormal u to u near the overflow of
// u^2: within 2 units in the last place, as accurate as math.Pow or more (math.Pow(1e150, 1.5)
// is 6e-15 off). Other exponents are math.Pow exactly.
func TestPowOf(t *testing.T) {
	exact := func(u, y float64) float64 {
		b := new(big.Float).SetPrec(200).SetFloat64(u)
		r := new(big.Float).SetPrec(200)
		switch y {
		case 2:
			r.Mul(b, b)
		case 1.5:
			r.Mul(b, new(big.Float).SetPrec(200).Sqrt(b))
		}
		f, _ := r.Float64()
		return f
	}
	for _, y := range []float64{2, 1.5} {
		for _, u := range []float64{5e-324, 1e-300, 1e-160, 1e-8, 0.3, 1, 2, 7.5, 1e10, 1e150} {
			got, want := powOf(u, y), exact(u, y)
			if math.Abs(got-want) > 2*ulp(want) {
				t.Errorf("powOf(%g, %g) = %g, the 200-bit power gives %g", u, y, got, want)
			}
		}
	}
	if got := powOf(0, 1.5); got != 0 {
		t.Errorf("powOf(0, 1.5) = %g", got)
	}
	for _, y := range []float64{2.0000000000000004, 3.0000000000000004, 1.25, 0.5} {
		if got, want := powOf(0.37, y), math.Pow(0.37, y); got != want {
			t.Errorf("powOf(0.37, %v) = %v, not math.Pow's %v", y, got, want)
		}
	}
}

// ulp is the spacing of the float64 numbers at x.
func ulp(x float64) float64 { return math.Nextafter(math.Abs(x), math.Inf(1)) - math.Abs(x) }
