package design

import (
	"math"
	"testing"
)

// A rows-scaled law divided by its mean eigenvalue alpha is the columns-scaled law (docs/method.md
// section 1): the transforms of Rescaled agree with those computed directly.
func TestRescaledIsTheOtherScale(t *testing.T) {
	for _, alpha := range []float64{0.03, 0.5, 1, 4} {
		rows, _ := Gaussian(alpha, Rows)
		cols, _ := Gaussian(alpha, Columns)
		r := Rescaled(rows, rows.Mean())
		if d := math.Abs(r.Mean() - cols.Mean()); d > 1e-15 {
			t.Errorf("alpha %v: mean %v, columns %v", alpha, r.Mean(), cols.Mean())
		}
		for _, g := range []float64{1e-6, 0.1, 1, 30, 1e8} {
			a, b := r.At(g), cols.At(g)
			for name, d := range map[string][2]float64{"S1": {a.S1, b.S1}, "S2": {a.S2, b.S2}, "S3": {a.S3, b.S3}, "T": {a.T, b.T}, "W": {a.W, b.W}} {
				if math.Abs(d[0]-d[1]) > 1e-12*math.Abs(d[1]) {
					t.Errorf("alpha %v, g %v: %s %v, columns %v", alpha, g, name, d[0], d[1])
				}
			}
		}
	}
	if !ReachesZero(Rescaled(must(UniformEV(2, 0, 3, Rows)), 2)) || ReachesZero(must(UniformEV(2, 0.1, 3, Rows))) {
		t.Error("ReachesZero does not follow the lower bound through Rescaled")
	}
	if s := Spread(must(UniformSV(2, 1e-10, 1, Rows))); math.Abs(s-1e20) > 1e6 {
		t.Errorf("spread of uniform-sv on [1e-10, 1]: %v, want 1e20", s)
	}
}

func must(l Law, err error) Law {
	if err != nil {
		panic(err)
	}
	return l
}
