package plot

import (
	"fmt"
	"image/color"
	"math"
	"strconv"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/palette/moreland"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Heat is a heat map of a value over a grid of two fields, with contour lines.
type Heat struct {
	Title, XLabel, YLabel string
	ZLabel                string    // what the colours mean, written over the colour bar
	X, Y                  []float64 // grid coordinates, strictly increasing, at least 2 each
	// Z holds the values row by row: Z[j*len(X) + i] at (X[i], Y[j]). NaN marks a cell with
	// no value; it is drawn grey and left out of colours and contours.
	Z          []float64
	XLog, YLog bool // geometric grids, drawn on log axes
	// Levels are the contour levels; nil chooses about six round values in the range of Z,
	// an empty non-nil slice draws no contours.
	Levels []float64
	// Lines are drawn over the map (for example the best regularization along one axis),
	// coloured in Palette order; their Name, Missing and Err are ignored (a legend cannot be
	// read over every colour of the map: say what the lines are in the title).
	Lines         []Series
	Width, Height float64 // points; 0 takes DefaultWidth / DefaultHeight
}

// barWidth is the strip on the right that holds the colour bar, in points.
const barWidth = 70

// Build lays out the heat map and its colour bar.
//
// Special cases are: grids with fewer than 2 points on an axis, coordinates not strictly
// increasing (or <= 0 on a log axis), and a Z of the wrong length are errors; a Z without
// any finite value is an error; a constant Z is drawn in one colour.
func (hm Heat) Build() (*Figure, error) {
	w, h, err := size(hm.Width, hm.Height)
	if err != nil {
		return nil, err
	}
	xs, err := coords("x", hm.X, hm.XLog)
	if err != nil {
		return nil, err
	}
	ys, err := coords("y", hm.Y, hm.YLog)
	if err != nil {
		return nil, err
	}
	if len(hm.Z) != len(xs)*len(ys) {
		return nil, fmt.Errorf("z: %d values for a %d x %d grid", len(hm.Z), len(xs), len(ys))
	}
	g := &grid{x: xs, y: ys, z: hm.Z, min: math.Inf(1), max: math.Inf(-1)}
	for _, v := range hm.Z {
		if !math.IsNaN(v) && !math.IsInf(v, 0) {
			g.min, g.max = math.Min(g.min, v), math.Max(g.max, v)
		}
	}
	if math.IsInf(g.min, 0) {
		return nil, errNoData
	}
	lo, hi := g.min, g.max
	if hi == lo {
		d := math.Max(math.Abs(lo)*1e-9, 1e-300)
		lo, hi = lo-d, hi+d
	}
	cmap := moreland.Kindlmann()
	cmap.SetMin(lo)
	cmap.SetMax(hi)

	p := gplot.New()
	sans(p)
	p.Title.Text, p.X.Label.Text, p.Y.Label.Text = hm.Title, hm.XLabel, hm.YLabel
	heat := plotter.NewHeatMap(upsampled(g), cmap.Palette(256))
	heat.Min, heat.Max = lo, hi
	heat.NaN = color.Gray{0xB0}
	heat.Rasterized = true
	p.Add(quietHeat{heat})
	levels := hm.Levels
	if levels == nil {
		levels = Levels(g.min, g.max)
	}
	if len(levels) > 0 {
		ct := plotter.NewContour(filled(g), append([]float64(nil), levels...), nil)
		ct.Min, ct.Max = lo, hi
		ct.LineStyles = []draw.LineStyle{{Color: color.White, Width: vg.Points(0.8)}}
		p.Add(ct)
	}
	for i, s := range hm.Lines {
		var run plotter.XYs
		col := Palette[i%len(Palette)]
		for k := range s.X {
			if k < len(s.Y) && ok(s.X[k], hm.XLog) && ok(s.Y[k], hm.YLog) {
				run = append(run, plotter.XY{X: axisValue(s.X[k], hm.XLog), Y: axisValue(s.Y[k], hm.YLog)})
			}
		}
		if len(run) == 0 {
			continue
		}
		ln, sc, _ := plotter.NewLinePoints(run)
		ln.LineStyle = draw.LineStyle{Color: col, Width: vg.Points(2)}
		sc.GlyphStyle = draw.GlyphStyle{Color: col, Radius: vg.Points(1.5), Shape: draw.CircleGlyph{}}
		p.Add(ln, sc)
	}
	// Cells are drawn to the edges of the grid, half a step beyond the first and last points.
	p.X.Min, p.X.Max = edges(xs)
	p.Y.Min, p.Y.Max = edges(ys)
	if hm.XLog {
		p.X.Tick.Marker = powerTicks{}
	}
	if hm.YLog {
		p.Y.Tick.Marker = powerTicks{}
	}

	bar := gplot.New()
	sans(bar)
	bar.Y.Label.Text = hm.ZLabel
	cb := &plotter.ColorBar{ColorMap: cmap, Vertical: true, Colors: 256}
	bar.Add(cb)
	bar.HideX()
	bar.Y.Padding = 0
	bar.X.Padding = 0

	main := func(c draw.Canvas) draw.Canvas { return draw.Crop(c, 0, -barWidth, 0, 0) }
	fr := frameOf(p, main(measure(w, h)), w, h)
	// The colour bar spans the height of the data area, so that its ends line up with it.
	side := func(c draw.Canvas) draw.Canvas {
		return draw.Crop(c, w-barWidth+6, -14, h*vg.Length(1-fr.Bottom), -h*vg.Length(fr.Top))
	}
	if hm.XLog {
		fr.XMin, fr.XMax, fr.XLog = math.Pow(10, fr.XMin), math.Pow(10, fr.XMax), true
	}
	if hm.YLog {
		fr.YMin, fr.YMax, fr.YLog = math.Pow(10, fr.YMin), math.Pow(10, fr.YMax), true
	}
	return &Figure{w: w, h: h, frame: fr, draw: func(c draw.Canvas) {
		c.SetColor(color.White)
		c.Fill(c.Rectangle.Path())
		p.Draw(main(c))
		bar.Draw(side(c))
	}}, nil
}

// coords checks a grid axis and returns it in the plot's own coordinates (log10 on a log
// axis, where a geometric grid becomes an even one and the heat map's cells line up).
func coords(name string, v []float64, log bool) ([]float64, error) {
	if len(v) < 2 {
		return nil, fmt.Errorf("%s: a grid needs at least 2 points, not %d", name, len(v))
	}
	out := make([]float64, len(v))
	for i, x := range v {
		if !ok(x, log) {
			return nil, fmt.Errorf("%s[%d]: %v cannot be placed on the axis", name, i, x)
		}
		if i > 0 && !(x > v[i-1]) {
			return nil, fmt.Errorf("%s[%d]: the grid must increase strictly (%v after %v)", name, i, x, v[i-1])
		}
		out[i] = axisValue(x, log)
	}
	return out, nil
}

func axisValue(x float64, log bool) float64 {
	if log {
		return math.Log10(x)
	}
	return x
}

// edges returns the outer edges of the first and last cells of an axis.
func edges(v []float64) (lo, hi float64) {
	n := len(v)
	return v[0] - (v[1]-v[0])/2, v[n-1] + (v[n-1]-v[n-2])/2
}

// Levels returns the contour levels a heat map draws by default for values in [lo, hi]:
// the round values (axis ticks) strictly inside. Special cases are: hi <= lo gives none.
func Levels(lo, hi float64) []float64 {
	if !(hi > lo) {
		return nil
	}
	var out []float64
	for _, t := range (gplot.DefaultTicks{}).Ticks(lo, hi) {
		if t.Label != "" && t.Value > lo && t.Value < hi {
			out = append(out, t.Value)
		}
	}
	return out
}

// grid is the GridXYZ of a heat map: column c is X[c], row r is Y[r].
type grid struct {
	x, y, z  []float64
	min, max float64
}

func (g *grid) Dims() (c, r int)   { return len(g.x), len(g.y) }
func (g *grid) Z(c, r int) float64 { return g.z[r*len(g.x)+c] }
func (g *grid) X(c int) float64    { return g.x[c] }
func (g *grid) Y(r int) float64    { return g.y[r] }
func (g *grid) Min() float64       { return g.min }
func (g *grid) Max() float64       { return g.max }

// upsampled returns g with every cell split into k x k equal cells of the same value, k
// chosen so that the map is at least 600 cells wide and tall. The rasterized heat map is
// then scaled up by less than the display scales it, so the smoothing of the image by
// the renderer blurs only a sliver at each cell edge instead of the whole map.
func upsampled(g *grid) plotter.GridXYZ {
	nx, ny := len(g.x), len(g.y)
	k := (600 + min(nx, ny) - 1) / min(nx, ny)
	if k <= 1 {
		return g
	}
	sub := func(v []float64, n int) []float64 {
		out := make([]float64, 0, len(v)*n)
		for i := range v {
			var lo, hi float64
			switch {
			case i == 0:
				lo, hi = v[0]-(v[1]-v[0])/2, (v[0]+v[1])/2
			case i == len(v)-1:
				lo, hi = (v[i-1]+v[i])/2, v[i]+(v[i]-v[i-1])/2
			default:
				lo, hi = (v[i-1]+v[i])/2, (v[i]+v[i+1])/2
			}
			for s := 0; s < n; s++ {
				out = append(out, lo+(float64(s)+0.5)*(hi-lo)/float64(n))
			}
		}
		return out
	}
	return &fine{g: g, k: k, x: sub(g.x, k), y: sub(g.y, k)}
}

type fine struct {
	g    *grid
	k    int
	x, y []float64
}

func (f *fine) Dims() (c, r int)   { return len(f.x), len(f.y) }
func (f *fine) Z(c, r int) float64 { return f.g.Z(c/f.k, r/f.k) }
func (f *fine) X(c int) float64    { return f.x[c] }
func (f *fine) Y(r int) float64    { return f.y[r] }

// quietHeat is a heat map without glyph boxes: the library's HeatMap returns one per cell,
// which only serve to pad the axes for glyphs it does not draw and cost more than the
// drawing itself on a fine grid.
type quietHeat struct{ *plotter.HeatMap }

func (quietHeat) GlyphBoxes(*gplot.Plot) []gplot.GlyphBox { return nil }

// filled returns a copy of g whose missing cells take the mean of their neighbours with a
// value, repeated until every cell has one. The contour tracer needs a number at every
// corner (a NaN corner reads as lying on every level); a filled cell stays grey in the heat
// map, so the contours through it are marked as interpolated by the colour beneath them.
func filled(g *grid) *grid {
	z := append([]float64(nil), g.z...)
	nx, ny := len(g.x), len(g.y)
	for {
		var todo []int
		for k, v := range z {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				todo = append(todo, k)
			}
		}
		if len(todo) == 0 {
			break
		}
		next := append([]float64(nil), z...)
		progress := false
		for _, k := range todo {
			i, j := k%nx, k/nx
			sum, n := 0.0, 0
			for _, d := range [4][2]int{{-1, 0}, {1, 0}, {0, -1}, {0, 1}} {
				a, b := i+d[0], j+d[1]
				if a < 0 || a >= nx || b < 0 || b >= ny {
					continue
				}
				if v := z[b*nx+a]; !math.IsNaN(v) && !math.IsInf(v, 0) {
					sum += v
					n++
				}
			}
			if n > 0 {
				next[k] = sum / float64(n)
				progress = true
			}
		}
		z = next
		if !progress {
			break
		}
	}
	return &grid{x: g.x, y: g.y, z: z, min: g.min, max: g.max}
}

// powerTicks labels an axis held in log10 coordinates with the values themselves.
type powerTicks struct{}

func (powerTicks) Ticks(min, max float64) []gplot.Tick {
	ts := ticker{log: true, style: textStyle(tickSize)}.Ticks(math.Pow(10, min), math.Pow(10, max))
	out := make([]gplot.Tick, 0, len(ts))
	for _, t := range ts {
		if t.Value > 0 {
			out = append(out, gplot.Tick{Value: math.Log10(t.Value), Label: t.Label})
		}
	}
	if len(out) == 0 {
		for _, v := range []float64{min, max} {
			out = append(out, gplot.Tick{Value: v, Label: strconv.FormatFloat(math.Pow(10, v), 'g', 3, 64)})
		}
	}
	return out
}
