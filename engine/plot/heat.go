package plot

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"strconv"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/palette"
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
	Lines []Series
	// MarkLowest marks the cell with the lowest value (the best setting on a map of errors)
	// and writes the value beside it.
	MarkLowest bool
	// XTicks and YTicks are values the axes label whenever they lie in range (m/n = 1).
	XTicks, YTicks []float64
	Width, Height  float64 // points; 0 takes DefaultWidth / DefaultHeight
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
	p.Add(&raster{g: g, cmap: cmap, lo: lo, hi: hi})
	levels := hm.Levels
	if levels == nil {
		levels = Levels(g.min, g.max)
	}
	var labels *contourLabels
	if len(levels) > 0 {
		fg := filled(g)
		ct := plotter.NewContour(fg, append([]float64(nil), levels...), nil)
		ct.Min, ct.Max = lo, hi
		ct.LineStyles = []draw.LineStyle{{Color: color.White, Width: vg.Points(0.8)}}
		p.Add(quietContour{ct})
		labels = &contourLabels{g: fg, levels: levels}
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
	var low *lowest
	if hm.MarkLowest {
		k := 0
		for i, v := range hm.Z {
			if !math.IsNaN(v) && !math.IsInf(v, 0) && (math.IsNaN(hm.Z[k]) || math.IsInf(hm.Z[k], 0) || v < hm.Z[k]) {
				k = i
			}
		}
		low = &lowest{x: xs[k%len(xs)], y: ys[k/len(xs)], text: "lowest " + strconv.FormatFloat(hm.Z[k], 'g', 3, 64)}
		p.Add(low)
	}
	if labels != nil {
		labels.avoid = low
		p.Add(labels)
	}
	// Cells are drawn to the edges of the grid, half a step beyond the first and last points.
	p.X.Min, p.X.Max = edges(xs)
	p.Y.Min, p.Y.Max = edges(ys)
	xt := &ticker{must: hm.XTicks, style: p.X.Tick.Label}
	yt := &ticker{must: hm.YTicks, vertical: true, style: p.Y.Tick.Label}
	p.X.Tick.Marker, p.Y.Tick.Marker = xt, yt
	if hm.XLog {
		p.X.Tick.Marker = powerTicks{must: hm.XTicks}
	}
	if hm.YLog {
		p.Y.Tick.Marker = powerTicks{must: hm.YTicks}
	}

	bar := gplot.New()
	sans(bar)
	bar.Y.Label.Text = hm.ZLabel
	cb := &plotter.ColorBar{ColorMap: cmap, Vertical: true, Colors: 256}
	bar.Add(cb)
	bar.HideX()
	bar.Y.Padding = 0
	bar.X.Padding = 0
	bt := &ticker{must: levels, vertical: true, style: bar.Y.Tick.Label}
	bar.Y.Tick.Marker = bt

	main := func(c draw.Canvas) draw.Canvas { return draw.Crop(c, 2, -barWidth, 2, -2) }
	for range 2 {
		dc := p.DataCanvas(main(measure(w, h)))
		xt.length, yt.length, bt.length = dc.Max.X-dc.Min.X, dc.Max.Y-dc.Min.Y, dc.Max.Y-dc.Min.Y
	}
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
	dataBox := Box{MinX: fr.Left * float64(w), MaxX: fr.Right * float64(w), MinY: (1 - fr.Bottom) * float64(h), MaxY: (1 - fr.Top) * float64(h)}
	return &Figure{w: w, h: h, frame: fr, layout: Layout{Width: float64(w), Height: float64(h), Data: dataBox}, draw: func(c draw.Canvas) {
		c.SetColor(color.White)
		c.Fill(c.Rectangle.Path())
		p.Draw(main(c))
		bar.Draw(side(c))
	}}, nil
}

// quietContour is a contour plot without glyph boxes: the library's Contour traces every
// contour again each time the layout asks for them (several times a figure), only to pad
// the axes for glyphs it does not draw.
type quietContour struct{ *plotter.Contour }

func (quietContour) GlyphBoxes(*gplot.Plot) []gplot.GlyphBox { return nil }

