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

// BenchmarkLine200 builds and renders a 200-point curve with its best-weight mark and
// Bayes line to SVG, as the curve view does when a sweep's numbers arrive.
func BenchmarkLine200(b *testing.B) {
	x, y := make([]float64, 200), make([]float64, 200)
	for i := range x {
		x[i] = math.Pow(10, -3+3*float64(i)/199)
		y[i] = -20 + 15*math.Pow(math.Log10(x[i])+1.5, 2)/5
	}
	for b.Loop() {
		f, err := Line{Title: "NMSE (dB) against l1", XLabel: "l1", YLabel: "NMSE (dB)", XLog: true, Series: []Series{{X: x, Y: y}},
			VLines: []Mark{{At: 0.03, Label: "best l1 = 0.03"}}, HLines: []Mark{{At: -25, Label: "Bayes-optimal"}}}.Build()
		if err != nil {
			b.Fatal(err)
		}
		if _, err := f.SVG(); err != nil {
			b.Fatal(err)
		}
	}
}
