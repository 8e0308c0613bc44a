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
