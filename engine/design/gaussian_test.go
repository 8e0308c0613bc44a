package design

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// mpReference integrates h against the Marchenko-Pastur law of (1/m) X^T X for an m x n
// matrix X of N(0, 1) entries with y = n/m, multiplied by f: the atom max(0, 1 - 1/y) at 0
// and the density sqrt((b - l)(l - a))/(2 pi y l) on [a, b], a = (1 - sqrt y)^2,
// b = (1 + sqrt y)^2 (Marchenko & Pastur 1967; Bai & Silverstein 2010, Spectral Analysis of
// Large Dimensional Random Matrices, section 3.1.1). The substitution
// l = a + (b - a)(1 - cos theta)/2 = a + (b - a) sin^2(theta/2) removes the square-root edges (docs/method.md section 5), and
// the smooth integrand in theta is summed by a 2000-node Gauss-Legendre rule.
func mpReference(y, f float64, atom func() float64, h func(l float64) float64) float64 {
	a, b := (1-math.Sqrt(y))*(1-math.Sqrt(y)), (1+math.Sqrt(y))*(1+math.Sqrt(y))
	half := (b - a) / 2
	var sum float64
	for i, x := range refNodes {
		th := math.Pi / 2 * (x + 1)
		h2 := math.Sin(th / 2)
		l := a + (b-a)*h2*h2
		s := math.Sin(th)
		sum += refWeights[i] * h(f*l) * half * half * s * s / (2 * math.Pi * y * l)
	}
	sum *= math.Pi / 2
	if y > 1 {
		sum += (1 - 1/y) * atom()
	}
	return sum
}

var refNodes, refWeights = legendre(2000)

func legendre(n int) (x, w []float64) {
	x, w = make([]float64, n), make([]float64, n)
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	return x, w
}

func TestGaussianAgainstQuadrature(t *testing.T) {
	for _, alpha := range []float64{0.3, 0.5, 1, 2, 5} {
		for _, sc := range []Scale{Rows, Columns} {
			l, err := Gaussian(alpha, sc)
			if err != nil {
				t.Fatal(err)
			}
			f := 1.0
			if sc == Rows {
				f = alpha
			}
			y := 1 / alpha
			for e := -3.0; e <= 3; e += 0.5 {
				g := math.Pow(10, e)
				got := l.At(g)
				ref := func(h func(float64) float64, at0 float64) float64 {
					return mpReference(y, f, func() float64 { return at0 }, h)
				}
				s1 := ref(func(x float64) float64 { return 1 / (x + g) }, 1/g)
				s2pos := ref(func(x float64) float64 { return 1 / (x + g) / (x + g) }, 0)
				want := Transforms{
					S1:    s1,
					S2:    ref(func(x float64) float64 { return 1 / (x + g) / (x + g) }, 1/g/g),
					S3:    ref(func(x float64) float64 { return x / (x + g) / (x + g) }, 0),
					T:     ref(func(x float64) float64 { return x / (x + g) }, 0),
					W:     ref(func(x float64) float64 { d := 1/(x+g) - s1; return d * d }, (1/g-s1)*(1/g-s1)) / (s1 * s1),
					S2Pos: s2pos,
				}
				name := fmt.Sprintf("alpha=%v %v g=%g", alpha, sc, g)
				compare(t, name, got, want, 1e-10)
			}
		}
	}
}

func compare(t *testing.T, name string, got, want Transforms, tol float64) {
	t.Helper()
	fields := []struct {
		n    string
		g, w float64
	}{
		{"S1", got.S1, want.S1}, {"S2", got.S2, want.S2}, {"S3", got.S3, want.S3},
		{"T", got.T, want.T}, {"W", got.W, want.W}, {"S2Pos", got.S2Pos, want.S2Pos},
	}
	for _, f := range fields {
		if !close(f.g, f.w, tol) {
			t.Errorf("%s: %s = %.17g, want %.17g (rel %.2g)", name, f.n, f.g, f.w, math.Abs(f.g-f.w)/math.Abs(f.w))
		}
	}
}

func close(got, want, tol float64) bool {
	if got == want {
		return true
	}
	return math.Abs(got-want) <= tol*math.Abs(want)
}

