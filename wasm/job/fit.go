package job

import (
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"

	"hdrisk/engine/data"
)

// Methods of the "fit" kind.
const (
	FitNone      = ""                // read and bin the samples only
	FitBernoulli = "bernoulli-gauss" // data.FitBernoulliGauss
	FitMixture   = "gauss-mixture"   // data.FitGaussMixture with K components
)

// MaxSamples is the most signal samples the page reads; MaxMixture the most components it
// fits.
const (
	MaxSamples = 1_000_000
	MaxMixture = 10
)

// curvePoints is the resolution of a fitted density drawn over the histogram.
const curvePoints = 101

// FitArgs are the arguments of the "fit" kind: samples of the signal as text.
type FitArgs struct {
	Text      string  `json:"text"`
	Method    string  `json:"method"`
	K         int     `json:"k,omitempty"`          // components of a mixture
	ZeroWidth float64 `json:"zero_width,omitempty"` // width of the spike of a Bernoulli-Gauss fit
	Bins      int     `json:"bins,omitempty"`       // 0: automatic
	MaxBytes  int64   `json:"max_bytes,omitempty"`  // cap on the text (0: engine/data's default)
}

// DensityPoint is one point of a fitted density.
type DensityPoint struct {
	X       Num `json:"x"`
	Density Num `json:"density"`
}

// FitResult is the result of the "fit" kind.
type FitResult struct {
	Count     int          `json:"count"`
	Mean      Num          `json:"mean"`
	Variance  Num          `json:"variance"` // population variance (divided by the count)
	Min       Num          `json:"min"`
	Max       Num          `json:"max"`
	Zeros     int          `json:"zeros"` // samples exactly 0
	Histogram HistogramOut `json:"histogram"`
	// Values is the empirical law the page can use as is: the samples sorted, or, past
	// MaxListValues samples, the MaxListValues quantiles at levels (i + 1/2)/MaxListValues.
	Values    []float64 `json:"values"`
	Quantiles bool      `json:"quantiles"` // Values are quantiles, not the samples

	Method string `json:"method"`
	// Bernoulli-Gauss fit: P(x != 0) and the variance of the nonzero part.
	Density   Num `json:"density,omitempty"`
	SlabVar   Num `json:"slab_variance,omitempty"`
	SpikeMass Num `json:"spike_mass,omitempty"` // 1 - Density, drawn as a mark at 0, not as a density
	// Mixture fit, components sorted by mean.
	Weights    []float64      `json:"weights,omitempty"`
	Means      []float64      `json:"means,omitempty"`
	Variances  []float64      `json:"variances,omitempty"`
	LogLik     Num            `json:"loglik,omitempty"`
	Iterations int            `json:"iterations,omitempty"`
	Converged  bool           `json:"converged"`
	Curve      []DensityPoint `json:"curve,omitempty"` // the fitted density (its continuous part) over the histogram's range
}

func init() { Register("fit", runFit) }

// Fit reads signal samples, bins them and, when a.Method asks, fits a law to them.
// Special cases are: problems with the text are *data.LineError values naming the line; an
// unknown method, K outside 1..MaxMixture and what the fits refuse (all zeros, fewer
// distinct values than K) are errors naming the argument.
func Fit(a FitArgs, progress func(done, total int)) (FitResult, error) {
	if progress == nil {
		progress = func(int, int) {}
	}
	switch a.Method {
	case FitNone, FitBernoulli:
	case FitMixture:
		if a.K < 1 || a.K > MaxMixture {
			return FitResult{}, fmt.Errorf("k: the number of components must be in 1..%d, not %d", MaxMixture, a.K)
		}
	default:
		return FitResult{}, fmt.Errorf("method: %q is not one of %s, %s", a.Method, FitBernoulli, FitMixture)
	}
	progress(0, 2)
	x, err := data.ReadValues(strings.NewReader(a.Text), data.Limits{MaxEntries: MaxSamples, MaxBytes: a.MaxBytes})
	if err != nil {
		return FitResult{}, err
	}
	h, err := data.NewHistogram(x, a.Bins)
	if err != nil {
		return FitResult{}, err
	}
	r := FitResult{Count: len(x), Method: a.Method,
		Histogram: HistogramOut{Edges: h.Edges, Counts: h.Counts, Density: h.Density}}
	var sum float64
	for _, v := range x {
		sum += v
		if v == 0 {
			r.Zeros++
		}
	}
	mean := sum / float64(len(x))
	var ss float64
	for _, v := range x {
		ss += (v - mean) * (v - mean)
	}
	r.Mean, r.Variance = Num(mean), Num(ss/float64(len(x)))
	sorted := slices.Clone(x)
	slices.Sort(sorted)
	r.Min, r.Max = Num(sorted[0]), Num(sorted[len(sorted)-1])
	r.Values = sorted
	if len(sorted) > MaxListValues {
		r.Values, r.Quantiles = quantiles(sorted, MaxListValues), true
	}
	progress(1, 2)
	var w, mu, v []float64
	switch a.Method {
	case FitBernoulli:
		f, err := data.FitBernoulliGauss(x, a.ZeroWidth)
		if err != nil {
			return FitResult{}, err
		}
		r.Density, r.SlabVar, r.SpikeMass = Num(f.Density), Num(f.Variance), Num(1-f.Density)
		r.LogLik, r.Iterations, r.Converged = Num(f.LogLik), f.Iterations, f.Converged
		w, mu, v = []float64{f.Density}, []float64{0}, []float64{f.Variance}
	case FitMixture:
		f, err := data.FitGaussMixture(x, a.K, data.MixtureOptions{})
		if err != nil {
			return FitResult{}, err
		}
		r.Weights, r.Means, r.Variances = f.Weights, f.Means, f.Variances
		r.LogLik, r.Iterations, r.Converged = Num(f.LogLik), f.Iterations, f.Converged
		w, mu, v = f.Weights, f.Means, f.Variances
	}
	if len(w) > 0 {
		lo, hi := h.Edges[0], h.Edges[len(h.Edges)-1]
		for i := range curvePoints {
			t := lo + (hi-lo)*float64(i)/float64(curvePoints-1)
			r.Curve = append(r.Curve, DensityPoint{X: Num(t), Density: Num(mixtureDensity(t, w, mu, v))})
		}
	}
	progress(2, 2)
	return r, nil
}

