package design

import (
	"fmt"
	"math"
	"testing"
)

// twoAtoms returns the transforms of p0 delta_0 + q delta_lam by their definitions
// (docs/method.md section 2), summed term by term; W is the two-point variance
// p0 q (1/g - 1/(lam + g))^2 / S1^2 with the difference written as lam/(g (lam + g)).
func twoAtoms(p0, q, lam, g float64) Transforms {
	r := 1 / (lam + g)
	x := Transforms{S2Pos: q * r * r, S3: q * lam * r * r, T: q * lam * r}
	if p0 == 0 {
		x.S1, x.S2 = q*r, q*r*r
		return x
	}
	x.S1 = p0/g + q*r
	x.S2 = p0/g/g + q*r*r
	d := lam / (g * (lam + g))
	x.W = p0 * q * d * d / (x.S1 * x.S1)
	return x
}

// TestOrthogonal checks the two atoms and the nonzero eigenvalue each scale gives:
// rows 1 for alpha <= 1 (F F^T = I) and alpha above, columns 1/alpha and 1, as given 1
// (docs/method.md section 1).
func TestOrthogonal(t *testing.T) {
	for _, alpha := range []float64{0.2, 0.5, 1, 2, 7} {
		p0, q := max(0, 1-alpha), min(1, alpha)
		for _, c := range []struct {
			s   Scale
			lam float64
		}{{Rows, max(1, alpha)}, {Columns, 1 / min(1, alpha)}, {AsGiven, 1}} {
			l, err := Orthogonal(alpha, c.s)
			if err != nil {
				t.Fatal(err)
			}
			for e := -10.0; e <= 10; e++ {
				g := math.Pow(10, e)
				compare(t, fmt.Sprintf("alpha=%v %v g=%g", alpha, c.s, g), l.At(g), twoAtoms(p0, q, c.lam, g), 1e-14)
			}
			sv := l.SingularValues(30, 20)
			if len(sv) != 20 || sv[0] != math.Sqrt(c.lam) || sv[19] != math.Sqrt(c.lam) {
				t.Errorf("alpha=%v %v: singular values %v", alpha, c.s, sv)
			}
		}
	}
}

// TestEmpiricalOnesIsOrthogonal: a list of equal singular values is the orthogonal design
// (its definition in docs/method.md section 5), for every transform to 1e-12.
func TestEmpiricalOnesIsOrthogonal(t *testing.T) {
	for _, k := range []int{1, 7, MaxValues} {
		ones := make([]float64, k)
		for i := range ones {
			ones[i] = 1
		}
		for _, alpha := range []float64{0.3, 1, 4} {
			for _, s := range []Scale{Rows, Columns, AsGiven} {
				e, err := EmpiricalSV(alpha, ones, s)
				if err != nil {
					t.Fatal(err)
				}
				o, err := Orthogonal(alpha, s)
				if err != nil {
					t.Fatal(err)
				}
				for x := -10.0; x <= 10; x += 0.5 {
					g := math.Pow(10, x)
					compare(t, fmt.Sprintf("k=%d alpha=%v %v g=%g", k, alpha, s, g), e.At(g), o.At(g), 1e-12)
				}
				if !close(e.Mean(), o.Mean(), 1e-14) || e.Atom0() != o.Atom0() {
					t.Errorf("k=%d alpha=%v %v: mean %v atom %v, orthogonal %v %v", k, alpha, s, e.Mean(), e.Atom0(), o.Mean(), o.Atom0())
				}
			}
		}
	}
}

// TestEmpiricalAgainstSums checks an unsorted list with repeats and zeros against the
// definitions of docs/method.md section 2 summed value by value (Welford's running variance for
// W; Welford 1962, Technometrics 4(3)).
func TestEmpiricalAgainstSums(t *testing.T) {
	values := []float64{2, 0.5, 0, 3, 2, 1e-3, 0.5, 7}
	for _, alpha := range []float64{0.5, 2} {
		l, err := EmpiricalSV(alpha, values, AsGiven)
		if err != nil {
			t.Fatal(err)
		}
		p0, q := parts(alpha)
		for e := -4.0; e <= 4; e++ {
			g := math.Pow(10, e)
			var want Transforms
			var n, mean, m2 float64
			add := func(w, x float64) {
				if w == 0 {
					return
				}
				n += w
				d := x - mean
				mean += w / n * d
				m2 += w * d * (x - mean)
			}
			add(p0, 1/g)
			want.S1, want.S2 = p0/g, p0/g/g
			for _, v := range values {
				w, lam := q/float64(len(values)), v*v
				want.S1 += w / (lam + g)
				want.S2 += w / (lam + g) / (lam + g)
				want.S3 += w * lam / (lam + g) / (lam + g)
				want.T += w * lam / (lam + g)
				if lam > 0 {
					want.S2Pos += w / (lam + g) / (lam + g)
				}
				add(w, 1/(lam+g))
			}
			want.W = m2 / n / (want.S1 * want.S1)
			compare(t, fmt.Sprintf("alpha=%v g=%g", alpha, g), l.At(g), want, 1e-12)
		}
		if got, want := l.Atom0(), p0+q/8; !close(got, want, 1e-15) {
			t.Errorf("alpha=%v: Atom0 = %v, want %v", alpha, got, want)
		}
	}
}

// TestSingularValues checks count, order and scale of the quantiles of every shape: the
// mean of sigma^2 over the min(m, n) values, times min(m, n)/n, approaches E_nu[lambda]
// (the trace of F^T F over n, common practice).
func TestSingularValues(t *testing.T) {
	for _, c := range cases() {
		l, err := c.make()
		if err != nil {
			t.Fatal(err)
		}
		n := 2000
		m := int(math.Round(c.alpha * float64(n)))
		sv := l.SingularValues(m, n)
		k := min(m, n)
		if len(sv) != k {
			t.Fatalf("%s: %d values, want %d", c.name, len(sv), k)
		}
		var tr float64
		for i, s := range sv {
			if i > 0 && s > sv[i-1] || s < 0 || math.IsNaN(s) {
				t.Fatalf("%s: value %d = %v after %v", c.name, i, s, sv[max(0, i-1)])
			}
			tr += s * s
		}
		if got := tr / float64(n); !close(got, l.Mean(), 2e-3) {
			t.Errorf("%s: trace/n = %v, want about %v", c.name, got, l.Mean())
		}
		if l.SingularValues(0, 5) != nil {
			t.Errorf("%s: an empty instance gave values", c.name)
		}
	}
	// Values whose squares overflow are fine once scaled: 1e200 and 2e200 under columns are
	// the singular values sqrt(2/5) and 2 sqrt(2/5) (mean of the squares 1).
	huge, err := EmpiricalSV(1, []float64{1e200, 2e200}, Columns)
	if err != nil {
		t.Fatal(err)
	}
	if sv := huge.SingularValues(2, 2); !close(sv[0], 2*math.Sqrt(0.4), 1e-15) || !close(sv[1], math.Sqrt(0.4), 1e-15) {
		t.Errorf("scaled huge values: %v", sv)
	}
	values := []float64{3, 1, 2}
	l, err := EmpiricalSV(1, values, AsGiven)
	if err != nil {
		t.Fatal(err)
	}
	if sv := l.SingularValues(3, 3); sv[0] != 3 || sv[1] != 2 || sv[2] != 1 {
		t.Errorf("empirical values back: %v", sv)
	}
}
