package data

import (
	"bytes"
	"context"
	"math/rand/v2"
	"strconv"
	"testing"
)

// The SVD (values only) of a 1000 x 2000 Gaussian matrix: the size the page offers for a
// user's own design.
func BenchmarkSingularValues1000x2000(b *testing.B) {
	a := gaussian(rand.New(rand.NewPCG(1, 1)), 1000, 2000)
	for b.Loop() {
		if _, err := SingularValues(context.Background(), a, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// The size the issue measured against numpy's svd(compute_uv=False): 1500 x 3000.
func BenchmarkSingularValues1500x3000(b *testing.B) {
	a := gaussian(rand.New(rand.NewPCG(1, 1)), 1500, 3000)
	for b.Loop() {
		if _, err := SingularValues(context.Background(), a, nil); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkReadValues(b *testing.B) {
	in := make([]byte, 0, 1<<20)
	rng := rand.New(rand.NewPCG(2, 2))
	for len(in) < 1<<20-32 {
		in = strconv.AppendFloat(in, rng.NormFloat64(), 'g', -1, 64)
		in = append(in, '\n')
	}
	b.SetBytes(int64(len(in)))
	for b.Loop() {
		if _, err := ReadValues(bytes.NewReader(in), Limits{}); err != nil {
			b.Fatal(err)
		}
	}
}