// raster draws the cells of a heat map as one 8-bit paletted image (a PNG of a quarter the
// size of gonum's 16-bit RGBA one, encoded several times faster), each cell split into
// k x k pixels so that the map is at least 300 pixels wide and tall: a renderer that scales
// the image up smoothly (the command line's PNG) then blurs only a sliver at each cell edge
// instead of the whole map. The browser is told to scale it up without smoothing (see
// svgFixes); encoding the PNG is most of the time a map takes to draw in the page.
type raster struct {
	g      *grid
	cmap   palette.ColorMap
	lo, hi float64
}

// nanIndex is the palette entry of a cell without a value.
const nanIndex = 255

func (r *raster) image() *image.Paletted {
	nx, ny := len(r.g.x), len(r.g.y)
	k := max(1, (300+min(nx, ny)-1)/min(nx, ny))
	pal := make(color.Palette, 256)
	for i := range nanIndex {
		// The top entry computed as lo + (hi - lo) can round past hi, which the colour map refuses.
		c, err := r.cmap.At(math.Min(r.hi, r.lo+(r.hi-r.lo)*float64(i)/float64(nanIndex-1)))
		if err != nil {
			c = color.Black
		}
		pal[i] = c
	}
	pal[nanIndex] = color.Gray{0xB0}
	img := image.NewPaletted(image.Rect(0, 0, nx*k, ny*k), pal)
	row := make([]uint8, nx*k)
	for j := range ny {
		for i := range nx {
			v := r.g.Z(i, j)
			idx := uint8(nanIndex)
			if !math.IsNaN(v) && !math.IsInf(v, 0) {
				u := (v - r.lo) / (r.hi - r.lo)
				idx = uint8(math.Round(math.Min(1, math.Max(0, u)) * (nanIndex - 1)))
			}
			for s := range k {
				row[i*k+s] = idx
			}
		}
		for s := range k {
			y := (ny-1-j)*k + s // image rows run top down
			copy(img.Pix[y*img.Stride:], row)
		}
	}
	return img
}

func (r *raster) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, trY := p.Transforms(&c)
	x0, x1 := edges(r.g.x)
	y0, y1 := edges(r.g.y)
	c.DrawImage(vg.Rectangle{Min: vg.Point{X: trX(x0), Y: trY(y0)}, Max: vg.Point{X: trX(x1), Y: trY(y1)}}, r.image())
}

func (r *raster) DataRange() (xmin, xmax, ymin, ymax float64) {
	x0, x1 := edges(r.g.x)
	y0, y1 := edges(r.g.y)
	return x0, x1, y0, y1
}

// lowest marks the cell with the lowest value, labelled with it.
type lowest struct {
	x, y float64
	text string
	box  vg.Rectangle // where its label went, for the contour labels to avoid
}

func (l *lowest) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, trY := p.Transforms(&c)
	pt := vg.Point{X: trX(l.x), Y: trY(l.y)}
	c.DrawGlyph(draw.GlyphStyle{Color: color.White, Radius: 5, Shape: draw.CrossGlyph{}}, pt)
	c.DrawGlyph(draw.GlyphStyle{Color: color.Black, Radius: 3.5, Shape: draw.CrossGlyph{}}, pt)
	sty := markStyle()
	ext := sty.FontExtents()
	wd, ht := sty.Width(l.text)+4, ext.Ascent+ext.Descent+2
	// The label goes beside the marker, on whichever side keeps it in the data area.
	x := pt.X + 7
	if x+wd > c.Max.X {
		x = pt.X - 7 - wd
	}
	y := pt.Y - ht/2
	y = min(max(y, c.Min.Y+1), c.Max.Y-1-ht)
	l.box = vg.Rectangle{Min: vg.Point{X: x, Y: y}, Max: vg.Point{X: x + wd, Y: y + ht}}
	c.SetColor(color.NRGBA{0xFF, 0xFF, 0xFF, 0xD8})
	c.Fill(l.box.Path())
	c.FillText(sty, vg.Point{X: x + 2, Y: y + 1 + ext.Descent}, l.text)
}

func (l *lowest) DataRange() (xmin, xmax, ymin, ymax float64) {
	return math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
}