// TestGaussianInverseWishart checks S1(0) = E[1/lambda] for alpha > 1. For an m x n matrix
// X of N(0, 1) entries, E[(X^T X)^-1] = I/(m - n - 1) (Muirhead 1982, Aspects of Multivariate
// Statistical Theory, mean of the inverted Wishart distribution). With F = X/sqrt(n) (rows)
// E[1/lambda] = n/(m - n - 1) -> 1/(alpha - 1); with F = X/sqrt(m) (columns)
// m/(m - n - 1) -> alpha/(alpha - 1).
func TestGaussianInverseWishart(t *testing.T) {
	for _, alpha := range []float64{1.01, 1.5, 2, 5, 100} {
		for _, c := range []struct {
			s    Scale
			want float64
		}{{Rows, 1 / (alpha - 1)}, {Columns, alpha / (alpha - 1)}, {AsGiven, 1 / (alpha - 1)}} {
			l, err := Gaussian(alpha, c.s)
			if err != nil {
				t.Fatal(err)
			}
			if got := l.At(0).S1; !close(got, c.want, 1e-13) {
				t.Errorf("alpha=%v %v: S1(0) = %v, want %v", alpha, c.s, got, c.want)
			}
			if s1, _ := l.Stieltjes(0); !close(s1, c.want, 1e-13) {
				t.Errorf("alpha=%v %v: Stieltjes(0) = %v, want %v", alpha, c.s, s1, c.want)
			}
		}
	}
}

// TestGaussianAlphaOne checks the edge alpha = 1, where the support touches 0 without an
// atom: E[1/lambda] is infinite and S1 grows like 1/sqrt(g) (the density of MP_1 is
// sqrt(4 - l)/(2 pi sqrt l) near 0, Marchenko & Pastur 1967), so sqrt(g) S1(g) -> 1.
func TestGaussianAlphaOne(t *testing.T) {
	l, err := Gaussian(1, Columns)
	if err != nil {
		t.Fatal(err)
	}
	z := l.At(0)
	if !math.IsInf(z.S1, 1) || !math.IsInf(z.S2, 1) || !math.IsInf(z.W, 1) || z.T != 1 {
		t.Errorf("At(0) = %+v, want S1, S2, W = +Inf and T = 1", z)
	}
	g := 1e-12
	if got := math.Sqrt(g) * l.At(g).S1; !close(got, 1, 1e-5) {
		t.Errorf("sqrt(g) S1(g) at g = %g is %v, want about 1", g, got)
	}
}

// TestMPQuantiles checks the quantiles against the distribution function of MP_c in
// theta (lambda = a + (b - a) sin^2(theta/2)):
// F = (2 sqrt(c) sin theta + (1 + c) theta - 2 (1 - c) atan(k tan(theta/2)))/(2 pi c),
// k = (1 + sqrt c)/(1 - sqrt c), an antiderivative of the density of Marchenko & Pastur 1967
// derived here (it gives F(pi) = 1); its cancellation for small c costs a few digits, hence
// the tolerance.
func TestMPQuantiles(t *testing.T) {
	for _, c := range []float64{0.01, 0.2, 0.5, 0.9, 0.999, 1} {
		sc := math.Sqrt(c)
		a, b := (1-sc)*(1-sc), (1+sc)*(1+sc)
		p := quantileProbs(101, 101)
		lam := mpQuantiles(c, p)
		for i, l := range lam {
			th := 2 * math.Asin(math.Sqrt((l-a)/(b-a)))
			at := math.Pi / 2
			if c < 1 {
				at = math.Atan((1 + sc) / (1 - sc) * math.Tan(th/2))
			}
			cdf := (2*sc*math.Sin(th) + (1+c)*th - 2*(1-c)*at) / (2 * math.Pi * c)
			if math.Abs(cdf-p[i]) > 1e-11 {
				t.Errorf("c=%v: F(q(%v)) = %v", c, p[i], cdf)
			}
			if i > 0 && l >= lam[i-1] {
				t.Errorf("c=%v: quantiles not decreasing at %d", c, i)
			}
		}
	}
}
