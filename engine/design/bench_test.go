package design

import (
	"math/rand/v2"
	"testing"
)

func benchLaws(b *testing.B) []struct {
	name string
	l    Law
} {
	rng := rand.New(rand.NewPCG(3, 4))
	sv := func(k int) []float64 {
		v := make([]float64, k)
		for i := range v {
			v[i] = 0.1 + rng.Float64()
		}
		return v
	}
	var out []struct {
		name string
		l    Law
	}
	add := func(name string, l Law, err error) {
		if err != nil {
			b.Fatal(err)
		}
		out = append(out, struct {
			name string
			l    Law
		}{name, l})
	}
	l, err := Gaussian(2, Rows)
	add("gaussian-alpha2", l, err)
	l, err = Gaussian(0.5, Rows)
	add("gaussian-alpha0.5", l, err)
	l, err = Orthogonal(0.5, Rows)
	add("orthogonal", l, err)
	l, err = UniformSV(0.5, 0.5, 2, Rows)
	add("uniform-sv", l, err)
	l, err = UniformSV(0.5, 0, 2, Rows)
	add("uniform-sv-from-0", l, err)
	l, err = UniformEV(0.5, 0, 3, Rows)
	add("uniform-ev-from-0", l, err)
	l, err = GeometricSV(0.5, 1e4, Rows)
	add("geometric-sv-1e4", l, err)
	l, err = EmpiricalSV(0.5, sv(1000), Rows)
	add("empirical-1000", l, err)
	l, err = EmpiricalSV(0.5, sv(MaxValues), Rows)
	add("empirical-100000", l, err)
	return out
}

var sink Transforms

func BenchmarkAt(b *testing.B) {
	for _, c := range benchLaws(b) {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			g := 0.3
			for b.Loop() {
				sink = c.l.At(g)
			}
		})
	}
}

func BenchmarkStieltjes(b *testing.B) {
	for _, c := range benchLaws(b) {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			g := 0.3
			for b.Loop() {
				sink.S1, sink.S2 = c.l.Stieltjes(g)
			}
		})
	}
}

func BenchmarkInverseS1(b *testing.B) {
	for _, c := range benchLaws(b) {
		v, _ := c.l.Stieltjes(0.3)
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := InverseS1(c.l, v); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
