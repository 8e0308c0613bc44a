package plot

import (
	"bytes"
	"encoding/base64"
	"encoding/csv"
	"fmt"
	"image"
	"image/color"
	"math"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg/vgimg"
)

// centroid returns the mean pixel position of the pixels of img close to col, and their count.
func centroid(img image.Image, want func(r, g, b uint8) bool) (x, y float64, n int) {
	b := img.Bounds()
	for j := b.Min.Y; j < b.Max.Y; j++ {
		for i := b.Min.X; i < b.Max.X; i++ {
			r, g, bl, _ := img.At(i, j).RGBA()
			if want(uint8(r>>8), uint8(g>>8), uint8(bl>>8)) {
				x += float64(i) + 0.5
				y += float64(j) + 0.5
				n++
			}
		}
	}
	if n > 0 {
		x /= float64(n)
		y /= float64(n)
	}
	return x, y, n
}

func near(c color.RGBA) func(r, g, b uint8) bool {
	return func(r, g, b uint8) bool {
		d := func(a, b uint8) int { return max(int(a), int(b)) - min(int(a), int(b)) }
		return d(r, c.R) < 12 && d(g, c.G) < 12 && d(b, c.B) < 12
	}
}

// rasterOf draws f on a raster canvas at dpi dots per inch. The package lays figures out on
// an SVG canvas; drawing them here on gonum's raster canvas checks that layout against
// pixels. Only the tests link the raster backend.
func rasterOf(t *testing.T, f *Figure, dpi int) image.Image {
	t.Helper()
	c := vgimg.NewWith(vgimg.UseWH(f.w, f.h), vgimg.UseDPI(dpi), vgimg.UseBackgroundColor(color.White))
	if err := f.render(c); err != nil {
		t.Fatal(err)
	}
	return c.Image()
}

// The readout must find, from pixels alone, the data point that was drawn there: a marker is
// drawn at a known point, located in the raster image by its colour, and converted back.
func TestReadoutFindsDrawnPoint(t *testing.T) {
	for _, tc := range []struct {
		name       string
		xlog, ylog bool
		x, y       []float64
		probe      int // index of the point drawn in the sixth colour
	}{
		{"linear", false, false, []float64{0, 1, 2, 3, 4}, []float64{-1, 0.5, 2, 0.3, 1}, 1},
		{"log x", true, false, []float64{1e-3, 1e-2, 1e-1, 1, 10}, []float64{-30, -20, -5, -12, -8}, 3},
		{"log both", true, true, []float64{0.1, 0.5, 2, 8, 40}, []float64{3e-4, 1e-2, 0.5, 7, 20}, 3},
	} {
		t.Run(tc.name, func(t *testing.T) {
			// Five series so that the probe is drawn in Palette[5] (reddish purple) alone.
			var ss []Series
			for k := 0; k < 5; k++ {
				ss = append(ss, Series{X: tc.x, Y: tc.y, NoLine: true})
			}
			ss[0].NoLine = false
			ss = append(ss, Series{X: tc.x[tc.probe : tc.probe+1], Y: tc.y[tc.probe : tc.probe+1], NoLine: true})
			f, err := Line{XLog: tc.xlog, YLog: tc.ylog, XLabel: "x", YLabel: "y", Title: "probe", Series: ss}.Build()
			if err != nil {
				t.Fatal(err)
			}
			img := rasterOf(t, f, 144)
			w, h := float64(img.Bounds().Dx()), float64(img.Bounds().Dy())
			px, py, n := centroid(img, near(Palette[5]))
			if n < 10 {
				t.Fatalf("the probe marker was not found in the image (%d pixels)", n)
			}
			fr := f.Frame()
			x, y, inside := fr.At(px, py, w, h)
			if !inside {
				t.Fatalf("probe at pixel (%.1f, %.1f) read as outside the data area: %+v", px, py, fr)
			}
			// One pixel of tolerance, in data units at this point.
			x1, y1, _ := fr.At(px+1, py-1, w, h)
			wx, wy := tc.x[tc.probe], tc.y[tc.probe]
			if math.Abs(x-wx) > math.Abs(x1-x) || math.Abs(y-wy) > math.Abs(y1-y) {
				t.Errorf("probe read as (%g, %g), drawn at (%g, %g); a pixel is (%g, %g)", x, y, wx, wy, x1-x, y1-y)
			}
			// Where inverts At.
			qx, qy := fr.Where(x, y, w, h)
			if math.Abs(qx-px) > 1e-6 || math.Abs(qy-py) > 1e-6 {
				t.Errorf("Where(At(p)) = (%g, %g), p = (%g, %g)", qx, qy, px, py)
			}
		})
	}
}

