package signal

import (
	"math"
	"testing"

	"hdrisk/engine/penalty"
)

func pw(t *testing.T, w, q float64) penalty.Penalty {
	t.Helper()
	p, err := penalty.Power(w, q)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// The quadrature along the branch of the power prox agrees with the generic quadrature in r
// (ExpectQuad, which solves the prox at every node) away from q = 1, where that one is
// accurate: this states the accuracy of the branch path (docs/method.md section 11.3).
func TestBranchAgreesWithQuadrature(t *testing.T) {
	laws := map[string]Law{}
	laws["bernoulli-gauss"], _ = BernoulliGauss(0.2, 1)
	laws["rademacher"], _ = BernoulliRademacher(0.3, 2)
	laws["mixture"], _ = GaussMixture([]float64{0.5, 0.3, 0.2}, []float64{-1, 0.5, 3}, []float64{0.2, 0, 1})
	laws["laplace"], _ = Laplace(0.7)
	worst := 0.0
	for name, l := range laws {
		for _, q := range []float64{1.3, 1.5, 1.9, 2.5, 4} {
			p := pw(t, 0.4, q)
			for _, gt := range [][2]float64{{0.8, 0.05}, {3, 1e-4}, {0.05, 2}} {
				got := Expect(l, p, gt[0], gt[1])
				want := ExpectQuad(l, p, gt[0], gt[1])
				for _, d := range []float64{relDiff(got.MSE, want.MSE), relDiff(got.A, want.A)} {
					worst = math.Max(worst, d)
					if d > 1e-9 {
						t.Errorf("%s q=%v g=%v t=%v: branch %+v, quadrature %+v", name, q, gt[0], gt[1], got, want)
					}
				}
				if got.NonZero != 1 || got.TruePos != got.Active {
					t.Errorf("%s q=%v: nonzero fraction %v, want exactly 1", name, q, got.NonZero)
				}
			}
		}
	}
	t.Logf("largest relative difference %.2g", worst)
}

// Near q = 1 and q = 2 the power penalty's moments join those of l1 and ridge (their closed
// forms) continuously: to 1e-6 at q = 1 + 1e-6 and q = 2 -+ 1e-6.
func TestPowerJoinsL1AndRidge(t *testing.T) {
	l, _ := BernoulliGauss(0.2, 1)
	l1, _ := penalty.L1(0.3)
	ridge, _ := penalty.Ridge(0.6)
	for _, gt := range [][2]float64{{0.8, 0.05}, {2, 0.01}} {
		g, tt := gt[0], gt[1]
		ref := Expect(l, l1, g, tt)
		for _, q := range []float64{1 + 1e-6, 1 + 1e-8, 1 + 2e-16} {
			got := Expect(l, pw(t, 0.3, q), g, tt)
			if d := relDiff(got.MSE, ref.MSE); d > 1e-6 {
				t.Errorf("q=%v: MSE %.12g, l1 %.12g (rel %.2g)", q, got.MSE, ref.MSE, d)
			}
			if d := math.Abs(got.A - ref.A); d > 1e-6 {
				t.Errorf("q=%v: A %.12g, l1 %.12g", q, got.A, ref.A)
			}
		}
		ref = Expect(l, ridge, g, tt)
		for _, q := range []float64{2 - 1e-6, 2 + 1e-6, 2 + 1e-12} {
			got := Expect(l, pw(t, 0.3, q), g, tt)
			if d := relDiff(got.MSE, ref.MSE); d > 1e-6 {
				t.Errorf("q=%v: MSE %.12g, ridge %.12g (rel %.2g)", q, got.MSE, ref.MSE, d)
			}
			if d := math.Abs(got.A - ref.A); d > 1e-6 {
				t.Errorf("q=%v: A %.12g, ridge %.12g", q, got.A, ref.A)
			}
		}
	}
}

func relDiff(a, b float64) float64 { return math.Abs(a-b) / math.Max(math.Abs(b), 1e-300) }
