package data

import (
	"context"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

const fixtures = "../../testdata/matrices"

func readFixture(t *testing.T, name string) (*mat.Dense, error) {
	t.Helper()
	f, err := os.Open(filepath.Join(fixtures, name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	return ReadMatrix(f, Limits{})
}

// Hand-written files checked against the matrices stated in their comments. Format:
// Boisvert, Pozo & Remington, "The Matrix Market Exchange Formats: Initial Design", NIST
// IR 5935 (1996) for the .mtx files; delimited text as described in ReadMatrix's doc.
func TestReadFixtures(t *testing.T) {
	for _, c := range []struct {
		file string
		rows int
		want []float64 // row-major
	}{
		// NIST IR 5935: array entries are listed column by column.
		{"array_general.mtx", 3, []float64{1, 4, 2, 5, 3, 6}},
		// NIST IR 5935: coordinate entries "i j value", indices from 1; duplicates summed (our choice).
		{"coordinate_general.mtx", 4, []float64{2.5, 0, 0, 0, 0, 1.5, -7, 0, 0, 0, -0.3, 0}},
		{"diagonal_coordinate.mtx", 3, []float64{3, 0, 0, 0, -2, 0, 0, 0, 0.5}},
		// NIST IR 5935: symmetric files store the lower triangle, by coordinates or as an array.
		{"symmetric_coordinate.mtx", 3, []float64{2, 1, 0, 1, 2, 0, 0, 0, 5}},
		{"symmetric_array.mtx", 3, []float64{2, 1, 0, 1, 2, 0, 0, 0, 5}},
		// NIST IR 5935: skew-symmetric files store the strict lower triangle, a(j,i) = -a(i,j).
		{"skew_coordinate.mtx", 3, []float64{0, -3, 0, 3, 0, 0, 0, 0, 0}},
		{"integer_array.mtx", 2, []float64{4, 0, 3, -5}},
		{"upper_case_banner.mtx", 2, []float64{1, 0, 0, 2}},
		{"header.csv", 2, []float64{1, 2, 3, 4, 5, 6}},
		{"crlf.tsv", 2, []float64{1, 2, 3, 4, 5, 6}},
		{"spaces.txt", 2, []float64{1, 2, 3, 4, 5, 6}},
	} {
		a, err := readFixture(t, c.file)
		if err != nil {
			t.Errorf("%s: %v", c.file, err)
			continue
		}
		r, k := a.Dims()
		want := mat.NewDense(c.rows, len(c.want)/c.rows, c.want)
		if r != c.rows || !mat.Equal(a, want) {
			t.Errorf("%s: got %dx%d\n%v\nwant\n%v", c.file, r, k, mat.Formatted(a), mat.Formatted(want))
		}
	}
}

func svOf(t *testing.T, a *mat.Dense) []float64 {
	t.Helper()
	sv, err := SingularValues(context.Background(), a, nil)
	if err != nil {
		t.Fatal(err)
	}
	return sv
}

func closeTo(got, want []float64, tol float64) bool {
	if len(got) != len(want) {
		return false
	}
	for i := range got {
		if math.Abs(got[i]-want[i]) > tol*max(1, math.Abs(want[i])) {
			return false
		}
	}
	return true
}

// Singular values of the fixtures whose spectra are known in closed form (stated in the
// files): a diagonal matrix has |d_i|, a symmetric one |eigenvalues|, and the skew matrix
// [0 -3; 3 0] (+ a zero) has 3, 3, 0 (common practice: sigma_i(A) = |lambda_i(A)| for
// normal A).
func TestFixtureSpectra(t *testing.T) {
	for _, c := range []struct {
		file string
		want []float64
	}{
		{"diagonal_coordinate.mtx", []float64{3, 2, 0.5}},
		{"symmetric_coordinate.mtx", []float64{5, 3, 1}},
		{"symmetric_array.mtx", []float64{5, 3, 1}},
		{"skew_coordinate.mtx", []float64{3, 3, 0}},
	} {
		a, err := readFixture(t, c.file)
		if err != nil {
			t.Fatalf("%s: %v", c.file, err)
		}
		if got := svOf(t, a); !closeTo(got, c.want, 1e-14) {
			t.Errorf("%s: singular values %v, want %v", c.file, got, c.want)
		}
	}
}

// A diagonal matrix padded with zero rows or columns has singular values |d_i| in
// decreasing order (common practice: the SVD of a diagonal matrix is itself up to signs
// and order).
func TestSingularValuesDiagonal(t *testing.T) {
	d := []float64{-4, 0.25, 7, 1e-3, 2}
	want := []float64{7, 4, 2, 0.25, 1e-3}
	for _, shape := range [][2]int{{5, 5}, {5, 9}, {8, 5}} {
		a := mat.NewDense(shape[0], shape[1], nil)
		for i, v := range d {
			a.Set(i, i, v)
		}
		if got := svOf(t, a); !closeTo(got, want, 1e-15) {
			t.Errorf("%v: %v, want %v", shape, got, want)
		}
	}
}

func gaussian(rng *rand.Rand, m, n int) *mat.Dense {
	a := mat.NewDense(m, n, nil)
	for i := range m {
		for j := range n {
			a.Set(i, j, rng.NormFloat64())
		}
	}
	return a
}

// orthonormalColumns returns the m x n factor Q of the QR factorization of a Gaussian
// matrix, m >= n: its columns are orthonormal (Golub & Van Loan, Matrix Computations,
// section 5.2).
func orthonormalColumns(rng *rand.Rand, m, n int) *mat.Dense {
	var qr mat.QR
	qr.Factorize(gaussian(rng, m, n))
	var q mat.Dense
	qr.QTo(&q)
	return mat.DenseCopyOf(q.Slice(0, m, 0, n))
}

// An orthogonal matrix, and one with orthonormal columns or rows, has every singular
// value 1 (common practice: A^T A = I).
func TestSingularValuesOrthogonal(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, shape := range [][2]int{{40, 40}, {60, 25}} {
		q := orthonormalColumns(rng, shape[0], shape[1])
		ones := slices.Repeat([]float64{1}, shape[1])
		if got := svOf(t, q); !closeTo(got, ones, 1e-13) {
			t.Errorf("Q %v: %v", shape, got)
		}
		if got := svOf(t, mat.DenseCopyOf(q.T())); !closeTo(got, ones, 1e-13) {
			t.Errorf("Q^T %v: %v", shape, got)
		}
	}
}

// F = U S V^T with orthonormal U (m x k), V (n x k) and a given diagonal S has exactly the
// singular values S (definition of the SVD).
func TestSingularValuesFromFactors(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	s := []float64{50, 9, 3.5, 1, 1, 0.02, 1e-6}
	k := len(s)
	for _, shape := range [][2]int{{30, 12}, {12, 30}, {k, k}} {
		m, n := shape[0], shape[1]
		u := orthonormalColumns(rng, m, k)
		v := orthonormalColumns(rng, n, k)
		var us, f mat.Dense
		us.Mul(u, mat.NewDiagDense(k, s))
		f.Mul(&us, v.T())
		want := append(slices.Clone(s), make([]float64, min(m, n)-k)...)
		got := svOf(t, &f)
		// The Gram route (see SingularValues): absolute error a small multiple of
		// eps sigma_max^2 / sigma, and rounding level below GramTolerance.
		tol := GramTolerance(m, n, s[0])
		for i := range got {
			bound := 50 * 0x1p-52 * s[0] * s[0] / want[i]
			if want[i] <= tol {
				bound = 4 * tol
			}
			if math.Abs(got[i]-want[i]) > bound {
				t.Errorf("%v: sigma_%d = %.17g, want %g within %.2g", shape, i, got[i], want[i], bound)
			}
		}
	}
}

// A matrix stated 4000 x 4000 with three nonzero entries costs the work of its nonzero rows
// and columns: its singular values are those entries' magnitudes and zeros (definition).
func TestSingularValuesZeroRowsAndColumns(t *testing.T) {
	a := mat.NewDense(4000, 4000, nil)
	a.Set(7, 3, -2)
	a.Set(1200, 3999, 0.5)
	a.Set(3999, 17, 5)
	got := svOf(t, a)
	if len(got) != 4000 || got[0] != 5 || got[1] != 2 || got[2] != 0.5 || slices.Max(got[3:]) != 0 {
		t.Errorf("first values %v, length %d", got[:4], len(got))
	}
}

func TestSingularValuesProgressAndCancel(t *testing.T) {
	a := mat.NewDense(2, 3, []float64{1, 2, 3, 4, 5, 6})
	var seen []Step
	if _, err := SingularValues(context.Background(), a, func(s Step, f float64) {
		if len(seen) == 0 || seen[len(seen)-1] != s {
			seen = append(seen, s)
		}
	}); err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(seen, []Step{StepGram, StepTridiagonal, StepEigenvalues}) {
		t.Errorf("progress steps %v, want Gram, tridiagonal, eigenvalues", seen)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := SingularValues(ctx, a, nil); err != ErrCanceled {
		t.Errorf("canceled context: %v", err)
	}
	a.Set(1, 1, math.NaN())
	if _, err := SingularValues(context.Background(), a, nil); err == nil || !strings.Contains(err.Error(), "NaN") {
		t.Errorf("NaN entry: %v", err)
	}
}

func TestSummarize(t *testing.T) {
	s, err := Summarize([]float64{4, 0.5, 2, 1e-20}, 4, 10, 4)
	if err != nil {
		t.Fatal(err)
	}
	if s.Rows != 4 || s.Cols != 10 || s.Alpha != 0.4 || s.Max != 4 || s.Min != 1e-20 {
		t.Errorf("summary %+v", s)
	}
	if s.Condition != 4e20 || s.Rank != 3 {
		t.Errorf("condition %g rank %d, want 4e20 and 3", s.Condition, s.Rank)
	}
	if got := s.Histogram.Counts; !slices.Equal(got, []int{2, 0, 1, 1}) {
		t.Errorf("histogram counts %v", got)
	}
	z, err := Summarize([]float64{0, 0}, 2, 2, 0)
	if err != nil || !math.IsInf(z.Condition, 1) || z.Rank != 0 {
		t.Errorf("zero spectrum: %+v %v", z, err)
	}
	for _, bad := range []struct {
		sv   []float64
		m, n int
	}{{[]float64{1}, 0, 1}, {[]float64{1}, 1, 0}, {[]float64{1, 2}, 3, 1}, {[]float64{-1}, 1, 1}, {[]float64{math.NaN()}, 1, 1}, {[]float64{math.Inf(1)}, 1, 1}} {
		if _, err := Summarize(bad.sv, bad.m, bad.n, 0); err == nil {
			t.Errorf("Summarize(%v, %d, %d) accepted", bad.sv, bad.m, bad.n)
		}
	}
}
