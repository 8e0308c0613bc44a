package simulate

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/mat"

	"hdrisk/engine/penalty"
)

type sklearnFit struct {
	Kind    string    `json:"kind"`
	Alpha   float64   `json:"alpha"`
	Ratio   float64   `json:"l1_ratio"`
	L1      float64   `json:"l1"`
	L2      float64   `json:"l2"`
	Coef    []float64 `json:"coef"`
	NonZero int       `json:"nonzero"`
}

type sklearnFixture struct {
	Source string       `json:"source"`
	Rows   int          `json:"rows"`
	Cols   int          `json:"cols"`
	X      []float64    `json:"x"`
	Y      []float64    `json:"y"`
	Fits   []sklearnFit `json:"fits"`
}

func readFixtures(t testing.TB) map[string]sklearnFixture {
	paths, err := filepath.Glob("../../testdata/sklearn/fixture_*.json")
	if err != nil || len(paths) == 0 {
		t.Fatalf("no fixtures under testdata/sklearn: %v", err)
	}
	out := map[string]sklearnFixture{}
	for _, p := range paths {
		data, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		var f sklearnFixture
		if err := json.Unmarshal(data, &f); err != nil {
			t.Fatalf("%s: %v", p, err)
		}
		if len(f.X) != f.Rows*f.Cols || len(f.Y) != f.Rows {
			t.Fatalf("%s: sizes do not match %d x %d", p, f.Rows, f.Cols)
		}
		out[filepath.Base(p)] = f
	}
	return out
}

func maxDiff(a, b []float64) float64 {
	d := 0.0
	for i := range a {
		d = math.Max(d, math.Abs(a[i]-b[i]))
	}
	return d
}

// Coordinate descent against scikit-learn's Lasso and ElasticNet on the committed fixtures
// (reference library: scikit-learn, Debian python3-sklearn, made by
// testdata/sklearn/make_fixtures.py): the same minimizer to 1e-6 in every coefficient.
func TestCoordinateDescentMatchesSklearn(t *testing.T) {
	for name, fx := range readFixtures(t) {
		a := &Matrix{Rows: fx.Rows, Cols: fx.Cols, Data: fx.X}
		for _, fit := range fx.Fits {
			sol, err := CoordinateDescent(context.Background(), a, fx.Y, fit.L1, fit.L2, nil, SolverOptions{Tol: 1e-16, MaxIter: 100000})
			if err != nil {
				t.Fatal(err)
			}
			if !sol.Converged {
				t.Errorf("%s %s alpha=%g: not converged, gap %g", name, fit.Kind, fit.Alpha, sol.Residual)
			}
			if d := maxDiff(sol.X, fit.Coef); d > 1e-6 {
				t.Errorf("%s %s alpha=%g ratio=%g: max |x - sklearn| = %g", name, fit.Kind, fit.Alpha, fit.Ratio, d)
			}
			nz := 0
			for _, v := range sol.X {
				if v != 0 {
					nz++
				}
			}
			if nz != fit.NonZero {
				t.Errorf("%s %s alpha=%g: %d nonzero, sklearn %d", name, fit.Kind, fit.Alpha, nz, fit.NonZero)
			}
		}
	}
}

func svdOf(t testing.TB, a *Matrix) *SVD {
	d := mat.NewDense(a.Cols, a.Rows, a.Data) // F^T, row-major
	var svd mat.SVD
	if !svd.Factorize(d.T(), mat.SVDFull) {
		t.Fatal("SVD failed")
	}
	var u, v mat.Dense
	svd.UTo(&u)
	svd.VTo(&v)
	return NewSVD(&DenseOrthogonal{Q: &u}, &DenseOrthogonal{Q: &v}, svd.Values(nil))
}

// Accelerated proximal gradient and VAMP reach the same minimizers as scikit-learn (reference
// library: scikit-learn, Debian python3-sklearn; fixtures by testdata/sklearn/make_fixtures.py).
func TestProxAndVAMPMatchSklearn(t *testing.T) {
	for name, fx := range readFixtures(t) {
		a := &Matrix{Rows: fx.Rows, Cols: fx.Cols, Data: fx.X}
		f := svdOf(t, a)
		for _, fit := range fx.Fits {
			p, err := penalty.ElasticNet(fit.L1, fit.L2)
			if err != nil {
				t.Fatal(err)
			}
			o := SolverOptions{Tol: 1e-12, MaxIter: 200000}
			sol, err := ProxGradient(context.Background(), a, fx.Y, p, 0, nil, o)
			if err != nil {
				t.Fatal(err)
			}
			if d := maxDiff(sol.X, fit.Coef); d > 1e-6 || !sol.Converged {
				t.Errorf("prox %s %s alpha=%g: max diff %g, converged %v after %d (residual %g)", name, fit.Kind, fit.Alpha, d, sol.Converged, sol.Iterations, sol.Residual)
			}
			vr, err := VAMP(context.Background(), f, fx.Y, p, VAMPOptions{SolverOptions: o})
			if err != nil {
				t.Fatal(err)
			}
			if d := maxDiff(vr.X, fit.Coef); d > 1e-6 || !vr.Converged {
				t.Errorf("vamp %s %s alpha=%g: max diff %g, converged %v after %d (residual %g)", name, fit.Kind, fit.Alpha, d, vr.Converged, vr.Iterations, vr.Residual)
			}
			t.Logf("%s %s alpha=%g: prox %d its, vamp %d its", name, fit.Kind, fit.Alpha, sol.Iterations, vr.Iterations)
		}
	}
}