// mixtureDensity is sum_k w_k N(t; mu_k, v_k); components of zero variance are point masses
// and have no density.
func mixtureDensity(t float64, w, mu, v []float64) float64 {
	d := 0.0
	for k := range w {
		if v[k] > 0 {
			d += w[k] * distuv.Normal{Mu: mu[k], Sigma: math.Sqrt(v[k])}.Prob(t)
		}
	}
	return d
}

// quantiles returns k quantiles of sorted data at levels (i + 1/2)/k, by linear
// interpolation between order statistics (Hyndman & Fan 1996, Am. Stat. 50(4), type 7 on
// the 0-based positions p (n - 1)).
func quantiles(sorted []float64, k int) []float64 {
	n := len(sorted)
	q := make([]float64, k)
	for i := range q {
		pos := (float64(i) + 0.5) / float64(k) * float64(n-1)
		j := int(pos)
		f := pos - float64(j)
		if j+1 < n {
			q[i] = sorted[j] + f*(sorted[j+1]-sorted[j])
		} else {
			q[i] = sorted[n-1]
		}
	}
	return q
}

func runFit(raw json.RawMessage, progress func(done, total int)) (any, error) {
	var a FitArgs
	if err := json.Unmarshal(raw, &a); err != nil {
		return nil, fmt.Errorf("fit arguments: %w", err)
	}
	return Fit(a, progress)
}

// ShortList returns values written in at most budget characters the way a list box shows
// them (each value in its shortest form, 'g' -1, separated by ", "): the values as they are
// if they fit; else each rounded to the most significant digits (down to 6) that fit; else
// n evenly spaced quantiles of the sorted values (levels (i + 1/2)/n), at 6 digits, with n
// as large as fits. digits is 0 when the values are unrounded and thinned is set when
// they were thinned. The page's renderer cannot put a longer text into a box.
// Special cases are: an empty list is returned as is; budget below 64 is taken as 64.
func ShortList(values []float64, budget int) (out []float64, digits int, thinned bool) {
	budget = max(budget, 64)
	if len(values) == 0 || listLen(values) <= budget {
		return values, 0, false
	}
	for d := 16; d >= 6; d-- {
		r := roundList(values, d)
		if listLen(r) <= budget {
			return r, d, false
		}
	}
	sorted := slices.Clone(values)
	slices.Sort(sorted)
	r := roundList(sorted, 6)
	n := max(1, len(values)*budget/listLen(r))
	for n > 1 {
		r = roundList(quantiles(sorted, n), 6)
		if listLen(r) <= budget {
			break
		}
		n = n * 9 / 10
	}
	return r, 6, true
}

func roundList(v []float64, digits int) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i], _ = strconv.ParseFloat(strconv.FormatFloat(x, 'g', digits, 64), 64)
	}
	return out
}

func listLen(v []float64) int {
	n := 2 * (len(v) - 1)
	for _, x := range v {
		n += len(strconv.FormatFloat(x, 'g', -1, 64))
	}
	return n
}
