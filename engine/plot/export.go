package plot

import (
	"bytes"
	"math"

	"gonum.org/v1/plot/vg/vgpdf"
)

// PDF renders the figure as a PDF document of the figure's size in points, with the one
// font face it uses embedded, for a paper.
func (f *Figure) PDF() ([]byte, error) {
	c := vgpdf.New(f.w, f.h)
	c.EmbedFonts(true)
	if err := f.render(c); err != nil {
		return nil, err
	}
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// Warm draws a curve and a small map and drops them, so that the first figure someone
// waits for does not pay for loading the font and for the first runs of the layout, contour
// and PNG code (in WebAssembly the first map of a page takes ten times as long as the next).
func Warm() {
	if f, err := (Line{Title: "warm-up", XLabel: "x", YLabel: "y", Series: []Series{{Name: "a", X: []float64{1, 2, 3}, Y: []float64{1, 3, 2}}},
		HLines: []Mark{{At: 2, Label: "mark"}}, VLines: []Mark{{At: 2, Label: "mark"}}}).Build(); err == nil {
		_, _ = f.SVG()
	}
	const n = 30
	x, y, z := make([]float64, n), make([]float64, n), make([]float64, n*n)
	for i := range x {
		x[i], y[i] = math.Pow(10, float64(i)/n), float64(i)
	}
	for k := range z {
		z[k] = math.Sin(float64(k%n)/7) + math.Cos(float64(k/n)/5)
	}
	if f, err := (Heat{Title: "warm-up", ZLabel: "z", X: x, Y: y, Z: z, XLog: true, MarkLowest: true}).Build(); err == nil {
		_, _ = f.SVG()
	}
}
