package plot

import (
	"errors"
	"fmt"
	"image/color"
	"math"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Series is one curve of a line figure.
type Series struct {
	Name string    // legend text; "" leaves the series out of the legend
	X, Y []float64 // equal lengths; a NaN or infinite Y is a gap in the curve
	// Err, when not nil, holds the half-width of an error bar at each point (same length
	// as X); NaN or 0 draws no bar there.
	Err []float64
	// Missing lists X values where the series has no number (a point that failed or did
	// not converge); they are marked by an open triangle on the bottom edge, never joined.
	Missing []float64
	Marks   bool // a marker at every point, besides the line
	NoLine  bool // markers only
	Dashed  bool
}

// Mark is a vertical (at X) or horizontal (at Y) reference line across the data area,
// labelled in place: a vertical one above the data area, a horizontal one along itself.
type Mark struct {
	At    float64
	Label string // "" for none
}

// Line is a figure of curves over one x axis.
type Line struct {
	Title, XLabel, YLabel string
	XLog, YLog            bool
	Series                []Series // coloured in Palette order
	VLines, HLines        []Mark   // drawn in black (vertical, dashed) and grey (horizontal, dotted)
	// XTicks and YTicks are values the axes label whenever they lie in range: the thresholds
	// and targets the study names (m/n = 1, a planned error). 0 is always labelled on a
	// linear axis that holds it.
	XTicks, YTicks []float64
	Width, Height  float64 // points; 0 takes DefaultWidth / DefaultHeight
}

// Build lays out the figure.
//
// Special cases are: points that cannot be shown (non-finite, or <= 0 on a log axis) are
// gaps; a figure without a single point to show is an error (naming the log axis when it is
// the reason); series of unequal lengths are an error naming the series; reference lines
// outside the data range widen it; a legend too wide for the side goes under the data
// area, and the figure grows by its height.
func (l Line) Build() (*Figure, error) {
	w, h, err := size(l.Width, l.Height)
	if err != nil {
		return nil, err
	}
	p := gplot.New()
	sans(p)
	p.X.Label.Text, p.Y.Label.Text = l.XLabel, l.YLabel
	p.Add(plotter.NewGrid())
	var lg legend
	shown := 0
	for i, s := range l.Series {
		n, err := l.addSeries(p, s, Palette[i%len(Palette)], &lg)
		if err != nil {
			return nil, fmt.Errorf("series %d (%s): %w", i+1, s.Name, err)
		}
		shown += n
	}
	if shown == 0 {
		if l.YLog || l.XLog {
			return nil, errors.New("no data to draw: a logarithmic axis shows positive values only")
		}
		return nil, errNoData
	}
	var vrules, hrules []*rule
	for _, m := range l.VLines {
		if ok(m.At, l.XLog) {
			r := &rule{at: m.At, vertical: true, label: m.Label, style: draw.LineStyle{Color: color.Black, Width: vg.Points(1.2), Dashes: []vg.Length{vg.Points(5), vg.Points(3)}}}
			p.Add(r)
			vrules = append(vrules, r)
		}
	}
	for _, m := range l.HLines {
		if ok(m.At, l.YLog) {
			r := &rule{at: m.At, label: m.Label, style: draw.LineStyle{Color: color.Gray{0x55}, Width: vg.Points(1.2), Dashes: []vg.Length{vg.Points(1.5), vg.Points(2)}}}
			p.Add(r)
			hrules = append(hrules, r)
		}
	}
	p.X.Min, p.X.Max = niceRange(p.X.Min, p.X.Max, l.XLog)
	p.Y.Min, p.Y.Max = niceRange(p.Y.Min, p.Y.Max, l.YLog)
	if l.XLog {
		p.X.Scale = gplot.LogScale{}
	}
	if l.YLog {
		p.Y.Scale = gplot.LogScale{}
	}
	xt := &ticker{log: l.XLog, must: l.XTicks, style: p.X.Tick.Label}
	yt := &ticker{log: l.YLog, must: l.YTicks, vertical: true, style: p.Y.Tick.Label}
	p.X.Tick.Marker, p.Y.Tick.Marker = xt, yt

	lay := &lineLayout{w: w, h: h, title: l.Title, legend: &lg}
	lay.setTop(vrules)
	// The data area depends on the tick labels, which depend on the length of the axes:
	// two passes settle it.
	area := func(c draw.Canvas) draw.Canvas {
		dc := p.DataCanvas(c)
		xt.length, yt.length = dc.Max.X-dc.Min.X, dc.Max.Y-dc.Min.Y
		return p.DataCanvas(c)
	}
	full := lay.plotCanvas(measure(w, h), legendNone)
	dc := area(full)
	obstacles := l.segments(p, dc, vrules, hrules)
	lay.place(dc, obstacles)
	if lay.where == legendBelow {
		// A legend under the figure makes it taller rather than squeeze the data area.
		_, lh := lg.size()
		h += lh + 6
		lay.h = h
	}
	if lay.where != legendInside {
		dc = area(lay.plotCanvas(measure(w, h), lay.where))
		lay.place(dc, nil)
	}
	fr := frameOf(p, lay.plotCanvas(measure(w, h), lay.where), w, h)
	dataBox := Box{MinX: float64(dc.Min.X), MinY: float64(dc.Min.Y), MaxX: float64(dc.Max.X), MaxY: float64(dc.Max.Y)}
	f := &Figure{w: w, h: h, frame: fr, layout: Layout{Width: float64(w), Height: float64(h), Data: dataBox, Legend: lay.legendBox()}}
	f.draw = func(c draw.Canvas) {
		c.SetColor(color.White)
		c.Fill(c.Rectangle.Path())
		p.Draw(lay.plotCanvas(c, lay.where))
		lay.drawTexts(c, p, draw.Canvas{Canvas: c.Canvas, Rectangle: dc.Rectangle}, vrules, hrules)
	}
	return f, nil
}

// ok reports whether v can be placed on an axis (log when log is set).
func ok(v float64, log bool) bool {
	return !math.IsNaN(v) && !math.IsInf(v, 0) && (!log || v > 0)
}

// addSeries adds the runs of showable points of s to p and returns how many points it drew.
func (l Line) addSeries(p *gplot.Plot, s Series, col color.RGBA, lg *legend) (int, error) {
	if len(s.X) != len(s.Y) {
		return 0, fmt.Errorf("%d x values but %d y values", len(s.X), len(s.Y))
	}
	if s.Err != nil && len(s.Err) != len(s.X) {
		return 0, fmt.Errorf("%d x values but %d error bars", len(s.X), len(s.Err))
	}
	style := draw.LineStyle{Color: col, Width: vg.Points(1.8)}
	if s.Dashed {
		style.Dashes = []vg.Length{vg.Points(6), vg.Points(3)}
	}
	glyph := draw.GlyphStyle{Color: col, Radius: vg.Points(2.5), Shape: draw.CircleGlyph{}}
	var legend []gplot.Thumbnailer
	shown := 0
	var run plotter.XYs
	var bars errPoints
	flush := func() {
		if len(run) == 0 {
			return
		}
		if !s.NoLine {
			ln, _ := plotter.NewLine(run)
			ln.LineStyle = style
			p.Add(ln)
			if legend == nil {
				legend = append(legend, ln)
			}
		}
		// A lone point has no line to show it: it gets a marker.
		if s.Marks || s.NoLine || len(run) == 1 {
			sc, _ := plotter.NewScatter(run)
			sc.GlyphStyle = glyph
			p.Add(sc)
			if len(legend) < 2 {
				legend = append(legend, sc)
			}
		}
		run = nil
	}
	for i := range s.X {
		x, y := s.X[i], s.Y[i]
		if !ok(x, l.XLog) || !ok(y, l.YLog) {
			flush()
			continue
		}
		run = append(run, plotter.XY{X: x, Y: y})
		shown++
		if s.Err != nil && s.Err[i] > 0 && !math.IsInf(s.Err[i], 0) {
			lo := s.Err[i]
			if l.YLog && lo >= y {
				lo = y * (1 - 1e-3) // a bar reaching zero runs off a log axis: stop just above it
			}
			bars.XYs = append(bars.XYs, plotter.XY{X: x, Y: y})
			bars.YErrors = append(bars.YErrors, struct{ Low, High float64 }{lo, s.Err[i]})
		}
	}
	flush()
	if len(bars.XYs) > 0 {
		eb, err := plotter.NewYErrorBars(bars)
		if err != nil {
			return 0, err
		}
		eb.LineStyle = draw.LineStyle{Color: col, Width: vg.Points(1)}
		p.Add(eb)
	}
	if s.Name != "" && len(legend) > 0 {
		lg.add(s.Name, legend...)
	}
	var miss []float64
	for _, x := range s.Missing {
		if ok(x, l.XLog) {
			miss = append(miss, x)
		}
	}
	if len(miss) > 0 {
		m := &missing{xs: miss, style: draw.GlyphStyle{Color: col, Radius: vg.Points(3.5), Shape: draw.TriangleGlyph{}}}
		p.Add(m)
		label := "no converged value"
		if s.Name != "" {
			label += " (" + s.Name + ")"
		}
		lg.add(label, m)
	}
	return shown, nil
}

// errPoints feeds plotter.NewYErrorBars.
type errPoints struct {
	plotter.XYs
	plotter.YErrors
}

// rule is a line across the whole data area at a data value.
type rule struct {
	at       float64
	vertical bool
	label    string
	style    draw.LineStyle
}

func (r *rule) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, trY := p.Transforms(&c)
	if r.vertical {
		x := trX(r.at)
		c.StrokeLine2(r.style, x, c.Min.Y, x, c.Max.Y)
		return
	}
	y := trY(r.at)
	c.StrokeLine2(r.style, c.Min.X, y, c.Max.X, y)
}

// DataRange widens only the axis the rule crosses, so that it stays in view.
func (r *rule) DataRange() (xmin, xmax, ymin, ymax float64) {
	if r.vertical {
		return r.at, r.at, math.Inf(1), math.Inf(-1)
	}
	return math.Inf(1), math.Inf(-1), r.at, r.at
}

// missing marks x positions without a value on the bottom edge of the data area.
type missing struct {
	xs    []float64
	style draw.GlyphStyle
}

func (m *missing) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, _ := p.Transforms(&c)
	for _, x := range m.xs {
		c.DrawGlyph(m.style, vg.Point{X: trX(x), Y: c.Min.Y + m.style.Radius})
	}
}

func (m *missing) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = math.Inf(1), math.Inf(-1)
	for _, x := range m.xs {
		xmin, xmax = math.Min(xmin, x), math.Max(xmax, x)
	}
	return xmin, xmax, math.Inf(1), math.Inf(-1)
}

func (m *missing) Thumbnail(c *draw.Canvas) { c.DrawGlyph(m.style, c.Center()) }
