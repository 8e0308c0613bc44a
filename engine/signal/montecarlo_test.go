package signal

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"hdrisk/engine/penalty"
)

// Monte Carlo sanity of Expect for non-Gaussian laws: draw x0 from the law itself (Sample, not
// the mixture), z ~ N(0, 1), and average (prox(x0 + sqrt(t) z) - x0)^2 and prox'(...). The
// averages must agree with Expect within 4.5 standard errors (common practice; the seeds are
// fixed, so the test is deterministic).
func TestMonteCarlo(t *testing.T) {
	const n = 1_000_000
	for _, tc := range []struct {
		l    Law
		p    penalty.Penalty
		g, t float64
	}{
		{must(Laplace(0.8)), must(penalty.L1(0.5)), 1.5, 0.2},
		{must(Uniform(1.2)), must(penalty.Box(0.8, 0.3)), 2, 0.1},
		{must(StudentT(4, 0.7)), must(penalty.L1(0.3)), 1, 0.05},
	} {
		want := Expect(tc.l, tc.p, tc.g, tc.t)
		for seed := range uint64(2) {
			rng := rand.New(rand.NewPCG(seed, 99))
			x0 := tc.l.Sample(rng, n)
			var s, s2, d, d2, nz float64
			st := math.Sqrt(tc.t)
			for _, x := range x0 {
				r := x + st*rng.NormFloat64()
				xh := tc.p.Prox(r, tc.g)
				e := (xh - x) * (xh - x)
				s += e
				s2 += e * e
				dv := tc.p.Deriv(r, tc.g)
				d += dv
				d2 += dv * dv
				if xh != 0 {
					nz++
				}
			}
			mse, a, pnz := s/n, d/n, nz/n
			seMSE := math.Sqrt((s2/n - mse*mse) / n)
			seA := math.Sqrt((d2/n - a*a) / n)
			seNZ := math.Sqrt(pnz * (1 - pnz) / n)
			if math.Abs(mse-want.MSE) > 4.5*seMSE || math.Abs(a-want.A) > 4.5*seA || math.Abs(pnz-want.NonZero) > 4.5*seNZ+1e-12 {
				t.Errorf("%s/%s seed %d: Monte Carlo MSE %.6g +- %.2g, A %.6g +- %.2g, NonZero %.6g +- %.2g; Expect %+v",
					tc.l.Name(), tc.p.Name(), seed, mse, seMSE, a, seA, pnz, seNZ, want)
			}
		}
	}
}

// Sample draws from the law itself: its mean and second moment agree with the law within 4.5
// standard errors, and for the continuous laws the Kolmogorov-Smirnov distance to gonum's
// distuv CDF (the reference library) is below 1.95/sqrt(n), the 0.1% critical value (common
// practice; fixed seeds).
func TestSample(t *testing.T) {
	const n = 200_000
	for _, tc := range []struct {
		l   Law
		cdf func(float64) float64
	}{
		{must(Gauss(2)), distuv.Normal{Mu: 0, Sigma: math.Sqrt2}.CDF},
		{must(BernoulliGauss(0.3, 1)), nil},
		{must(BernoulliRademacher(0.4, 2)), nil},
		{must(Laplace(0.6)), distuv.Laplace{Mu: 0, Scale: 0.6}.CDF},
		{must(Uniform(1.5)), distuv.Uniform{Min: -1.5, Max: 1.5}.CDF},
		{must(StudentT(6, 0.8)), distuv.StudentsT{Mu: 0, Sigma: 0.8, Nu: 6}.CDF},
		{must(GaussMixture([]float64{0.2, 0.8}, []float64{3, -1}, []float64{0.1, 0.5})), nil},
		{must(Empirical([]float64{-1, 0, 0, 4})), nil},
	} {
		rng := rand.New(rand.NewPCG(7, 11))
		x := tc.l.Sample(rng, n)
		if len(x) != n {
			t.Fatalf("%s: %d samples, want %d", tc.l.Name(), len(x), n)
		}
		var m1, m2, m4 float64
		for _, v := range x {
			m1 += v
			m2 += v * v
			m4 += v * v * v * v
		}
		m1, m2, m4 = m1/n, m2/n, m4/n
		var mean float64
		for _, c := range tc.l.Mixture() {
			mean += c.Weight * c.Mean
		}
		se1 := math.Sqrt(m2 / n)
		se2 := math.Sqrt((m4 - m2*m2) / n)
		if math.Abs(m1-mean) > 4.5*se1 || math.Abs(m2-tc.l.Second()) > 4.5*se2 {
			t.Errorf("%s: sample mean %.5g (law %.5g +- %.2g), second %.5g (law %.5g +- %.2g)",
				tc.l.Name(), m1, mean, se1, m2, tc.l.Second(), se2)
		}
		if tc.cdf != nil {
			sort.Float64s(x)
			ks := 0.0
			for i, v := range x {
				f := tc.cdf(v)
				ks = math.Max(ks, math.Max(math.Abs(f-float64(i)/n), math.Abs(f-float64(i+1)/n)))
			}
			if ks > 1.95/math.Sqrt(n) {
				t.Errorf("%s: Kolmogorov-Smirnov distance %.4g to distuv's CDF", tc.l.Name(), ks)
			}
		}
	}
	if got := must(Gauss(1)).Sample(rand.New(rand.NewPCG(1, 1)), 0); len(got) != 0 {
		t.Errorf("Sample(0) = %v", got)
	}
}
