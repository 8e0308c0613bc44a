package simulate

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

type benchFixture struct {
	Source  string    `json:"source"`
	Rows    int       `json:"rows"`
	Cols    int       `json:"cols"`
	Seed    uint64    `json:"seed"`
	Tol     float64   `json:"tol"`
	L1      float64   `json:"l1"`
	Y       []float64 `json:"y"`
	Seconds float64   `json:"sklearn_seconds"`
	NonZero int       `json:"nonzero"`
	Coef    []float64 `json:"coef"`
}

// splitmixDesign rebuilds the design of testdata/sklearn/bench_lasso.py bit for bit: entries
// (2u - 1) sqrt(3/m), u from splitmix64 (Steele, Lea & Flood 2014, "Fast splittable pseudorandom
// number generators", OOPSLA), filled column by column.
func splitmixDesign(m, n int, seed uint64) *Matrix {
	a := &Matrix{Rows: m, Cols: n, Data: make([]float64, m*n)}
	s := seed
	scale := math.Sqrt(3 / float64(m))
	for i := range a.Data {
		s += 0x9E3779B97F4A7C15
		z := s
		z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9
		z = (z ^ (z >> 27)) * 0x94D049BB133111EB
		z ^= z >> 31
		u := float64(z>>11) * 0x1p-53
		a.Data[i] = (2*u - 1) * scale
	}
	return a
}

func readBench(t testing.TB) (benchFixture, *Matrix) {
	data, err := os.ReadFile("../../testdata/sklearn/bench_lasso.json")
	if err != nil {
		t.Fatal(err)
	}
	var b benchFixture
	if err := json.Unmarshal(data, &b); err != nil {
		t.Fatal(err)
	}
	return b, splitmixDesign(b.Rows, b.Cols, b.Seed)
}

// The benchmark instance solved to a tight gap has the support and, to the accuracy of
// scikit-learn's own stopping rule, the coefficients of scikit-learn's Lasso at tol = 1e-8
// (reference library: scikit-learn, Debian python3-sklearn; testdata/sklearn/bench_lasso.py).
func TestBenchInstanceMatchesSklearn(t *testing.T) {
	b, a := readBench(t)
	sol, err := CoordinateDescent(context.Background(), a, b.Y, b.L1, 0, nil, SolverOptions{Tol: 1e-15, MaxIter: 100000})
	if err != nil || !sol.Converged {
		t.Fatalf("not converged: %v %+v", err, sol.Residual)
	}
	nz := 0
	for _, v := range sol.X {
		if v != 0 {
			nz++
		}
	}
	if nz != b.NonZero {
		t.Errorf("%d nonzero, scikit-learn %d", nz, b.NonZero)
	}
	if d := maxDiff(sol.X, b.Coef); d > 1e-3 {
		t.Errorf("max |x - sklearn| = %g", d)
	}
}

// BenchmarkLassoCD500x1000 times coordinate descent on the instance of bench_lasso.py with the
// same stopping rule as scikit-learn (duality gap <= 1e-8 ||y||^2); compare ns/op with
// sklearn_seconds in testdata/sklearn/bench_lasso.json (budget: at most 1.5 times).
func BenchmarkLassoCD500x1000(bm *testing.B) {
	b, a := readBench(bm)
	bm.ReportMetric(b.Seconds, "sklearn-s")
	bm.ResetTimer()
	for bm.Loop() {
		sol, err := CoordinateDescent(context.Background(), a, b.Y, b.L1, 0, nil, SolverOptions{Tol: b.Tol, MaxIter: 100000})
		if err != nil || !sol.Converged {
			bm.Fatal("not converged")
		}
	}
}

// BenchmarkCheckN1000 times the whole check of testdata/sklearn/bench_check.py (3 trials at
// n = 1000: instances drawn with fast factors, solved by coordinate descent to a duality gap of
// 1e-8 ||y||^2, beside the prediction); compare with seconds_median in bench_check.json
// (budget: at most 1.5 times numpy plus scikit-learn).
func BenchmarkCheckN1000(b *testing.B) {
	d, _ := design.Orthogonal(0.5, design.Rows)
	sig, _ := signal.BernoulliGauss(0.1, 1)
	pen, _ := penalty.L1(0.05)
	p := Problem{Problem: fixedpoint.Problem{Design: d, Signal: sig, Penalty: pen, Noise: 0.01}}
	seed := uint64(0)
	for b.Loop() {
		seed++
		rep, err := Check(context.Background(), p, Options{N: 1000, Trials: 3, Seed: seed}, nil)
		if err != nil || rep.NotConverged != 0 {
			b.Fatal(err, rep.NotConverged)
		}
	}
}
