package data

import (
	"math"
	"math/rand/v2"
	"testing"
)

// within reports whether got is within z standard errors of want.
func within(t *testing.T, name string, got, want, se, z float64) {
	t.Helper()
	if math.Abs(got-want) > z*se {
		t.Errorf("%s = %.5g, want %.5g within %g x %.3g", name, got, want, z, se)
	}
}

func bernoulliGauss(rng *rand.Rand, n int, rho, v, noise float64) []float64 {
	x := make([]float64, n)
	for i := range x {
		if rng.Float64() < rho {
			x[i] = math.Sqrt(v) * rng.NormFloat64()
		}
		x[i] += noise * rng.NormFloat64()
	}
	return x
}

// The standard errors used below are those of a binomial proportion, sqrt(p(1-p)/n), and
// of a Gaussian variance estimated from k samples, v sqrt(2/k) (common practice).
func TestFitBernoulliGaussExact(t *testing.T) {
	const n, rho, v = 20000, 0.1, 2.0
	x := bernoulliGauss(rand.New(rand.NewPCG(11, 12)), n, rho, v, 0)
	f, err := FitBernoulliGauss(x, 0)
	if err != nil {
		t.Fatal(err)
	}
	within(t, "density", f.Density, rho, math.Sqrt(rho*(1-rho)/n), 4)
	within(t, "variance", f.Variance, v, v*math.Sqrt(2/(rho*n)), 4)
	if !f.Converged || f.Iterations != 0 {
		t.Errorf("closed form: converged %v after %d", f.Converged, f.Iterations)
	}
	// The fit maximizes the likelihood against (point mass at 0) + Lebesgue measure.
	ll := func(r, s float64) float64 {
		sum := 0.0
		for _, xi := range x {
			if xi == 0 {
				sum += math.Log(1 - r)
			} else {
				sum += math.Log(r) - 0.5*math.Log(2*math.Pi*s) - xi*xi/(2*s)
			}
		}
		return sum
	}
	if d := f.LogLik - ll(f.Density, f.Variance); math.Abs(d) > 1e-9*math.Abs(f.LogLik) {
		t.Errorf("LogLik %g differs from the direct sum by %g", f.LogLik, d)
	}
	for _, p := range [][2]float64{{0.99, 1}, {1.01, 1}, {1, 0.99}, {1, 1.01}} {
		if ll(f.Density*p[0], f.Variance*p[1]) >= f.LogLik {
			t.Errorf("perturbation %v raises the likelihood", p)
		}
	}
}

func TestFitBernoulliGaussWidth(t *testing.T) {
	const n, rho, v, noise = 20000, 0.2, 1.5, 1e-3
	x := bernoulliGauss(rand.New(rand.NewPCG(13, 14)), n, rho, v, noise)
	f, err := FitBernoulliGauss(x, noise)
	if err != nil {
		t.Fatal(err)
	}
	if !f.Converged || f.Iterations < 2 {
		t.Errorf("EM: converged %v after %d iterations", f.Converged, f.Iterations)
	}
	within(t, "density", f.Density, rho, math.Sqrt(rho*(1-rho)/n), 4)
	within(t, "variance", f.Variance, v+noise*noise, v*math.Sqrt(2/(rho*n)), 4)
	// With no width the noisy zeros count as nonzero: the exact fit is then wrong, which is
	// why the width exists.
	g, _ := FitBernoulliGauss(x, 0)
	if g.Density != 1 {
		t.Errorf("noisy samples without a width: density %g, want 1", g.Density)
	}
}

func TestFitBernoulliGaussRefusals(t *testing.T) {
	for _, c := range []struct {
		x []float64
		w float64
	}{{nil, 0}, {[]float64{0, 0}, 0}, {[]float64{1, math.NaN()}, 0}, {[]float64{1}, -1}, {[]float64{1}, math.Inf(1)}, {[]float64{1e-9, -1e-9}, 1e-3}} {
		if _, err := FitBernoulliGauss(c.x, c.w); err == nil {
			t.Errorf("FitBernoulliGauss(%v, %g) accepted", c.x, c.w)
		}
	}
	f, err := FitBernoulliGauss([]float64{1, -1, 2, -2}, 0)
	if err != nil || f.Density != 1 || f.Variance != 2.5 {
		t.Errorf("no zeros: %+v %v, want density 1 and variance 2.5", f, err)
	}
}

type mixture struct{ w, m, v []float64 }

func (g mixture) sample(rng *rand.Rand, n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		u, j := rng.Float64(), 0
		for j < len(g.w)-1 && u >= g.w[j] {
			u -= g.w[j]
			j++
		}
		x[i] = g.m[j] + math.Sqrt(g.v[j])*rng.NormFloat64()
	}
	return x
}