// A vertical rule must be drawn where the readout places its x: its black pixels are found
// in the raster image and read back.
func TestVerticalRuleAtItsValue(t *testing.T) {
	s := Series{X: []float64{1, 2, 3, 4}, Y: []float64{4, 3, 3.5, 5}}
	f, err := Line{Series: []Series{s}, VLines: []Mark{{At: 2.7}}, XLog: true}.Build()
	if err != nil {
		t.Fatal(err)
	}
	img := rasterOf(t, f, 72)
	fr := f.Frame()
	w, h := float64(img.Bounds().Dx()), float64(img.Bounds().Dy())
	// Only the middle band of the data area, away from axes and tick labels.
	top, bottom := int((fr.Top+0.3*(fr.Bottom-fr.Top))*h), int((fr.Bottom-0.3*(fr.Bottom-fr.Top))*h)
	sub := img.(interface {
		SubImage(image.Rectangle) image.Image
	}).SubImage(image.Rect(int(fr.Left*w)+3, top, int(fr.Right*w)-3, bottom))
	px, _, n := centroid(sub, func(r, g, b uint8) bool { return r < 40 && g < 40 && b < 40 })
	if n < 5 {
		t.Fatalf("the rule was not found (%d pixels)", n)
	}
	x, _, _ := fr.At(px, (fr.Top+fr.Bottom)/2*h, w, h)
	x1, _, _ := fr.At(px+1, 0, w, h)
	if math.Abs(x-2.7) > x1-x {
		t.Errorf("rule read at x = %g, drawn at 2.7 (a pixel is %g)", x, x1-x)
	}
}

// A cell without a value is drawn grey: its grey pixels must read back as that cell's
// coordinates, on linear and log grids (the rows must not come out upside down).
func TestHeatReadoutFindsMissingCell(t *testing.T) {
	for _, log := range []bool{false, true} {
		x := []float64{1, 2, 4, 8, 16, 32}
		y := []float64{0.5, 1, 2, 4, 8}
		if !log {
			x = []float64{0, 1, 2, 3, 4, 5}
			y = []float64{10, 20, 30, 40, 50}
		}
		z := make([]float64, len(x)*len(y))
		for j := range y {
			for i := range x {
				z[j*len(x)+i] = float64(i) + 2*float64(j)
			}
		}
		ci, cj := 4, 1
		z[cj*len(x)+ci] = math.NaN()
		f, err := Heat{X: x, Y: y, Z: z, XLog: log, YLog: log, XLabel: "a", YLabel: "b", ZLabel: "z"}.Build()
		if err != nil {
			t.Fatal(err)
		}
		svg, err := f.SVG()
		if err != nil {
			t.Fatal(err)
		}
		if bytes.Contains(svg, []byte("<image x=")) || !bytes.Contains(svg, []byte(`<image preserveAspectRatio="none" image-rendering="pixelated" `)) {
			t.Error("the SVG's raster must stretch to the axes (preserveAspectRatio none)")
		}
		if !bytes.Contains(svg, []byte(`xlink:href="data:image/png;base64,`)) {
			t.Error("the SVG must label its embedded raster as image/png")
		}
		img := rasterOf(t, f, 72)
		w, h := float64(img.Bounds().Dx()), float64(img.Bounds().Dy())
		px, py, n := centroid(img, func(r, g, b uint8) bool { return r == 0xB0 && g == 0xB0 && b == 0xB0 })
		if n < 20 {
			t.Fatalf("log %v: the grey cell was not found (%d pixels)", log, n)
		}
		gx, gy, inside := f.Frame().At(px, py, w, h)
		if !inside {
			t.Fatalf("log %v: grey cell read outside the data area", log)
		}
		rel := func(a, b float64) float64 {
			if log {
				return math.Abs(math.Log(a / b))
			}
			return math.Abs(a - b)
		}
		// A quarter of a cell step.
		tolX, tolY := 0.25, 2.5
		if log {
			tolX, tolY = 0.25*math.Log(2), 0.25*math.Log(2)
		}
		if rel(gx, x[ci]) > tolX || rel(gy, y[cj]) > tolY {
			t.Errorf("log %v: grey cell read at (%g, %g), drawn at (%g, %g)", log, gx, gy, x[ci], y[cj])
		}
	}
}

