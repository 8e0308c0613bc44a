package data

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/mat"

	"hdrisk/engine/design"
)

// The singular values of a matrix with orthonormal columns (all 1, shape 60 x 25) give the
// same law as the closed-form orthogonal design with alpha = 60/25 (docs/method.md section 5: two
// atoms), under both normalizing scales.
func TestEmpiricalDesignOrthogonal(t *testing.T) {
	q := orthonormalColumns(rand.New(rand.NewPCG(5, 6)), 60, 25)
	for _, a := range []*mat.Dense{q, mat.DenseCopyOf(q.T())} {
		m, n := a.Dims()
		sv := svOf(t, a)
		for _, s := range []design.Scale{design.Rows, design.Columns} {
			got, err := EmpiricalDesign(sv, m, n, s)
			if err != nil {
				t.Fatal(err)
			}
			want, err := design.Orthogonal(float64(m)/float64(n), s)
			if err != nil {
				t.Fatal(err)
			}
			if got.Alpha() != want.Alpha() || math.Abs(got.Atom0()-want.Atom0()) > 1e-15 || math.Abs(got.Mean()-want.Mean()) > 1e-12 {
				t.Errorf("%dx%d scale %v: alpha %g atom %g mean %g, want %g %g %g", m, n, s, got.Alpha(), got.Atom0(), got.Mean(), want.Alpha(), want.Atom0(), want.Mean())
			}
			for _, g := range []float64{0.01, 0.3, 2} {
				if a, b := got.At(g).S1, want.At(g).S1; math.Abs(a-b) > 1e-12*b {
					t.Errorf("%dx%d scale %v: S1(%g) = %.15g, want %.15g", m, n, s, g, a, b)
				}
			}
		}
	}
}

// A 200 x 400 Gaussian matrix, read as a user's design, is close to Marchenko-Pastur
// (Marchenko & Pastur 1967; closed form in engine/design): S1 agrees to finite-size error.
func TestEmpiricalDesignGaussian(t *testing.T) {
	const m, n = 200, 400
	a := gaussian(rand.New(rand.NewPCG(7, 8)), m, n)
	got, err := EmpiricalDesign(svOf(t, a), m, n, design.Rows)
	if err != nil {
		t.Fatal(err)
	}
	want, err := design.Gaussian(0.5, design.Rows)
	if err != nil {
		t.Fatal(err)
	}
	for _, g := range []float64{0.1, 1, 5} {
		if a, b := got.At(g).S1, want.At(g).S1; math.Abs(a-b) > 3e-3*b {
			t.Errorf("S1(%g) = %g, Marchenko-Pastur %g", g, a, b)
		}
	}
}

// The finite-size check draws the design's singular values for the same shape: for the
// user's own shape they are exactly the user's values (here as given, unscaled).
func TestEmpiricalDesignKeepsValues(t *testing.T) {
	sv := []float64{3, 2, 2, 0.5, 0.1}
	l, err := EmpiricalDesign(sv, 5, 8, design.AsGiven)
	if err != nil {
		t.Fatal(err)
	}
	got := l.SingularValues(5, 8)
	slices.Sort(got)
	want := slices.Clone(sv)
	slices.Sort(want)
	if !closeTo(got, want, 1e-15) {
		t.Errorf("SingularValues(5, 8) = %v, want %v", got, want)
	}
	for _, bad := range []struct {
		sv   []float64
		m, n int
	}{{sv, 0, 5}, {sv, 5, 0}, {sv, 6, 8}, {[]float64{0, 0}, 2, 2}} {
		if _, err := EmpiricalDesign(bad.sv, bad.m, bad.n, design.Rows); err == nil {
			t.Errorf("EmpiricalDesign(%v, %d, %d) accepted", bad.sv, bad.m, bad.n)
		}
	}
}
