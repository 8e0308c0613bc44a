// Package plot builds the page's figures with gonum.org/v1/plot: curves with several series,
// error bars, log axes and marker lines, and heat maps with contours. A built Figure renders
// to SVG (for the screen and for export; the page turns SVG into PNG itself) and knows where
// its data area lies in the image, so that a pointer position on the displayed image
// converts to data coordinates (Frame.At). It also writes the data of curves and grids as
// CSV.
//
// Figures also render to PDF and (on the command line; the page has the browser draw its
// PNGs from the SVG) to PNG, and the figures of the studies are built here from their
// numbers (SweepFigure, MapFigure), so that the page and the command line draw the same.
//
// The package holds no browser code and no mathematics of the method: it draws numbers it
// is given.
package plot

import (
	"bytes"
	"encoding/base64"
	"errors"
	"fmt"
	"html"
	"image/color"
	"math"
	"regexp"
	"strconv"
	"strings"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Palette is the Okabe-Ito colour-blind-safe palette (Okabe & Ito 2008, "Color Universal
// Design"), in the order series use it: orange, sky blue, bluish green, blue, vermilion,
// reddish purple, yellow, black.
var Palette = []color.RGBA{
	{0xE6, 0x9F, 0x00, 0xFF}, {0x56, 0xB4, 0xE9, 0xFF}, {0x00, 0x9E, 0x73, 0xFF},
	{0x00, 0x72, 0xB2, 0xFF}, {0xD5, 0x5E, 0x00, 0xFF}, {0xCC, 0x79, 0xA7, 0xFF},
	{0xF0, 0xE4, 0x42, 0xFF}, {0x00, 0x00, 0x00, 0xFF},
}

// Default size of a figure, in points (1/72 inch): wide enough for a 1366-pixel screen
// with the editor beside it, and a sensible size in a paper.
const (
	DefaultWidth  = 480
	DefaultHeight = 300
)

// Frame says where the data area of a figure lies in its image and which data range it
// shows. Left, Right, Top and Bottom are fractions of the image's width and height measured
// from its top-left corner (the way a browser measures pointer positions), so they hold for
// the image at any displayed size. XMin..XMax and YMin..YMax are data values at the edges
// of the data area; on a log axis the data position is linear in the logarithm.
type Frame struct {
	Left, Right, Top, Bottom float64
	XMin, XMax, YMin, YMax   float64
	XLog, YLog               bool
}

// At converts a pointer position (px, py), in pixels from the top-left corner of the image
// displayed w by h pixels, into data coordinates. inside reports whether the position lies
// in the data area.
//
// Special cases are: w or h <= 0, or a Frame with an empty data area, give NaN coordinates
// and inside false; positions outside the data area extrapolate the axes.
func (f Frame) At(px, py, w, h float64) (x, y float64, inside bool) {
	if !(w > 0 && h > 0) || !(f.Right > f.Left) || !(f.Bottom > f.Top) {
		return math.NaN(), math.NaN(), false
	}
	u := (px/w - f.Left) / (f.Right - f.Left)
	v := (f.Bottom - py/h) / (f.Bottom - f.Top)
	x = between(f.XMin, f.XMax, u, f.XLog)
	y = between(f.YMin, f.YMax, v, f.YLog)
	return x, y, u >= 0 && u <= 1 && v >= 0 && v <= 1
}

// Where is the inverse of At: the pixel position of the data point (x, y) in the image
// displayed w by h pixels. Special cases are: a point <= 0 on a log axis gives NaN.
func (f Frame) Where(x, y, w, h float64) (px, py float64) {
	u := fraction(f.XMin, f.XMax, x, f.XLog)
	v := fraction(f.YMin, f.YMax, y, f.YLog)
	return (f.Left + u*(f.Right-f.Left)) * w, (f.Bottom - v*(f.Bottom-f.Top)) * h
}

func between(lo, hi, u float64, log bool) float64 {
	if log {
		return math.Exp(math.Log(lo) + u*(math.Log(hi)-math.Log(lo)))
	}
	return lo + u*(hi-lo)
}

func fraction(lo, hi, x float64, log bool) float64 {
	if log {
		if !(x > 0) {
			return math.NaN()
		}
		return (math.Log(x) - math.Log(lo)) / (math.Log(hi) - math.Log(lo))
	}
	return (x - lo) / (hi - lo)
}

// Figure is a built figure, ready to render.
type Figure struct {
	w, h   vg.Length
	draw   func(c draw.Canvas) // draws the whole figure on a canvas the size of the image
	frame  Frame
	layout Layout
}

// Frame returns where the data area lies in the image.
func (f *Figure) Frame() Frame { return f.frame }

// Size returns the figure's width and height in points.
func (f *Figure) Size() (w, h float64) { return float64(f.w), float64(f.h) }

// SVG renders the figure as an SVG document (fonts referenced by name, not embedded).
func (f *Figure) SVG() ([]byte, error) {
	c := vgsvg.New(f.w, f.h)
	if err := f.render(c); err != nil {
		return nil, err
	}
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return nil, err
	}
	return fitTexts([]byte(svgFixes.Replace(b.String()))), nil
}

// svgText matches a text of gonum's SVG canvas once svgFixes has run: its attributes, its
// font size and its (escaped) content.
var svgText = regexp.MustCompile(`<text ([^>]*?)\n?\s*style="font-size:([0-9.]+)px">([^<]*)</text>`)

// fitTexts gives every text of six characters or more the width the figure was laid out
// with (textLength, with glyphs and spacing adjusted): where neither Liberation Sans nor a
// metric-compatible face is installed, the browser's fallback face is wider or narrower,
// and a title, a legend entry or a label would run out of its box, over a swatch or off
// the canvas. A shorter text (a tick label) moves by a pixel or two at most.
func fitTexts(svg []byte) []byte {
	return svgText.ReplaceAllFunc(svg, func(m []byte) []byte {
		sub := svgText.FindSubmatch(m)
		size, err := strconv.ParseFloat(string(sub[2]), 64)
		if err != nil || len(sub[3]) < 6 {
			return m
		}
		w := textStyle(vg.Length(size)).Width(html.UnescapeString(string(sub[3])))
		return []byte(fmt.Sprintf(`<text %s textLength="%.1f" lengthAdjust="spacingAndGlyphs" style="font-size:%spx">%s</text>`,
			strings.TrimSpace(string(sub[1])), float64(w), sub[2], sub[3]))
	})
}

// svgFixes corrects what gonum's SVG canvas writes for the page and for export:
//   - an SVG <image> keeps its own aspect ratio unless told otherwise, which would shrink a
//     heat map's raster inside its axes; the axes need it stretched, each cell a sharp
//     block of colour (pixelated, not smoothed);
//   - the raster is a PNG, which the canvas labels image/jpg;
//   - the text is laid out with Liberation Sans metrics: where that face is not installed,
//     the metric-compatible Arial or Helvetica keeps the legend's and labels' widths. The
//     one face every text uses is named once, on the root, rather than on every text with
//     the default variant, weight and style beside it.
var svgFixes = strings.NewReplacer(
	"<image ", `<image preserveAspectRatio="none" image-rendering="pixelated" `,
	"data:image/jpg;base64,", "data:image/png;base64,",
	`xmlns:xlink="http://www.w3.org/1999/xlink">`, `xmlns:xlink="http://www.w3.org/1999/xlink" font-family="'Liberation Sans',Arial,Helvetica,sans-serif">`,
	"font-family:Liberation Sans;font-variant:normal;font-weight:normal;font-style:normal;", "",
)

// render draws the figure, turning a panic of the plotting library (it panics on some
// degenerate inputs) into an error.
func (f *Figure) render(c vg.CanvasSizer) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("the figure could not be drawn: %v", r)
		}
	}()
	f.draw(draw.New(c))
	return nil
}

