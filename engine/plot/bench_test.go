package plot

import (
	"math"
	"testing"
)

// BenchmarkHeat100 builds and renders a 100 x 100 map to SVG, as the page does after a map.
func BenchmarkHeat100(b *testing.B) {
	n := 100
	x, y := make([]float64, n), make([]float64, n)
	z := make([]float64, n*n)
	for i := range x {
		x[i] = math.Pow(10, -3+3*float64(i)/float64(n-1))
		y[i] = float64(i) / float64(n-1)
	}
	for j := range y {
		for i := range x {
			z[j*n+i] = math.Sin(3*y[j]) * math.Log(x[i])
		}
	}
	for b.Loop() {
		f, err := Heat{X: x, Y: y, Z: z, XLog: true, ZLabel: "NMSE (dB)"}.Build()
		if err != nil {
			b.Fatal(err)
		}
		svg, err := f.SVG()
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(len(svg)), "svg-bytes")
	}
}
