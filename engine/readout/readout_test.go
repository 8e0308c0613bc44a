package readout

import (
	"math"
	"testing"
)

// TestQuantizeIsMidRise checks the quantizer of issue 15 by its definition: step
// d = 2 range/2^bits, outputs at the cell midpoints, inputs beyond +-range in the outer cells.
func TestQuantizeIsMidRise(t *testing.T) {
	for _, bits := range []int{1, 2, 3, 8} {
		r, err := Quantize(bits, 1.5)
		if err != nil {
			t.Fatal(err)
		}
		k := 1 << bits
		d := 3.0 / float64(k)
		levels, cuts := r.(Cells).Levels()
		if len(levels) != k || len(cuts) != k-1 || cuts[k/2-1] != 0 {
			t.Fatalf("%d bits: %d levels, %d cuts, middle cut %v", bits, len(levels), len(cuts), cuts[k/2-1])
		}
		for i, l := range levels {
			if want := -1.5 + (float64(i)+0.5)*d; math.Abs(l-want) > 1e-15 {
				t.Errorf("%d bits: level %d = %v, want %v", bits, i, l, want)
			}
			if y := r.Observe(l, 0, 0); y != l {
				t.Errorf("%d bits: a midpoint %v reads %v", bits, l, y)
			}
		}
		if y := r.Observe(100, 0, 0); y != levels[k-1] {
			t.Errorf("%d bits: clipping gives %v", bits, y)
		}
		if y := r.Observe(-0.2, 0.1, 0); !(y < 0) || math.Abs(y+0.1) > d/2 && bits > 1 {
			t.Errorf("%d bits: z + w = -0.1 reads %v", bits, y)
		}
	}
	if _, err := Quantize(17, 1); err == nil {
		t.Error("17 bits accepted")
	}
	if _, err := New("quantize", map[string]float64{"bits": 2.5, "range": 1}); err == nil {
		t.Error("2.5 bits accepted")
	}
}

func TestSignAndLogistic(t *testing.T) {
	if Sign().Observe(0.3, -0.5, 0) != -1 || Sign().Observe(0.3, 0, 0) != 1 {
		t.Error("sign")
	}
	if Logistic().Observe(0, 0, 0.49) != 1 || Logistic().Observe(0, 0, 0.51) != -1 {
		t.Error("logistic at z = 0 is a fair coin")
	}
	if s := Sigmoid(-800); s != 0 && !(s > 0) {
		t.Error("sigmoid underflow")
	}
	if math.Abs(Sigmoid(1)+Sigmoid(-1)-1) > 1e-16 {
		t.Error("sigmoid symmetry")
	}
}
