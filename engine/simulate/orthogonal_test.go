package simulate

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func orthogonalityError(q Orthogonal) float64 {
	d := Dense(q)
	n, _ := d.Dims()
	var p mat.Dense
	p.Mul(d.T(), d)
	worst := 0.0
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			want := 0.0
			if i == j {
				want = 1
			}
			worst = math.Max(worst, math.Abs(p.At(i, j)-want))
		}
	}
	// MulT must be the transpose of Mul.
	x := normals(rand.New(rand.NewPCG(1, 2)), n)
	a, b := make([]float64, n), make([]float64, n)
	q.MulT(a, x)
	b2 := mat.NewVecDense(n, b)
	b2.MulVec(d.T(), mat.NewVecDense(n, x))
	for i := range a {
		worst = math.Max(worst, math.Abs(a[i]-b[i]))
	}
	return worst
}

func TestOrthogonality(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	for _, n := range []int{1, 2, 3, 5, 11, 64, 97, 130, 257} {
		cases := map[string]Orthogonal{
			"qr":          HaarQR(rng, n),
			"householder": HaarHouseholder(rng, n),
			"fast":        NewFast(rng, n, DefaultRounds),
		}
		for name, q := range cases {
			if e := orthogonalityError(q); e > 1e-12 {
				t.Errorf("%s n=%d: max |Q^T Q - I| or |MulT - Q^T| = %g", name, n, e)
			}
		}
	}
}

// Values checked by hand: 960 = 2^6 15, 1000 = 2^3 125 is not a candidate (125 > 45), 98304 =
// 2^15 3, 100000 = 2^5 3125 is not either; k - 1 = 2^a q with q odd in {1, 3, 5, 9, 15, 25, 27, 45}.
func TestSmoothBlock(t *testing.T) {
	for _, c := range []struct{ n, k int }{{3, 3}, {10, 10}, {12, 11}, {1000, 961}, {1014, 961}, {100000, 98305}, {100003, 98305}, {1153, 1153}} {
		if got := smoothBlock(c.n); got != c.k {
			t.Errorf("smoothBlock(%d) = %d, want %d", c.n, got, c.k)
		}
	}
}

// haarMoments estimates E[Q11^2], E[Q11^4], E[tr Q], E[(tr Q)^2], E[tr Q^2] with standard errors.
func haarMoments(draw func() *mat.Dense, samples int) (mean, se [5]float64) {
	var sum, sum2 [5]float64
	for s := 0; s < samples; s++ {
		q := draw()
		tr := mat.Trace(q)
		var q2 mat.Dense
		q2.Mul(q, q)
		v := [5]float64{sq(q.At(0, 0)), sq(sq(q.At(0, 0))), tr, tr * tr, mat.Trace(&q2)}
		for i := range v {
			sum[i] += v[i]
			sum2[i] += v[i] * v[i]
		}
	}
	k := float64(samples)
	for i := range sum {
		mean[i] = sum[i] / k
		se[i] = math.Sqrt((sum2[i]/k - mean[i]*mean[i]) / (k - 1))
	}
	return mean, se
}

// Moments of Haar orthogonal matrices of order n. Q11^2 is Beta(1/2, (n-1)/2), so E[Q11^2] = 1/n
// and E[Q11^4] = 3/(n(n+2)) (common practice: the first row is uniform on the sphere). The trace
// moments E[tr Q] = 0, E[(tr Q)^2] = 1 and E[tr Q^2] = 1 hold exactly for n >= 2 (Diaconis &
// Shahshahani 1994, "On the eigenvalues of random matrices", J. Appl. Probab. 31A, 49-62).
func TestHaarMoments(t *testing.T) {
	const n, samples = 6, 6000
	want := [5]float64{1.0 / n, 3.0 / (n * (n + 2)), 0, 1, 1}
	names := [5]string{"E[Q11^2]", "E[Q11^4]", "E[tr Q]", "E[(tr Q)^2]", "E[tr Q^2]"}
	rng := rand.New(rand.NewPCG(2026, 1))
	draws := map[string]func() *mat.Dense{
		"qr":          func() *mat.Dense { return HaarQR(rng, n).Q },
		"householder": func() *mat.Dense { return Dense(HaarHouseholder(rng, n)) },
	}
	for name, draw := range draws {
		mean, se := haarMoments(draw, samples)
		for i := range want {
			if math.Abs(mean[i]-want[i]) > 4*se[i] {
				t.Errorf("%s: %s = %.4f +- %.4f, want %.4f", name, names[i], mean[i], se[i], want[i])
			}
		}
	}
}

// The same moments without the sign fix of Mezzadri 2007 miss the Haar values: the check above
// has the power to see a non-Haar law.
func TestHaarMomentsNeedSignFix(t *testing.T) {
	const n, samples = 6, 6000
	rng := rand.New(rand.NewPCG(2026, 2))
	raw := func() *mat.Dense {
		var qr mat.QR
		qr.Factorize(mat.NewDense(n, n, normals(rng, n*n)))
		var q mat.Dense
		qr.QTo(&q)
		return &q
	}
	mean, se := haarMoments(raw, samples)
	wantTrace, wantTrace2 := 0.0, 1.0
	if math.Abs(mean[2]-wantTrace) < 4*se[2] && math.Abs(mean[3]-wantTrace2) < 4*se[3] {
		t.Errorf("unfixed QR passes the trace moments (E[tr Q] = %.3f, E[(tr Q)^2] = %.3f): the test has no power", mean[2], mean[3])
	}
}

// DenseOf forms U S V^T with fewer products than one per column; it must agree with the
// column-by-column products.
func TestDenseOfSVD(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 3))
	for _, mn := range [][2]int{{5, 9}, {9, 5}, {7, 7}} {
		m, n := mn[0], mn[1]
		s := normals(rng, min(m, n))
		f := NewSVD(NewFast(rng, m, 2), HaarHouseholder(rng, n), s)
		a := DenseOf(f)
		e := make([]float64, n)
		col := make([]float64, m)
		for j := 0; j < n; j++ {
			e[j] = 1
			f.Mul(col, e)
			e[j] = 0
			if d := maxDiff(col, a.Col(j)); d > 1e-14 {
				t.Errorf("%dx%d column %d differs by %g", m, n, j, d)
			}
		}
	}
}

// Every coordinate of a Fast matrix is mixed: no column of Q is a signed column of the
// identity, at sizes where a random draw of the permutations leaves some unmixed (n = 1e4,
// block k = 9217: about (1 - k/n)^3 n = 5 coordinates). An unmixed coordinate j is copied
// exactly, up to its sign, to some position i, so (Q x)_i = +-x_j for every x: two random
// vectors find it, where a mixed coordinate matches no entry of x exactly.
func TestFastMixesEveryCoordinate(t *testing.T) {
	for _, n := range []int{10000, 5000, 40000} {
		rng := rand.New(rand.NewPCG(1, 0))
		f := NewFast(rng, n, DefaultRounds)
		x1, x2 := normals(rng, n), normals(rng, n)
		y1, y2 := make([]float64, n), make([]float64, n)
		f.Mul(y1, x1)
		f.Mul(y2, x2)
		at := map[float64]int{}
		for j, v := range x1 {
			at[math.Abs(v)] = j
		}
		for i, v := range y1 {
			if j, ok := at[math.Abs(v)]; ok && math.Abs(y2[i]) == math.Abs(x2[j]) {
				t.Errorf("n = %d: coordinate %d is copied to %d unmixed", n, j, i)
			}
		}
	}
}
