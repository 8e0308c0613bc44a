package protocol

import (
	"math"
	"testing"

	"hdrisk/engine/plot"
)

// A heat map's values travel packed and come back exactly, cells without a value included;
// a packed grid of the wrong size is refused.
func TestFigureHeatPacked(t *testing.T) {
	z := []float64{1, math.NaN(), -3.25, 1e-300, math.Inf(1), 0.1 + 0.2}
	a := FigureArgs{Heat: &plot.Heat{X: []float64{1, 2, 3}, Y: []float64{1, 2}, Z: z}}
	b, err := Figure.EncodeArgs(a.Packed())
	if err != nil {
		t.Fatal(err)
	}
	if a.Heat.Z == nil {
		t.Fatal("Packed changed its argument")
	}
	got, err := Figure.DecodeArgs(b)
	if err != nil {
		t.Fatal(err)
	}
	if got.Heat.Z != nil {
		t.Fatal("the values travelled as JSON numbers, not packed")
	}
	back, err := got.Unpacked()
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range z {
		w := back.Heat.Z[i]
		if math.Float64bits(v) != math.Float64bits(w) && !(math.IsNaN(v) && math.IsNaN(w)) {
			t.Errorf("z[%d] = %v came back as %v", i, v, w)
		}
	}
	got.Heat.Y = []float64{1}
	if _, err := got.Unpacked(); err == nil {
		t.Error("6 packed values for a 3 x 1 grid should be refused")
	}
}
