package signal

import (
	"math"
	"testing"

	"hdrisk/engine/penalty"
)

// The allocation-free rule of Coarse must be the rule gaussOfPoints computes (Stieltjes and
// the Golub-Welsch eigenproblem through gonum) for the same measure.
func TestCoarseRuleMatchesGaussOfPoints(t *testing.T) {
	laws := []Law{must(StudentT(5, 1)), must(StudentT(2.5, 3)), must(StudentT(40, 1)), must(Laplace(1)), must(Laplace(0.01))}
	for _, l := range laws {
		comps := componentsOf(l)
		for _, tt := range []float64{1e-6, 0.01, 1, 100} {
			xmax := 0.0
			var x, mu []float64
			for _, c := range comps {
				v := c.Var + tt
				x = append(x, 1/math.Sqrt(v))
				mu = append(mu, c.Weight*v)
				xmax = math.Max(xmax, 1/math.Sqrt(v))
			}
			for i := range x {
				x[i] /= xmax
			}
			for n := 2; n <= MaxCoarse; n++ {
				wantX, wantW, ok := gaussOfPoints(x, mu, n)
				nodes, weights := make([]float64, n), make([]float64, n)
				got := gaussRule(comps, tt, xmax, nodes, weights)
				if !ok || !got {
					t.Errorf("%s t=%g n=%d: gaussOfPoints ok %v, gaussRule ok %v", l.Name(), tt, n, ok, got)
					continue
				}
				sortPairs(nodes, weights)
				sortPairs(wantX, wantW)
				for j := range n {
					if !close(nodes[j], wantX[j], 1e-9, 0) || !close(weights[j], wantW[j], 1e-8, 1e-300) {
						t.Errorf("%s t=%g n=%d node %d: (%g, %g), want (%g, %g)", l.Name(), tt, n, j, nodes[j], weights[j], wantX[j], wantW[j])
					}
				}
			}
		}
	}
}

func sortPairs(x, w []float64) {
	for i := range x {
		for j := i + 1; j < len(x); j++ {
			if x[j] < x[i] {
				x[i], x[j] = x[j], x[i]
				w[i], w[j] = w[j], w[i]
			}
		}
	}
}

// The surrogate keeps the weight and E[x0^2], keeps a point mass at 0 as it is, and at its
// own noise, with the l1 threshold at 0.5 to 2 channel standard deviations (where fixed points
// lie), gives the moments of the full mixture closely: five nodes, 1e-6 relative (measured
// 1.4e-7).
func TestCoarse(t *testing.T) {
	bg := must(GaussMixture([]float64{0.5, 0.05, 0.05, 0.05, 0.05, 0.05, 0.05, 0.05, 0.05, 0.05, 0.05}, make([]float64, 11), []float64{0, 0.1, 0.2, 0.5, 1, 1.5, 2, 3, 4, 6, 8}))
	laws := []Law{must(StudentT(5, 1)), must(StudentT(3, 2)), must(StudentT(30, 1)), Scaled(must(StudentT(5, 1)), math.Sqrt(5.0/3))}
	worst := 0.0
	for _, l := range laws {
		for _, tt := range []float64{1e-3, 0.1, 1, 10} {
			c, ok := Coarse(l, 5, tt)
			if !ok {
				t.Fatalf("%s t=%g: refused", l.Name(), tt)
			}
			w, second := 0.0, 0.0
			for _, k := range c.Mixture() {
				w += k.Weight
				second += k.Weight * k.Var
			}
			want := 0.0
			for _, k := range componentsOf(l) {
				want += k.Weight * k.Var
			}
			if !close(w, 1, 1e-13, 0) || !close(second, want, 1e-12, 0) {
				t.Errorf("%s t=%g: weight %v, E[V] %v (want 1, %v)", l.Name(), tt, w, second, want)
			}
			if c.Second() != l.Second() || c.Name() != l.Name() {
				t.Errorf("%s: Second %v Name %s", l.Name(), c.Second(), c.Name())
			}
			p := must(penalty.L1(1))
			for _, u := range []float64{0.5, 1, 2} {
				g := 1 / (u * math.Sqrt(tt)) // the threshold 1/g at u standard deviations
				mf, mc := Expect(l, p, g, tt), Expect(c, p, g, tt)
				e := math.Max(math.Abs(mc.MSE/mf.MSE-1), math.Abs(mc.A/mf.A-1))
				worst = math.Max(worst, e)
				if !close(mc.MSE, mf.MSE, 1e-6, 0) || !close(mc.A, mf.A, 1e-6, 0) {
					t.Errorf("%s t=%g g=%g: MSE %v A %v, full %v %v", l.Name(), tt, g, mc.MSE, mc.A, mf.MSE, mf.A)
				}
			}
		}
	}
	t.Logf("largest relative difference of MSE and A: %.1e", worst)
	for _, n := range []int{2, 3} {
		c, ok := Coarse(bg, n, 0.5)
		if n == 2 && !ok {
			t.Fatalf("gauss mixture, 2 nodes: refused")
		}
		if n == 3 && ok {
			t.Errorf("gauss mixture of 10 scale components, 3 nodes: built, want refused (too few components)")
		}
		if ok {
			m := c.Mixture()
			if last, want := m[len(m)-1], componentsOf(bg)[0]; last != want {
				t.Errorf("point mass: %v, want %v", last, want)
			}
		}
	}
	shifted := must(GaussMixture([]float64{0.5, 0.5}, []float64{0, 1}, []float64{1, 1}))
	for _, c := range []struct {
		l    Law
		n    int
		t    float64
		name string
	}{{shifted, 2, 1, "nonzero mean"}, {laws[0], 1, 1, "one node"}, {laws[0], MaxCoarse + 1, 1, "too many nodes"}, {laws[0], 4, 0, "t = 0"}, {laws[0], 4, math.NaN(), "t NaN"}, {laws[0], 4, math.Inf(1), "t Inf"}, {must(Laplace(1)), 5, 1, "laplace (closed forms)"}, {Scaled(must(Laplace(2)), math.Sqrt(8)), 5, 1, "scaled laplace"}} {
		if _, ok := Coarse(c.l, c.n, c.t); ok {
			t.Errorf("%s: built, want refused", c.name)
		}
	}
}

// BenchmarkCoarse times building the surrogate of the Student-t law in the solver's units:
// go test ./engine/signal -run XXX -bench Coarse
func BenchmarkCoarse(b *testing.B) {
	l := must(StudentT(5, 1))
	ls := Scaled(l, math.Sqrt(l.Second()))
	b.ReportAllocs()
	for b.Loop() {
		if _, ok := Coarse(ls, 5, 0.3); !ok {
			b.Fatal("refused")
		}
	}
}