func TestRenderSVGAndDataURL(t *testing.T) {
	f, err := Line{Title: "t", Series: []Series{{Name: "a", X: []float64{1, 2, 3}, Y: []float64{1, math.NaN(), 2},
		Err: []float64{0.1, 0.1, 0.2}, Missing: []float64{2}}}, HLines: []Mark{{At: 1.5, Label: "reference"}}}.Build()
	if err != nil {
		t.Fatal(err)
	}
	svg, err := f.SVG()
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(svg, []byte("<svg")) || !bytes.Contains(svg, []byte("reference")) || !bytes.Contains(svg, []byte("no converged value")) {
		t.Errorf("SVG lacks the figure or its legend: %.200s", svg)
	}
	// A label keeps the width it was laid out with in any browser face (textLength).
	want := fmt.Sprintf(`textLength="%.1f" lengthAdjust="spacingAndGlyphs" style="font-size:%gpx">reference</text>`,
		float64(textStyle(noteSize).Width("reference")), float64(noteSize))
	if !bytes.Contains(svg, []byte(want)) {
		t.Errorf("the mark's label is not held to its laid-out width: want %s", want)
	}
	u := DataURL("image/svg+xml", svg)
	back, err := base64.StdEncoding.DecodeString(strings.TrimPrefix(u, "data:image/svg+xml;base64,"))
	if err != nil || !bytes.Equal(back, svg) {
		t.Errorf("data URL does not decode back to the SVG: %v", err)
	}
}

func TestBuildRefusals(t *testing.T) {
	if _, err := (Line{Series: []Series{{X: []float64{1}, Y: []float64{1, 2}}}}).Build(); err == nil || !strings.Contains(err.Error(), "series 1") {
		t.Errorf("unequal lengths: %v", err)
	}
	if _, err := (Line{YLog: true, Series: []Series{{X: []float64{1, 2}, Y: []float64{0, -1}}}}).Build(); err == nil || !strings.Contains(err.Error(), "logarithmic") {
		t.Errorf("nothing showable on a log axis: %v", err)
	}
	if _, err := (Heat{X: []float64{1, 2}, Y: []float64{2, 1}, Z: make([]float64, 4)}).Build(); err == nil || !strings.Contains(err.Error(), "y[1]") {
		t.Errorf("decreasing y: %v", err)
	}
	if _, err := (Heat{X: []float64{1, 2}, Y: []float64{1, 2}, Z: []float64{math.NaN(), math.NaN(), math.NaN(), math.NaN()}}).Build(); err != errNoData {
		t.Errorf("no finite z: %v", err)
	}
	if _, err := (Heat{X: []float64{1, 2}, Y: []float64{1, 2}, Z: []float64{3, 3, 3, 3}}).Build(); err != nil {
		t.Errorf("a constant z should draw: %v", err)
	}
	if _, err := (Line{Width: 10, Series: []Series{{X: []float64{1}, Y: []float64{1}}}}).Build(); err == nil {
		t.Error("a 10-point-wide figure should be refused")
	}
}

func TestCSVRoundTrip(t *testing.T) {
	var b bytes.Buffer
	x := []float64{0.1, 1.0 / 3, 2}
	err := WriteCurves(&b, "l1", "nmse_db", []Series{{Name: "a", X: x, Y: []float64{-3.25, math.NaN(), 1e-300}, Missing: []float64{5}}})
	if err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(rows[0], ",") != "series,l1,nmse_db,error,status" || len(rows) != 5 {
		t.Fatalf("rows = %q", rows)
	}
	if v, _ := strconv.ParseFloat(rows[2][1], 64); v != 1.0/3 {
		t.Errorf("x not in full precision: %q", rows[2][1])
	}
	if rows[2][2] != "" || rows[2][4] != "no value" || rows[4][4] != "no value" || rows[3][2] != "1e-300" {
		t.Errorf("gaps or values written wrongly: %q", rows)
	}
	b.Reset()
	if err := WriteGrid(&b, "a", "b", "z", []float64{1, 2}, []float64{3}, []float64{5, math.NaN()}); err != nil {
		t.Fatal(err)
	}
	if got := b.String(); got != "a,b,z\n1,3,5\n2,3,\n" {
		t.Errorf("grid CSV = %q", got)
	}
	if err := WriteGrid(&b, "a", "b", "z", []float64{1, 2}, []float64{3}, []float64{5}); err == nil {
		t.Error("a short z should be refused")
	}
}
