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

// BenchmarkFastMul500 times one product with a Fast matrix of order 500, the size of the
// page's finite-size check; run it under GOOS=js GOARCH=wasm too to see what a page worker pays.
func BenchmarkFastMul500(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 1))
	f := NewFast(rng, 500, DefaultRounds)
	x := normals(rng, 500)
	for b.Loop() {
		f.Mul(x, x)
	}
}
