package data

import (
	"math"
	"math/rand/v2"
	"slices"
)

// Fits of a signal law to samples by maximum likelihood through expectation maximization
// (Dempster, Laird & Rubin 1977, J. R. Stat. Soc. B; for Gaussian mixtures, Bishop 2006,
// Pattern Recognition and Machine Learning, section 9.2). The fitted laws are those of
// docs/method.md section 6 and of the scenario file: bernoulli-gauss {density, variance} and
// gauss-mixture {weights, means, variances}.

const log2Pi = 1.8378770664093453 // log(2 pi)

func checkSamples(x []float64) error {
	if len(x) == 0 {
		return paramErr("samples", "is empty")
	}
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return paramErr("samples", "entry %d is %g", i, v)
		}
	}
	return nil
}

// BernoulliGaussFit is a fitted law x0 = 0 with probability 1 - Density, else x0 ~ N(0, Variance).
type BernoulliGaussFit struct {
	Density    float64 // P(x0 != 0), in (0, 1]
	Variance   float64 // variance of the nonzero part, > 0
	LogLik     float64 // total log-likelihood of the samples at the fit (see FitBernoulliGauss for the measure)
	Iterations int     // EM iterations; 0 for the closed form
	Converged  bool
}

// FitBernoulliGauss fits a Bernoulli-Gaussian law to samples x.
//
// The zero component is a point mass, which has no density against Lebesgue measure; how
// samples are attributed to it is set by zeroWidth:
//
//   - zeroWidth = 0: the likelihood is taken against the point mass at 0 plus Lebesgue
//     measure, under which an exact zero can only come from the point mass and any other
//     value only from the Gaussian. The maximum is then in closed form: Density is the
//     fraction of nonzero samples and Variance their mean square. Use it for samples of a
//     signal that is exactly sparse. LogLik is against the same measure.
//   - zeroWidth > 0: the zero component is taken as N(0, zeroWidth^2), for samples whose
//     zeros carry rounding or a little noise, and the two weights and the slab variance are
//     fitted by EM (stopping when the log-likelihood changes by less than 1e-12 of its size,
//     at most 10000 iterations). The slab variance is kept at least zeroWidth^2, so that the
//     two components stay distinguishable. The fitted law reports the spike as an exact
//     point mass; LogLik is the likelihood of the model with the widened spike.
//
// Special cases are: empty samples or NaN/Inf entries, a negative, NaN or Inf zeroWidth,
// and samples without any value outside the spike (all zeros) are refused (*ParamError).
func FitBernoulliGauss(x []float64, zeroWidth float64) (BernoulliGaussFit, error) {
	if err := checkSamples(x); err != nil {
		return BernoulliGaussFit{}, err
	}
	if !(zeroWidth >= 0) || math.IsInf(zeroWidth, 0) {
		return BernoulliGaussFit{}, paramErr("zeroWidth", "must be finite and >= 0, got %g", zeroWidth)
	}
	n := float64(len(x))
	if zeroWidth == 0 {
		k, ss := 0, 0.0
		for _, v := range x {
			if v != 0 {
				k++
				ss += v * v
			}
		}
		if k == 0 {
			return BernoulliGaussFit{}, paramErr("samples", "are all zero: there is no nonzero part to fit")
		}
		f := BernoulliGaussFit{Density: float64(k) / n, Variance: ss / float64(k), Converged: true}
		f.LogLik = (n-float64(k))*math.Log1p(-f.Density) + float64(k)*(math.Log(f.Density)-0.5*(log2Pi+math.Log(f.Variance)+1))
		if k == len(x) {
			f.LogLik = -0.5 * n * (log2Pi + math.Log(f.Variance) + 1)
		}
		return f, nil
	}
	s0 := zeroWidth * zeroWidth
	out, ss := 0, 0.0
	for _, v := range x {
		if math.Abs(v) > 3*zeroWidth {
			out++
			ss += v * v
		}
	}
	if out == 0 {
		return BernoulliGaussFit{}, paramErr("samples", "none lies beyond 3 zeroWidth (%g) from 0: there is no nonzero part to fit", 3*zeroWidth)
	}
	rho, v := float64(out)/n, max(ss/float64(out), s0)
	const tol, maxIter = 1e-12, 10000
	f := BernoulliGaussFit{LogLik: math.Inf(-1)}
	for f.Iterations < maxIter {
		f.Iterations++
		var sr, srx2, ll float64
		ls, lz := math.Log(rho)-0.5*(log2Pi+math.Log(v)), math.Log1p(-rho)-0.5*(log2Pi+math.Log(s0))
		for _, xi := range x {
			a := ls - xi*xi/(2*v)
			b := lz - xi*xi/(2*s0)
			m := max(a, b)
			lse := m + math.Log(math.Exp(a-m)+math.Exp(b-m))
			r := math.Exp(a - lse)
			sr += r
			srx2 += r * xi * xi
			ll += lse
		}
		if sr == 0 {
			return BernoulliGaussFit{}, paramErr("samples", "the spike of width %g explains every sample: there is no nonzero part to fit", zeroWidth)
		}
		f.Converged = math.Abs(ll-f.LogLik) <= tol*math.Abs(ll)
		f.LogLik = ll
		if f.Converged || f.Iterations == maxIter {
			break
		}
		rho = min(sr/n, 1)
		v = max(srx2/sr, s0)
	}
	f.Density, f.Variance = rho, v
	return f, nil
}

