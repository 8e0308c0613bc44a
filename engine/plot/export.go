package plot

import (
	"bytes"

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

// Warm draws a small figure of each kind and drops them, so that the first figure someone
// waits for does not pay for loading the font and for the first run of the layout code (in
// the page's WebAssembly, about a quarter of a second).
func Warm() {
	if f, err := (Line{Title: "warm-up", XLabel: "x", YLabel: "y", Series: []Series{{Name: "a", X: []float64{1, 2, 3}, Y: []float64{1, 3, 2}}},
		HLines: []Mark{{At: 2, Label: "mark"}}}).Build(); err == nil {
		_, _ = f.SVG()
	}
	if f, err := (Heat{ZLabel: "z", X: []float64{1, 2, 3}, Y: []float64{1, 2}, Z: []float64{1, 2, 3, 4, 5, 6}, MarkLowest: true}).Build(); err == nil {
		_, _ = f.SVG()
	}
}
