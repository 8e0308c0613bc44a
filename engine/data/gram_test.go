package data

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
)

// withPortable runs f with portableKernels set to on, restoring it after.
func withPortable(t *testing.T, on bool, f func(t *testing.T)) {
	old := portableKernels
	portableKernels = on
	defer func() { portableKernels = old }()
	f(t)
}

// The reference tests of SingularValues pass on both routes (portableKernels), not only on
// the one this platform picks.
func TestSingularValuesBothRoutes(t *testing.T) {
	for _, on := range []bool{false, true} {
		name := map[bool]string{false: "gonum-dgemm-dsytrd", true: "portable-loop-dsytd2"}[on]
		t.Run(name, func(t *testing.T) {
			withPortable(t, on, func(t *testing.T) {
				t.Run("fixtures", TestFixtureSpectra)
				t.Run("diagonal", TestSingularValuesDiagonal)
				t.Run("orthogonal", TestSingularValuesOrthogonal)
				t.Run("factors", TestSingularValuesFromFactors)
				t.Run("zero-rows-columns", TestSingularValuesZeroRowsAndColumns)
			})
		})
	}
}

// gramRows gives the lower triangle of B B^T that gonum's Dgemm gives, to rounding, for row
// counts that are and are not multiples of its 4 x 4 blocks and block ranges that end inside
// the matrix.
func TestGramRowsMatchesDgemm(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for _, c := range []struct{ k, n, block int }{{1, 3, 4}, {5, 9, 4}, {13, 40, 8}, {130, 301, 128}, {16, 16, 16}} {
		b := blas64.General{Rows: c.k, Cols: c.n, Stride: c.n, Data: make([]float64, c.k*c.n)}
		for i := range b.Data {
			b.Data[i] = rng.NormFloat64()
		}
		want := make([]float64, c.k*c.k)
		blas64.Implementation().Dgemm(blas.NoTrans, blas.Trans, c.k, c.k, c.n, 1, b.Data, c.n, b.Data, c.n, 0, want, c.k)
		got := make([]float64, c.k*c.k)
		for i := range got {
			got[i] = math.NaN() // every lower entry must be written
		}
		for i0 := 0; i0 < c.k; i0 += c.block {
			gramRows(b, i0, min(c.k, i0+c.block), got, c.k)
		}
		for i := range c.k {
			for j := 0; j <= i; j++ {
				w, g := want[i*c.k+j], got[i*c.k+j]
				if !(math.Abs(g-w) <= 1e-12*float64(c.n)) {
					t.Fatalf("k %d n %d: G[%d][%d] = %v, Dgemm %v", c.k, c.n, i, j, g, w)
				}
			}
		}
	}
}

// Both routes give the same singular values of wide, tall and square Gaussian matrices larger
// than one Gram block, to a small multiple of eps sigma_max^2 / sigma (the Gram route's
// accuracy, see SingularValues), and agree with gonum's SVD (mat.SVD, a different algorithm).
func TestSingularValuesRoutesAgree(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	for _, shape := range [][2]int{{150, 301}, {301, 150}, {133, 133}} {
		a := gaussian(rng, shape[0], shape[1])
		var both [2][]float64
		for r, on := range []bool{false, true} {
			withPortable(t, on, func(t *testing.T) {
				sv, err := SingularValues(context.Background(), a, nil)
				if err != nil {
					t.Fatal(err)
				}
				both[r] = sv
			})
		}
		var svd mat.SVD
		if !svd.Factorize(a, mat.SVDNone) {
			t.Fatal("gonum SVD failed")
		}
		ref := svd.Values(nil)
		smax := ref[0]
		for i := range ref {
			bound := 100 * 0x1p-52 * smax * smax / ref[i]
			for r := range both {
				if d := math.Abs(both[r][i] - ref[i]); d > bound {
					t.Errorf("%v route %d: sigma_%d = %v, gonum SVD %v (bound %.2g)", shape, r, i, both[r][i], ref[i], bound)
				}
			}
		}
	}
}