// MixtureOptions tunes FitGaussMixture. Zero fields take the defaults.
type MixtureOptions struct {
	Seed    uint64  // seed of the k-means++ starts (math/rand/v2 PCG); the fit is a function of (x, k, options)
	Starts  int     // k-means++ starts besides the quantile start; default 4
	MaxIter int     // EM iterations per start; default 500
	Tol     float64 // stop when the log-likelihood changes by less than Tol times its size; default 1e-10
}

// MixtureFit is a fitted law sum_k Weights[k] N(Means[k], Variances[k]), components sorted
// by mean.
type MixtureFit struct {
	Weights, Means, Variances []float64
	LogLik                    float64 // total log-likelihood of the samples at the fit
	Iterations                int     // EM iterations of the start that won
	Converged                 bool    // whether that start met the stopping rule
	Floor                     float64 // the variance floor used: 1e-6 times the sample variance
}

// FitGaussMixture fits a k-component Gaussian mixture to samples x by EM, from several
// starts: one from the quantiles (component j starts on the j-th of k equal-count slices
// of the sorted samples) and opt.Starts from k-means++ seeding (Arthur & Vassilvitskii
// 2007, Proc. SODA) followed by one nearest-centre assignment. The start with the highest
// log-likelihood wins; the run is deterministic for given x, k and options. Each EM pass
// costs O(len(x) k).
//
// The likelihood of a mixture is unbounded when a component shrinks onto one sample, so
// every variance is kept at least Floor = 1e-6 times the sample variance: a cluster of
// repeated values then becomes a narrow component rather than a singularity. A component
// whose weight underflows to zero is dropped, so the fit may hold fewer than k components.
//
// Special cases are: empty samples or NaN/Inf entries, k < 1, k above the number of
// distinct values, samples that are all equal, and negative options are refused
// (*ParamError). k = 1 is the closed form (sample mean and variance), Iterations 0.
func FitGaussMixture(x []float64, k int, opt MixtureOptions) (MixtureFit, error) {
	if err := checkSamples(x); err != nil {
		return MixtureFit{}, err
	}
	switch {
	case k < 1:
		return MixtureFit{}, paramErr("k", "must be at least 1, got %d", k)
	case opt.Starts < 0:
		return MixtureFit{}, paramErr("Starts", "is negative (%d)", opt.Starts)
	case opt.MaxIter < 0:
		return MixtureFit{}, paramErr("MaxIter", "is negative (%d)", opt.MaxIter)
	case !(opt.Tol >= 0) || math.IsInf(opt.Tol, 0):
		return MixtureFit{}, paramErr("Tol", "must be finite and >= 0, got %g", opt.Tol)
	}
	if opt.Starts == 0 {
		opt.Starts = 4
	}
	if opt.MaxIter == 0 {
		opt.MaxIter = 500
	}
	if opt.Tol == 0 {
		opt.Tol = 1e-10
	}
	sorted := slices.Clone(x)
	slices.Sort(sorted)
	distinct := 1
	for i := 1; i < len(sorted); i++ {
		if sorted[i] != sorted[i-1] {
			distinct++
		}
	}
	if distinct == 1 {
		return MixtureFit{}, paramErr("samples", "are all equal (%g): a mixture needs spread; use the empirical law", sorted[0])
	}
	if k > distinct {
		return MixtureFit{}, paramErr("k", "%d components for %d distinct values", k, distinct)
	}
	mean, variance := meanVar(x)
	floor := 1e-6 * variance
	if k == 1 {
		ll := -0.5 * float64(len(x)) * (log2Pi + math.Log(variance) + 1)
		return MixtureFit{Weights: []float64{1}, Means: []float64{mean}, Variances: []float64{variance},
			LogLik: ll, Converged: true, Floor: floor}, nil
	}
	rng := rand.New(rand.NewPCG(opt.Seed, opt.Seed^0x9e3779b97f4a7c15))
	var best MixtureFit
	for s := 0; s <= opt.Starts; s++ {
		var c []float64
		if s == 0 {
			c = quantileStart(sorted, k)
		} else {
			c = kmeansPP(x, k, rng)
		}
		f := em(x, assign(x, c, floor), opt, floor)
		if s == 0 || f.LogLik > best.LogLik {
			best = f
		}
	}
	return best, nil
}