func TestFitGaussMixtureRecovers(t *testing.T) {
	const n = 8000
	for i, g := range []mixture{
		{[]float64{0.3, 0.7}, []float64{-2, 3}, []float64{0.5, 1}},
		{[]float64{0.25, 0.5, 0.25}, []float64{-3, 0, 4}, []float64{1, 0.1, 0.5}},
	} {
		x := g.sample(rand.New(rand.NewPCG(uint64(20+i), 21)), n)
		f, err := FitGaussMixture(x, len(g.w), MixtureOptions{Seed: 5})
		if err != nil {
			t.Fatal(err)
		}
		if !f.Converged || len(f.Weights) != len(g.w) {
			t.Fatalf("case %d: %+v", i, f)
		}
		for j := range g.w {
			nj := g.w[j] * n
			within(t, "weight", f.Weights[j], g.w[j], math.Sqrt(g.w[j]*(1-g.w[j])/n), 5)
			within(t, "mean", f.Means[j], g.m[j], math.Sqrt(g.v[j]/nj), 5)
			within(t, "variance", f.Variances[j], g.v[j], g.v[j]*math.Sqrt(2/nj), 5)
		}
		again, _ := FitGaussMixture(x, len(g.w), MixtureOptions{Seed: 5})
		if again.LogLik != f.LogLik || again.Means[0] != f.Means[0] {
			t.Errorf("case %d: two runs with one seed differ", i)
		}
	}
}

// EM never lowers the likelihood (Dempster, Laird & Rubin 1977, theorem 1).
func TestFitGaussMixtureMonotone(t *testing.T) {
	x := mixture{[]float64{0.5, 0.5}, []float64{-1, 1.5}, []float64{1, 1}}.sample(rand.New(rand.NewPCG(7, 8)), 2000)
	prev := math.Inf(-1)
	for it := 1; it <= 25; it++ {
		f, err := FitGaussMixture(x, 2, MixtureOptions{Seed: 1, Starts: 1, MaxIter: it, Tol: 1e-300})
		if err != nil {
			t.Fatal(err)
		}
		if f.Iterations != it || f.LogLik < prev-1e-9*math.Abs(prev) {
			t.Fatalf("iteration %d: log-likelihood %.12g after %.12g (%d iterations run)", it, f.LogLik, prev, f.Iterations)
		}
		prev = f.LogLik
	}
}

// Half the samples are one repeated value: without a floor a component would shrink onto
// it and the likelihood would grow without bound.
func TestFitGaussMixtureFloor(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	x := make([]float64, 1000)
	for i := 500; i < len(x); i++ {
		x[i] = 3 + rng.NormFloat64()
	}
	f, err := FitGaussMixture(x, 2, MixtureOptions{})
	if err != nil {
		t.Fatal(err)
	}
	_, v := meanVar(x)
	if f.Floor != 1e-6*v || f.Variances[0] != f.Floor || math.Abs(f.Means[0]) > 1e-9 || math.IsInf(f.LogLik, 0) || math.IsNaN(f.LogLik) {
		t.Errorf("floor %g: %+v", f.Floor, f)
	}
	// The narrow component also takes a sliver of the Gaussian samples that fall near 0.
	within(t, "weight of the repeated value", f.Weights[0], 0.5, 1e-3, 1)
}

func TestFitGaussMixtureEdges(t *testing.T) {
	f, err := FitGaussMixture([]float64{1, 2, 3, 6}, 1, MixtureOptions{})
	if err != nil || f.Means[0] != 3 || f.Variances[0] != 3.5 || f.Weights[0] != 1 {
		t.Errorf("k = 1: %+v %v, want mean 3, variance 3.5", f, err)
	}
	for _, c := range []struct {
		x   []float64
		k   int
		opt MixtureOptions
	}{
		{nil, 1, MixtureOptions{}},
		{[]float64{1, 2}, 0, MixtureOptions{}},
		{[]float64{1, 1, 2}, 3, MixtureOptions{}},
		{[]float64{4, 4, 4}, 1, MixtureOptions{}},
		{[]float64{1, math.Inf(1)}, 1, MixtureOptions{}},
		{[]float64{1, 2}, 1, MixtureOptions{Starts: -1}},
		{[]float64{1, 2}, 1, MixtureOptions{MaxIter: -1}},
		{[]float64{1, 2}, 1, MixtureOptions{Tol: math.NaN()}},
	} {
		if _, err := FitGaussMixture(c.x, c.k, c.opt); err == nil {
			t.Errorf("FitGaussMixture(%v, %d, %+v) accepted", c.x, c.k, c.opt)
		}
	}
	// As many components as distinct values is allowed.
	if f, err := FitGaussMixture([]float64{1, 1, 2, 2, 5}, 3, MixtureOptions{}); err != nil || len(f.Means) != 3 {
		t.Errorf("k = distinct: %+v %v", f, err)
	}
}
