package job

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"hdrisk/engine/data"
)

func samplesText(x []float64) string {
	var b strings.Builder
	for _, v := range x {
		fmt.Fprintf(&b, "%v\n", v)
	}
	return b.String()
}

// The fits are the engine's, handed on unchanged, and the drawn density is theirs.
func TestFitPassesEngineFitsThrough(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	x := make([]float64, 2000)
	for i := range x {
		if rng.Float64() < 0.2 {
			x[i] = 2 * rng.NormFloat64()
		}
	}
	text := samplesText(x)
	bg, err := data.FitBernoulliGauss(x, 0)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Fit(FitArgs{Text: text, Method: FitBernoulli}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if float64(r.Density) != bg.Density || float64(r.SlabVar) != bg.Variance || float64(r.SpikeMass) != 1-bg.Density {
		t.Errorf("job fit %v %v, engine %+v", r.Density, r.SlabVar, bg)
	}
	if r.Count != 2000 || r.Zeros != 2000-int(math.Round(bg.Density*2000)) || len(r.Values) != 2000 || r.Quantiles {
		t.Errorf("count %d zeros %d values %d quantiles %v", r.Count, r.Zeros, len(r.Values), r.Quantiles)
	}
	// The curve is the slab's continuous density: at 0 it is Density / sqrt(2 pi v).
	mid := r.Curve[len(r.Curve)/2]
	lo, hi := r.Histogram.Edges[0], r.Histogram.Edges[len(r.Histogram.Edges)-1]
	if len(r.Curve) != curvePoints || float64(r.Curve[0].X) != lo || float64(r.Curve[len(r.Curve)-1].X) != hi {
		t.Errorf("curve spans %v..%v with %d points, histogram %v..%v", r.Curve[0].X, r.Curve[len(r.Curve)-1].X, len(r.Curve), lo, hi)
	}
	wantMid := bg.Density / math.Sqrt(2*math.Pi*bg.Variance) * math.Exp(-float64(mid.X)*float64(mid.X)/(2*bg.Variance))
	if math.Abs(float64(mid.Density)-wantMid) > 1e-12 {
		t.Errorf("density at %v = %v, want %v", mid.X, mid.Density, wantMid)
	}

	mix, err := data.FitGaussMixture(x, 2, data.MixtureOptions{})
	if err != nil {
		t.Fatal(err)
	}
	r, err = Fit(FitArgs{Text: text, Method: FitMixture, K: 2}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(r.Weights, r.Means, r.Variances) != fmt.Sprint(mix.Weights, mix.Means, mix.Variances) {
		t.Errorf("job mixture %v %v %v, engine %+v", r.Weights, r.Means, r.Variances, mix)
	}
}

// Past MaxListValues samples the law used as is is their quantiles, which keep the range.
func TestFitQuantilesOfManySamples(t *testing.T) {
	x := make([]float64, 3*MaxListValues+7)
	for i := range x {
		x[i] = float64(i)
	}
	r, err := Fit(FitArgs{Text: samplesText(x)}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !r.Quantiles || len(r.Values) != MaxListValues {
		t.Fatalf("quantiles %v, %d values", r.Quantiles, len(r.Values))
	}
	n := float64(len(x) - 1)
	for _, i := range []int{0, MaxListValues / 2, MaxListValues - 1} {
		want := (float64(i) + 0.5) / MaxListValues * n // the data are 0..n, so a quantile is its position
		if math.Abs(r.Values[i]-want) > 1e-9 {
			t.Errorf("quantile %d = %v, want %v", i, r.Values[i], want)
		}
	}
	if r.Mean != Num(n/2) || r.Min != 0 || r.Max != Num(n) {
		t.Errorf("mean %v min %v max %v", r.Mean, r.Min, r.Max)
	}
}

func TestFitRefusals(t *testing.T) {
	var le *data.LineError
	if _, err := Fit(FitArgs{Text: "1\n2\nthree\n"}, nil); !errors.As(err, &le) || le.Line != 3 {
		t.Errorf("a word on line 3: err = %v", err)
	}
	if _, err := Fit(FitArgs{Text: "0\n0\n", Method: FitBernoulli}, nil); err == nil {
		t.Errorf("all zeros were fitted")
	}
	if _, err := Fit(FitArgs{Text: "1\n2\n", Method: FitMixture, K: 11}, nil); err == nil || !strings.HasPrefix(err.Error(), "k:") {
		t.Errorf("k = 11: err = %v", err)
	}
	if _, err := Fit(FitArgs{Text: "1\n2\n", Method: "spline"}, nil); err == nil || !strings.HasPrefix(err.Error(), "method:") {
		t.Errorf("unknown method: err = %v", err)
	}
	last, _ := runJob(t, "fit", FitArgs{Text: "1\n\n2,,3\n"})
	if last.Type != Failed || !strings.Contains(last.Error, "line 3") {
		t.Errorf("an empty field on line 3: reply %+v", last)
	}
}

func TestShortList(t *testing.T) {
	v := []float64{1, 2.5, 3}
	if got, d, q := ShortList(v, 100); fmt.Sprint(got) != "[1 2.5 3]" || d != 0 || q {
		t.Errorf("a short list changed: %v %d %v", got, d, q)
	}
	rng := rand.New(rand.NewPCG(5, 6))
	long := make([]float64, 1000)
	for i := range long {
		long[i] = 40 + 10*rng.Float64()
	}
	r, d, q := ShortList(long, 12000)
	if q || d < 6 || d > 16 || listLen(r) > 12000 || len(r) != 1000 {
		t.Fatalf("1000 values in 12000 characters: %d values at %d digits (quantiles %v), %d characters", len(r), d, q, listLen(r))
	}
	for i := range r {
		if math.Abs(r[i]-long[i]) > 0.5*math.Pow(10, -float64(d-1))*long[i] {
			t.Errorf("value %d rounded from %v to %v at %d digits", i, long[i], r[i], d)
		}
	}
	r, d, q = ShortList(long, 1000)
	if !q || d != 6 || listLen(r) > 1000 || len(r) < 50 || r[0] < 40 || r[len(r)-1] > 50 {
		t.Errorf("1000 values in 1000 characters: %d quantiles at %d digits (%v), %d characters", len(r), d, q, listLen(r))
	}
}
