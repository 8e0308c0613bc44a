package data

import (
	"math"
	"slices"
)

// Histogram counts values in equal-width bins: bin k is [Edges[k], Edges[k+1]), the last
// bin closed on the right so that the largest value is counted.
type Histogram struct {
	Edges   []float64 // len(Counts)+1 increasing edges
	Counts  []int     // values in each bin
	Density []float64 // Counts[k] / (total * width): integrates to 1, to draw over a fitted density
}

// maxBins caps the number of bins, automatic or requested.
const maxBins = 1000

// NewHistogram bins x into bins equal-width bins spanning [min x, max x]. With bins = 0
// the count is ceil(sqrt(len(x))) capped at 100, the square-root choice (common practice).
//
// Special cases are: an empty x, a NaN or Inf value, negative bins or more than 1000 are
// refused with a *ParamError; when every value is the same v, the single-valued sample
// gets bins spanning [v - h, v + h] with h = max(|v|, 1)/2, so the bar is visible and
// Density still integrates to 1.
func NewHistogram(x []float64, bins int) (Histogram, error) {
	if len(x) == 0 {
		return Histogram{}, paramErr("values", "is empty")
	}
	if bins < 0 || bins > maxBins {
		return Histogram{}, paramErr("bins", "must be in 0..%d, got %d", maxBins, bins)
	}
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Histogram{}, paramErr("values", "entry %d is %g", i, v)
		}
	}
	if bins == 0 {
		bins = min(100, int(math.Ceil(math.Sqrt(float64(len(x))))))
	}
	lo, hi := slices.Min(x), slices.Max(x)
	if lo == hi {
		h := max(math.Abs(lo), 1) / 2
		lo, hi = lo-h, hi+h
	}
	// Divided before subtracting, so that a span beyond the range of float64 stays finite.
	width := hi/float64(bins) - lo/float64(bins)
	h := Histogram{
		Edges:   make([]float64, bins+1),
		Counts:  make([]int, bins),
		Density: make([]float64, bins),
	}
	for k := range h.Edges {
		h.Edges[k] = lo + float64(k)*width
	}
	h.Edges[bins] = hi
	for _, v := range x {
		k := min(max(int(v/width-lo/width), 0), bins-1)
		// The quotient can land a bin off near an edge through rounding; the edges decide.
		for k > 0 && v < h.Edges[k] {
			k--
		}
		for k < bins-1 && v >= h.Edges[k+1] {
			k++
		}
		h.Counts[k]++
	}
	n := float64(len(x))
	for k, c := range h.Counts {
		h.Density[k] = float64(c) / (n * (h.Edges[k+1] - h.Edges[k]))
	}
	return h, nil
}