// frameOf returns the Frame of p drawn on the canvas area da of a whole image of width w
// and height h (points), from gonum's own layout (plot.Plot.DataCanvas), which is exactly
// the area Plot.Draw maps the axis ranges to.
func frameOf(p *gplot.Plot, da draw.Canvas, w, h vg.Length) Frame {
	dc := p.DataCanvas(da)
	_, xlog := p.X.Scale.(gplot.LogScale)
	_, ylog := p.Y.Scale.(gplot.LogScale)
	return Frame{
		Left: float64(dc.Min.X / w), Right: float64(dc.Max.X / w),
		Top: float64((h - dc.Max.Y) / h), Bottom: float64((h - dc.Min.Y) / h),
		XMin: p.X.Min, XMax: p.X.Max, YMin: p.Y.Min, YMax: p.Y.Max,
		XLog: xlog, YLog: ylog,
	}
}

// measure returns a canvas of the image's size to lay p out on without drawing anything
// kept, so that frameOf sees the same ranges Draw will. The SVG canvas measures text with
// the same font metrics as the one the figure is drawn on.
func measure(w, h vg.Length) draw.Canvas {
	return draw.New(vgsvg.New(w, h))
}

// sans sets every text of p in Liberation Sans (which reads better on a screen than the
// library's serif default, and is the only face figures use) at the figure's sizes.
func sans(p *gplot.Plot) {
	for _, f := range []struct {
		f    *font.Font
		size vg.Length
	}{{&p.Title.TextStyle.Font, titleSize}, {&p.X.Label.TextStyle.Font, labelSize}, {&p.Y.Label.TextStyle.Font, labelSize},
		{&p.X.Tick.Label.Font, tickSize}, {&p.Y.Tick.Label.Font, tickSize}, {&p.Legend.TextStyle.Font, noteSize}} {
		f.f.Typeface, f.f.Variant, f.f.Size = "Liberation", "Sans", f.size
	}
	for _, h := range []*text.Handler{&p.Title.TextStyle.Handler, &p.X.Label.TextStyle.Handler, &p.Y.Label.TextStyle.Handler,
		&p.X.Tick.Label.Handler, &p.Y.Tick.Label.Handler, &p.Legend.TextStyle.Handler} {
		*h = measured
	}
	p.X.Tick.Length, p.Y.Tick.Length = 5, 5
	p.X.Label.Padding, p.Y.Label.Padding = 3, 3
}

// size returns the figure size in points, defaults applied.
func size(w, h float64) (vg.Length, vg.Length, error) {
	if w == 0 {
		w = DefaultWidth
	}
	if h == 0 {
		h = DefaultHeight
	}
	if !(w >= 100 && w <= 5000) || !(h >= 100 && h <= 5000) {
		return 0, 0, fmt.Errorf("size: width and height between 100 and 5000 points, not %v x %v", w, h)
	}
	return vg.Length(w), vg.Length(h), nil
}

// DataURL returns data as a data: URL of the given MIME type, base64-encoded (RFC 2397),
// for an <img src> that the page's content policy allows.
func DataURL(mime string, data []byte) string {
	return "data:" + mime + ";base64," + base64.StdEncoding.EncodeToString(data)
}

// errNoData is returned for a figure with nothing to draw.
var errNoData = errors.New("no data to draw")