func meanVar(x []float64) (mean, variance float64) {
	for _, v := range x {
		mean += v
	}
	mean /= float64(len(x))
	for _, v := range x {
		variance += (v - mean) * (v - mean)
	}
	return mean, variance / float64(len(x))
}

// quantileStart returns the means of k equal-count slices of the sorted samples.
func quantileStart(sorted []float64, k int) []float64 {
	c := make([]float64, k)
	n := len(sorted)
	for j := range c {
		lo, hi := j*n/k, (j+1)*n/k
		for _, v := range sorted[lo:hi] {
			c[j] += v
		}
		c[j] /= float64(hi - lo)
	}
	return c
}

// kmeansPP picks k centres among the samples, each next one with probability proportional
// to its squared distance from the nearest centre so far.
func kmeansPP(x []float64, k int, rng *rand.Rand) []float64 {
	c := []float64{x[rng.IntN(len(x))]}
	d := make([]float64, len(x))
	for i, v := range x {
		d[i] = (v - c[0]) * (v - c[0])
	}
	for len(c) < k {
		total := 0.0
		for _, w := range d {
			total += w
		}
		u := rng.Float64() * total
		pick := len(x) - 1
		for i, w := range d {
			if u < w {
				pick = i
				break
			}
			u -= w
		}
		if d[pick] == 0 {
			// Only rounding can reach a sample already chosen; take the farthest instead.
			pick = argmax(d)
		}
		nc := x[pick]
		c = append(c, nc)
		for i, v := range x {
			d[i] = min(d[i], (v-nc)*(v-nc))
		}
	}
	return c
}

func argmax(d []float64) int {
	j := 0
	for i, w := range d {
		if w > d[j] {
			j = i
		}
	}
	return j
}

