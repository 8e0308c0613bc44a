package signal

import (
	"math"
	"testing"

	"hdrisk/engine/penalty"
)

var sink Moments

func benchExpect(b *testing.B, l Law, p penalty.Penalty) {
	b.ReportAllocs()
	g, t := 0.8, 0.05
	for i := 0; b.Loop(); i++ {
		// Vary (g, t) slightly, as the fixed-point iteration does.
		sink = Expect(l, p, g*(1+1e-3*float64(i%7)), t*(1+1e-3*float64(i%5)))
	}
}

func BenchmarkExpect(b *testing.B) {
	bg, _ := BernoulliGauss(0.1, 1)
	ga, _ := Gauss(1)
	la, _ := Laplace(0.7)
	l1, _ := penalty.L1(0.3)
	ridge, _ := penalty.Ridge(0.5)
	en, _ := penalty.ElasticNet(0.3, 0.2)
	b.Run("bernoulli-gauss/l1", func(b *testing.B) { benchExpect(b, bg, l1) })
	b.Run("bernoulli-gauss/elastic-net", func(b *testing.B) { benchExpect(b, bg, en) })
	b.Run("gauss/ridge", func(b *testing.B) { benchExpect(b, ga, ridge) })
	b.Run("laplace/l1", func(b *testing.B) { benchExpect(b, la, l1) })
}

func BenchmarkExpectQuad(b *testing.B) {
	bg, _ := BernoulliGauss(0.1, 1)
	l1, _ := penalty.L1(0.3)
	pw, _ := penalty.Power(0.3, 1.5)
	b.Run("bernoulli-gauss/l1", func(b *testing.B) {
		for b.Loop() {
			sink = ExpectQuad(bg, l1, 0.8, 0.05)
		}
	})
	b.Run("bernoulli-gauss/power", func(b *testing.B) {
		for b.Loop() {
			sink = Expect(bg, pw, 0.8, 0.05)
		}
	})
}

// BenchmarkExpectFixedPoint evaluates the channel where the l1 fixed point of
// BenchmarkSolveQuadrature (engine/fixedpoint) lies, in the solver's units (E[x0^2] = 1).
func BenchmarkExpectFixedPoint(b *testing.B) {
	la, _ := Laplace(math.Sqrt(0.5))
	st, _ := StudentT(5, math.Sqrt(0.6))
	l1, _ := penalty.L1(0.35)
	for _, c := range []struct {
		name string
		l    Law
	}{{"laplace/l1", la}, {"student-t/l1", st}} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; b.Loop(); i++ {
				sink = Expect(c.l, l1, 0.45*(1+1e-3*float64(i%7)), 1.27*(1+1e-3*float64(i%5)))
			}
		})
		b.Run(c.name+"/slopes", func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; b.Loop(); i++ {
				sink, _, _ = ExpectSlopes(c.l, l1, 0.45*(1+1e-3*float64(i%7)), 1.27*(1+1e-3*float64(i%5)))
			}
		})
	}
}
