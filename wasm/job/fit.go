package job

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"

	"hdrisk/engine/data"

	"hdrisk/protocol"
)

// curvePoints is the resolution of a fitted density drawn over the histogram.
const curvePoints = 101

func init() { Serve(protocol.Fit, Fit) }

// Fit reads signal samples, bins them and, when a.Method asks, fits a law to them.
// Special cases are: problems with the text are *data.LineError values naming the line; an
// unknown method, K outside 1..MaxMixture and what the fits refuse (all zeros, fewer
// distinct values than K) are errors naming the argument.
func Fit(a protocol.FitArgs, progress func(done, total int)) (protocol.FitResult, error) {
	if progress == nil {
		progress = func(int, int) {}
	}
	switch a.Method {
	case protocol.FitNone, protocol.FitBernoulli:
	case protocol.FitMixture:
		if a.K < 1 || a.K > protocol.MaxMixture {
			return protocol.FitResult{}, fmt.Errorf("k: the number of components must be in 1..%d, not %d", protocol.MaxMixture, a.K)
		}
	default:
		return protocol.FitResult{}, fmt.Errorf("method: %q is not one of %s, %s", a.Method, protocol.FitBernoulli, protocol.FitMixture)
	}
	progress(0, 2)
	x, err := data.ReadValues(strings.NewReader(a.Text), data.Limits{MaxEntries: protocol.MaxSamples, MaxBytes: a.MaxBytes})
	if err != nil {
		return protocol.FitResult{}, err
	}
	h, err := data.NewHistogram(x, a.Bins)
	if err != nil {
		return protocol.FitResult{}, err
	}
	r := protocol.FitResult{Count: len(x), Method: a.Method,
		Histogram: protocol.HistogramOut{Edges: h.Edges, Counts: h.Counts, Density: h.Density}}
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
	r.Mean, r.Variance = protocol.Num(mean), protocol.Num(ss/float64(len(x)))
	sorted := slices.Clone(x)
	slices.Sort(sorted)
	r.Min, r.Max = protocol.Num(sorted[0]), protocol.Num(sorted[len(sorted)-1])
	r.Values = sorted
	if len(sorted) > protocol.MaxListValues {
		r.Values, r.Quantiles = protocol.Quantiles(sorted, protocol.MaxListValues), true
	}
	progress(1, 2)
	var w, mu, v []float64
	switch a.Method {
	case protocol.FitBernoulli:
		f, err := data.FitBernoulliGauss(x, a.ZeroWidth)
		if err != nil {
			return protocol.FitResult{}, err
		}
		r.Density, r.SlabVar, r.SpikeMass = protocol.Num(f.Density), protocol.Num(f.Variance), protocol.Num(1-f.Density)
		r.LogLik, r.Iterations, r.Converged = protocol.Num(f.LogLik), f.Iterations, f.Converged
		w, mu, v = []float64{f.Density}, []float64{0}, []float64{f.Variance}
	case protocol.FitMixture:
		f, err := data.FitGaussMixture(x, a.K, data.MixtureOptions{})
		if err != nil {
			return protocol.FitResult{}, err
		}
		r.Weights, r.Means, r.Variances = f.Weights, f.Means, f.Variances
		r.LogLik, r.Iterations, r.Converged = protocol.Num(f.LogLik), f.Iterations, f.Converged
		w, mu, v = f.Weights, f.Means, f.Variances
	}
	if len(w) > 0 {
		lo, hi := h.Edges[0], h.Edges[len(h.Edges)-1]
		for i := range curvePoints {
			t := lo + (hi-lo)*float64(i)/float64(curvePoints-1)
			r.Curve = append(r.Curve, protocol.DensityPoint{X: protocol.Num(t), Density: protocol.Num(mixtureDensity(t, w, mu, v))})
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
