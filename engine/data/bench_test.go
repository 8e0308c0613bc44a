package data

import (
	"bytes"
	"context"
	"math/rand/v2"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
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

// The native tridiagonal reduction alone, of the Gram matrix of a 1500 x 3000 Gaussian
// matrix (the step of SingularValues that triBlock and triCross were tuned on), and gonum's
// Dsytrd on the same matrix, which it replaced.
func BenchmarkTridiagonal1500(b *testing.B) {
	benchmarkTridiagonal(b, tridiagonalizeBlocked)
}

func BenchmarkTridiagonalGonumDsytrd1500(b *testing.B) {
	benchmarkTridiagonal(b, gonumDsytrd)
}

func benchmarkTridiagonal(b *testing.B, reduce func(g []float64, k int, d, e, tau []float64)) {
	const k, n = 1500, 3000
	a := gaussian(rand.New(rand.NewPCG(1, 1)), k, n).RawMatrix()
	g0 := make([]float64, k*k)
	blas64.Implementation().Dgemm(blas.NoTrans, blas.Trans, k, k, n, 1, a.Data, a.Stride, a.Data, a.Stride, 0, g0, k)
	g := make([]float64, k*k)
	d, e, tau := make([]float64, k), make([]float64, k-1), make([]float64, k-1)
	for b.Loop() {
		copy(g, g0)
		reduce(g, k, d, e, tau)
	}
}