// contourLabels writes each contour's level on it, where the line crosses the grid farthest
// from the edges of the map and from the labels already placed.
type contourLabels struct {
	g      *grid
	levels []float64
	avoid  *lowest
}

func (cl *contourLabels) DataRange() (xmin, xmax, ymin, ymax float64) {
	return math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
}

func (cl *contourLabels) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, trY := p.Transforms(&c)
	sty := markStyle()
	ext := sty.FontExtents()
	var placed []vg.Rectangle
	if cl.avoid != nil {
		placed = append(placed, cl.avoid.box)
	}
	nx, ny := len(cl.g.x), len(cl.g.y)
	// Every level is written once, and then again on any stretch of its contours at least a
	// third of the map away from where it is written already (another line of the level),
	// as long as there is room: the first round gives each level its place.
	apart := vg.Length(math.Min(float64(c.Max.X-c.Min.X), float64(c.Max.Y-c.Min.Y))) / 3
	mine := make([][]vg.Point, len(cl.levels))
	for round := 0; ; round++ {
		any := false
		for k, lv := range cl.levels {
			if round > 0 && len(mine[k]) == 0 {
				continue
			}
			text := strconv.FormatFloat(lv, 'g', 4, 64)
			wd, ht := sty.Width(text)+4, ext.Ascent+ext.Descent+2
			var best vg.Rectangle
			bestScore := vg.Length(-1)
			try := func(x, y float64) {
				pt := vg.Point{X: trX(x), Y: trY(y)}
				r := vg.Rectangle{Min: vg.Point{X: pt.X - wd/2, Y: pt.Y - ht/2}, Max: vg.Point{X: pt.X + wd/2, Y: pt.Y + ht/2}}
				if r.Min.X < c.Min.X+2 || r.Max.X > c.Max.X-2 || r.Min.Y < c.Min.Y+2 || r.Max.Y > c.Max.Y-2 || overlapsAny(r, placed) {
					return
				}
				for _, q := range mine[k] {
					if vg.Length(math.Hypot(float64(q.X-pt.X), float64(q.Y-pt.Y))) < apart {
						return
					}
				}
				score := min(r.Min.X-c.Min.X, c.Max.X-r.Max.X, r.Min.Y-c.Min.Y, c.Max.Y-r.Max.Y)
				for _, o := range placed {
					d := vg.Length(math.Hypot(float64((o.Min.X+o.Max.X)/2-pt.X), float64((o.Min.Y+o.Max.Y)/2-pt.Y)))
					score = min(score, d/2)
				}
				if score > bestScore {
					best, bestScore = r, score
				}
			}
			// Crossings of the level along the grid's edges, interpolated linearly.
			for j := range ny {
				for i := range nx {
					z := cl.g.Z(i, j)
					if i+1 < nx {
						if z2 := cl.g.Z(i+1, j); (z-lv)*(z2-lv) < 0 {
							try(cl.g.x[i]+(lv-z)/(z2-z)*(cl.g.x[i+1]-cl.g.x[i]), cl.g.y[j])
						}
					}
					if j+1 < ny {
						if z2 := cl.g.Z(i, j+1); (z-lv)*(z2-lv) < 0 {
							try(cl.g.x[i], cl.g.y[j]+(lv-z)/(z2-z)*(cl.g.y[j+1]-cl.g.y[j]))
						}
					}
				}
			}
			if bestScore < 0 {
				continue
			}
			any = true
			placed = append(placed, best)
			mine[k] = append(mine[k], vg.Point{X: (best.Min.X + best.Max.X) / 2, Y: (best.Min.Y + best.Max.Y) / 2})
			c.SetColor(color.NRGBA{0xFF, 0xFF, 0xFF, 0xC8})
			c.Fill(best.Path())
			c.FillText(sty, vg.Point{X: best.Min.X + 2, Y: best.Min.Y + 1 + ext.Descent}, text)
		}
		if !any {
			break
		}
	}
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
type powerTicks struct{ must []float64 }

func (pt powerTicks) Ticks(min, max float64) []gplot.Tick {
	ts := (&ticker{log: true, must: pt.must, style: textStyle(tickSize)}).Ticks(math.Pow(10, min), math.Pow(10, max))
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
