//go:build !js

package plot

import (
	"bytes"
	"image/color"

	"gonum.org/v1/plot/vg/vgimg"
)

// PNGScale is the pixel density of a figure saved as PNG: two pixels per CSS pixel (192
// dots per inch for a figure measured in points), sharp when projected or shown on a dense screen.
const PNGScale = 2

// PNG renders the figure as an 8-bit PNG at PNGScale pixels per CSS pixel. The page draws
// its PNGs from the SVG in the browser instead, and does not link the raster backend.
func (f *Figure) PNG() ([]byte, error) {
	c := vgimg.NewWith(vgimg.UseWH(f.w, f.h), vgimg.UseDPI(96*PNGScale), vgimg.UseBackgroundColor(color.White))
	if err := f.render(c); err != nil {
		return nil, err
	}
	var b bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: c}).WriteTo(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}
