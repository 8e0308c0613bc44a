package protocol

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

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