// assign turns centres into a first mixture: each sample goes to its nearest centre, and
// each cluster gives a weight, a mean and a variance (at least the floor). A centre that
// attracts no sample keeps its place with the floor variance and a small weight.
func assign(x, c []float64, floor float64) MixtureFit {
	k := len(c)
	cnt := make([]float64, k)
	sum := make([]float64, k)
	sq := make([]float64, k)
	for _, v := range x {
		j := 0
		for i := 1; i < k; i++ {
			if math.Abs(v-c[i]) < math.Abs(v-c[j]) {
				j = i
			}
		}
		cnt[j]++
		sum[j] += v
		sq[j] += v * v
	}
	f := MixtureFit{Weights: make([]float64, k), Means: make([]float64, k), Variances: make([]float64, k)}
	n := float64(len(x))
	for j := range c {
		if cnt[j] == 0 {
			f.Weights[j], f.Means[j], f.Variances[j] = 0.5/n, c[j], floor
			continue
		}
		m := sum[j] / cnt[j]
		f.Weights[j], f.Means[j], f.Variances[j] = cnt[j]/n, m, max(sq[j]/cnt[j]-m*m, floor)
	}
	return f
}

// em iterates expectation maximization from f, log-sum-exp in the E step.
func em(x []float64, f MixtureFit, opt MixtureOptions, floor float64) MixtureFit {
	k := len(f.Weights)
	f.Floor = floor
	f.LogLik = math.Inf(-1)
	lp := make([]float64, k)
	c := make([]float64, k)
	nk := make([]float64, k)
	sx := make([]float64, k)
	sxx := make([]float64, k)
	for f.Iterations = 0; f.Iterations < opt.MaxIter; {
		f.Iterations++
		for j := range c {
			c[j] = math.Log(f.Weights[j]) - 0.5*(log2Pi+math.Log(f.Variances[j]))
			nk[j], sx[j], sxx[j] = 0, 0, 0
		}
		ll := 0.0
		for _, v := range x {
			m := math.Inf(-1)
			for j := range lp {
				d := v - f.Means[j]
				lp[j] = c[j] - d*d/(2*f.Variances[j])
				m = max(m, lp[j])
			}
			s := 0.0
			for j := range lp {
				lp[j] = math.Exp(lp[j] - m)
				s += lp[j]
			}
			ll += m + math.Log(s)
			for j := range lp {
				r := lp[j] / s
				d := v - f.Means[j]
				nk[j] += r
				sx[j] += r * d
				sxx[j] += r * d * d
			}
		}
		f.Converged = math.Abs(ll-f.LogLik) <= opt.Tol*math.Abs(ll)
		f.LogLik = ll
		if f.Converged || f.Iterations == opt.MaxIter {
			break
		}
		n := float64(len(x))
		for j := range nk {
			if nk[j] == 0 {
				f.Weights[j] = 0
				continue
			}
			// Moments about the previous mean, which lies close to the new one, so that
			// the variance does not suffer the cancellation of E[x^2] - E[x]^2.
			d := sx[j] / nk[j]
			f.Weights[j], f.Means[j], f.Variances[j] = nk[j]/n, f.Means[j]+d, max(sxx[j]/nk[j]-d*d, floor)
		}
		if slices.Contains(f.Weights, 0) {
			f = dropEmpty(f)
			k = len(f.Weights)
			lp, c, nk, sx, sxx = lp[:k], c[:k], nk[:k], sx[:k], sxx[:k]
		}
	}
	return sortByMean(f)
}

func dropEmpty(f MixtureFit) MixtureFit {
	g := f
	g.Weights, g.Means, g.Variances = nil, nil, nil
	for j, w := range f.Weights {
		if w > 0 {
			g.Weights = append(g.Weights, w)
			g.Means = append(g.Means, f.Means[j])
			g.Variances = append(g.Variances, f.Variances[j])
		}
	}
	return g
}

func sortByMean(f MixtureFit) MixtureFit {
	idx := make([]int, len(f.Means))
	for i := range idx {
		idx[i] = i
	}
	slices.SortStableFunc(idx, func(a, b int) int {
		switch {
		case f.Means[a] < f.Means[b]:
			return -1
		case f.Means[a] > f.Means[b]:
			return 1
		}
		return 0
	})
	g := f
	g.Weights, g.Means, g.Variances = make([]float64, len(idx)), make([]float64, len(idx)), make([]float64, len(idx))
	for i, j := range idx {
		g.Weights[i], g.Means[i], g.Variances[i] = f.Weights[j], f.Means[j], f.Variances[j]
	}
	return g
}
