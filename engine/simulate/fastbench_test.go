package simulate

import (
	"math/rand/v2"
	"testing"
)

// BenchmarkFastMul100000 times one product with a Fast matrix of order 100000.
func BenchmarkFastMul100000(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 1))
	f := NewFast(rng, 100000, DefaultRounds)
	x := normals(rng, 100000)
	for b.Loop() {
		f.Mul(x, x)
	}
}
