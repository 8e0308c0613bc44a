package job

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"hdrisk/engine/data"

	"hdrisk/protocol"
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
	r, err := Fit(protocol.FitArgs{Text: text, Method: protocol.FitBernoulli}, nil)
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
	r, err = Fit(protocol.FitArgs{Text: text, Method: protocol.FitMixture, K: 2}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(r.Weights, r.Means, r.Variances) != fmt.Sprint(mix.Weights, mix.Means, mix.Variances) {
		t.Errorf("job mixture %v %v %v, engine %+v", r.Weights, r.Means, r.Variances, mix)
	}
}

// Past protocol.MaxListValues samples the law used as is is their quantiles, which keep the range.
func TestFitQuantilesOfManySamples(t *testing.T) {
	x := make([]float64, 3*protocol.MaxListValues+7)
	for i := range x {
		x[i] = float64(i)
	}
	r, err := Fit(protocol.FitArgs{Text: samplesText(x)}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !r.Quantiles || len(r.Values) != protocol.MaxListValues {
		t.Fatalf("quantiles %v, %d values", r.Quantiles, len(r.Values))
	}
	n := float64(len(x) - 1)
	for _, i := range []int{0, protocol.MaxListValues / 2, protocol.MaxListValues - 1} {
		want := (float64(i) + 0.5) / protocol.MaxListValues * n // the data are 0..n, so a quantile is its position
		if math.Abs(r.Values[i]-want) > 1e-9 {
			t.Errorf("quantile %d = %v, want %v", i, r.Values[i], want)
		}
	}
	if r.Mean != protocol.Num(n/2) || r.Min != 0 || r.Max != protocol.Num(n) {
		t.Errorf("mean %v min %v max %v", r.Mean, r.Min, r.Max)
	}
}

func TestFitRefusals(t *testing.T) {
	var le *data.LineError
	if _, err := Fit(protocol.FitArgs{Text: "1\n2\nthree\n"}, nil); !errors.As(err, &le) || le.Line != 3 {
		t.Errorf("a word on line 3: err = %v", err)
	}
	if _, err := Fit(protocol.FitArgs{Text: "0\n0\n", Method: protocol.FitBernoulli}, nil); err == nil {
		t.Errorf("all zeros were fitted")
	}
	if _, err := Fit(protocol.FitArgs{Text: "1\n2\n", Method: protocol.FitMixture, K: 11}, nil); err == nil || !strings.HasPrefix(err.Error(), "k:") {
		t.Errorf("k = 11: err = %v", err)
	}
	if _, err := Fit(protocol.FitArgs{Text: "1\n2\n", Method: "spline"}, nil); err == nil || !strings.HasPrefix(err.Error(), "method:") {
		t.Errorf("unknown method: err = %v", err)
	}
	last, _ := runJob(t, "fit", protocol.FitArgs{Text: "1\n\n2,,3\n"})
	if last.Type != protocol.Failed || !strings.Contains(last.Error, "line 3") {
		t.Errorf("an empty field on line 3: reply %+v", last)
	}
}
