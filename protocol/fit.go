package protocol

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

// Fit reads signal samples and fits a law to them.
var Fit = Kind[FitArgs, FitResult]{Name: "fit"}
