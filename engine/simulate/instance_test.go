package simulate

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/signal"
)

// An empirical design of matching size uses exactly its own singular values (as given, sorted
// decreasing), and the instance's y is F x0 + w with the noise variance asked for.
func TestDrawEmpiricalUsesItsValues(t *testing.T) {
	vals := []float64{0.3, 2, 1.1, 0.7, 1.6}
	d, err := design.EmpiricalSV(0.5, vals, design.AsGiven)
	if err != nil {
		t.Fatal(err)
	}
	sig, _ := signal.Gauss(1)
	for _, f := range []Factors{FactorsFast, FactorsQR, FactorsHouseholder} {
		inst, err := Draw(rand.New(rand.NewPCG(1, 0)), DesignDraw{Law: d, Factors: f}, sig, 0, 10)
		if err != nil {
			t.Fatal(err)
		}
		want := slices.Clone(vals)
		slices.Sort(want)
		slices.Reverse(want)
		if inst.M != 5 || !slices.Equal(inst.SVD.S, want) {
			t.Errorf("%v: m = %d, singular values %v, want %v", f, inst.M, inst.SVD.S, want)
		}
		// With no noise, y = F x0 exactly and ||F^T y|| follows from the values.
		fx := make([]float64, inst.M)
		inst.SVD.Mul(fx, inst.X0)
		if d := maxDiff(fx, inst.Y); d != 0 {
			t.Errorf("%v: y differs from F x0 by %g without noise", f, d)
		}
	}
}

// Gaussian entries have variance Mean/m, so that the mean eigenvalue of F^T F is the law's Mean
// (docs/method.md section 1: rows scale gives N(0, 1/n)); the noise has the variance asked for.
func TestDrawGaussianEntriesScale(t *testing.T) {
	for _, sc := range []design.Scale{design.Rows, design.Columns} {
		d, _ := design.Gaussian(0.5, sc)
		sig, _ := signal.Gauss(0)
		const n = 400
		inst, err := Draw(rand.New(rand.NewPCG(2, 0)), DesignDraw{Law: d, GaussianEntries: true}, sig, 0.25, n)
		if err != nil {
			t.Fatal(err)
		}
		m := inst.M
		ss := 0.0
		for _, v := range inst.Dense.Data {
			ss += v * v
		}
		want := d.Mean() / float64(m)
		got := ss / float64(m*n)
		// The sample variance of m n = 80000 Gaussian squares has relative sd sqrt(2/80000).
		if math.Abs(got/want-1) > 4*math.Sqrt(2.0/float64(m*n)) {
			t.Errorf("%v: entry variance %g, want %g", sc, got, want)
		}
		// x0 = 0, so y is the noise alone.
		if v := dot(inst.Y, inst.Y) / float64(m); math.Abs(v/0.25-1) > 4*math.Sqrt(2.0/float64(m)) {
			t.Errorf("%v: noise variance %g, want 0.25", sc, v)
		}
	}
}

// Drawn singular values come from the law: their mean square matches E_nu[lambda] / min(1, alpha)
// and they differ from the quantiles.
func TestDrawSpectrum(t *testing.T) {
	d, _ := design.UniformSV(0.5, 0.5, 1.5, design.Rows)
	sig, _ := signal.Gauss(1)
	q, err := Draw(rand.New(rand.NewPCG(3, 0)), DesignDraw{Law: d}, sig, 0, 4000)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Draw(rand.New(rand.NewPCG(3, 0)), DesignDraw{Law: d, Spectrum: Draws}, sig, 0, 4000)
	if err != nil {
		t.Fatal(err)
	}
	if slices.Equal(q.SVD.S, r.SVD.S) {
		t.Fatal("drawn singular values equal the quantiles")
	}
	if !slices.IsSortedFunc(r.SVD.S, func(a, b float64) int { return cmpFloat(b, a) }) {
		t.Error("drawn singular values not in decreasing order")
	}
	ms := 0.0
	for _, s := range r.SVD.S {
		ms += s * s
	}
	ms /= float64(len(r.SVD.S))
	want := d.Mean() / 0.5
	// The mean of 2000 squares of uniform draws on [0.5, 1.5] has a relative sd of 1.2%: allow 4.
	if math.Abs(ms/want-1) > 0.05 {
		t.Errorf("mean squared singular value %g, want %g", ms, want)
	}
}
