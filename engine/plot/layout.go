package plot

import (
	"image/color"
	"math"
	"sync"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Font sizes of figure text, in points: a figure 480 points wide set in a single-column
// paper at its text width reads like the captions around it (8 to 10 points).
const (
	titleSize = 10
	labelSize = 9.5
	tickSize  = 8.5
	noteSize  = 8 // legend entries and the labels of marks and contours
)

// Box is a rectangle in points, measured from the bottom-left corner of the figure.
type Box struct{ MinX, MinY, MaxX, MaxY float64 }

// Empty reports whether b has no area.
func (b Box) Empty() bool { return !(b.MaxX > b.MinX && b.MaxY > b.MinY) }

// Overlaps reports whether b and o share some area.
func (b Box) Overlaps(o Box) bool {
	return !b.Empty() && !o.Empty() && b.MinX < o.MaxX && o.MinX < b.MaxX && b.MinY < o.MaxY && o.MinY < b.MaxY
}

// Inside reports whether b lies within o.
func (b Box) Inside(o Box) bool {
	return b.MinX >= o.MinX && b.MaxX <= o.MaxX && b.MinY >= o.MinY && b.MaxY <= o.MaxY
}

func boxOf(r vg.Rectangle) Box {
	return Box{MinX: float64(r.Min.X), MinY: float64(r.Min.Y), MaxX: float64(r.Max.X), MaxY: float64(r.Max.Y)}
}

// Layout is where the parts of a built figure lie, in points from its bottom-left corner.
type Layout struct {
	Width, Height float64
	Data          Box // the data area
	Legend        Box // the legend; empty when the figure has none
}

// Layout returns where the parts of the figure lie.
func (f *Figure) Layout() Layout { return f.layout }

// textStyle is the figure's text style at a size.
func textStyle(size vg.Length) text.Style {
	return text.Style{Color: color.Black, Font: font.Font{Typeface: "Liberation", Variant: "Sans", Size: size},
		Handler: measured}
}

// measured is the text handler of every figure text: gonum's plain text, with the boxes of
// the texts it measured remembered. Laying a figure out measures each label many times (in
// the page's WebAssembly a measurement costs tens of microseconds, and a figure makes
// thousands), and a figure's texts are few.
var measured = &measuring{Plain: text.Plain{Fonts: font.DefaultCache}, boxes: map[boxKey][3]vg.Length{}}

type boxKey struct {
	txt string
	fnt font.Font
}

type measuring struct {
	text.Plain
	mu    sync.Mutex
	boxes map[boxKey][3]vg.Length
}

// Box implements text.Handler.
func (m *measuring) Box(txt string, fnt font.Font) (width, height, depth vg.Length) {
	k := boxKey{txt, fnt}
	m.mu.Lock()
	b, ok := m.boxes[k]
	m.mu.Unlock()
	if ok {
		return b[0], b[1], b[2]
	}
	width, height, depth = m.Plain.Box(txt, fnt)
	m.mu.Lock()
	if len(m.boxes) > 4096 {
		clear(m.boxes)
	}
	m.boxes[k] = [3]vg.Length{width, height, depth}
	m.mu.Unlock()
	return width, height, depth
}

// legend is the key of a line figure's curves, drawn by the figure itself so that its box
// is known exactly: swatches on the left, text after them.
type legend struct {
	entries []legendEntry
	box     vg.Rectangle
}

type legendEntry struct {
	text   string
	thumbs []gplot.Thumbnailer
}

const thumbWidth = 18

func (lg *legend) add(text string, thumbs ...gplot.Thumbnailer) {
	lg.entries = append(lg.entries, legendEntry{text: text, thumbs: thumbs})
}

func (lg *legend) style() text.Style { return textStyle(noteSize) }

func (lg *legend) rowHeight() vg.Length { return noteSize * 1.35 }

// size is the legend's width and height with its padding.
func (lg *legend) size() (vg.Length, vg.Length) {
	if len(lg.entries) == 0 {
		return 0, 0
	}
	sty := lg.style()
	var tw vg.Length
	for _, e := range lg.entries {
		tw = max(tw, sty.Width(e.text))
	}
	return 4 + thumbWidth + 4 + tw + 4, vg.Length(len(lg.entries))*lg.rowHeight() + 4
}

func (lg *legend) draw(c draw.Canvas) {
	if len(lg.entries) == 0 {
		return
	}
	b := lg.box
	c.SetColor(color.White)
	c.Fill(b.Path())
	c.SetLineStyle(draw.LineStyle{Color: color.Gray{0xC0}, Width: vg.Points(0.5)})
	c.Stroke(b.Path())
	sty := lg.style()
	ext := sty.FontExtents()
	y := b.Max.Y - 2
	for _, e := range lg.entries {
		icon := draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{
			Min: vg.Point{X: b.Min.X + 4, Y: y - lg.rowHeight()}, Max: vg.Point{X: b.Min.X + 4 + thumbWidth, Y: y}}}
		for _, t := range e.thumbs {
			t.Thumbnail(&icon)
		}
		base := y - lg.rowHeight()/2 - (ext.Ascent-ext.Descent)/2
		c.FillText(sty, vg.Point{X: b.Min.X + 4 + thumbWidth + 4, Y: base}, e.text)
		y -= lg.rowHeight()
	}
}

// Where a line figure's legend goes.
const (
	legendNone   = iota // not decided yet: lay out as if inside
	legendInside        // in a corner of the data area that no curve crosses
	legendRight         // in a strip right of the data area
	legendBelow         // in a strip under the figure
)

// lineLayout places what a line figure draws around gonum's plot: the title, the labels of
// vertical marks above the data area, the legend and the labels of horizontal marks.
type lineLayout struct {
	w, h   vg.Length
	title  string
	legend *legend
	where  int
	top    vg.Length // height of the title and the mark labels above the data area
	rows   int       // rows of mark labels
	hboxes []vg.Rectangle
}

func (ll *lineLayout) titleStyle() text.Style {
	sty := textStyle(titleSize)
	for sty.Font.Size > 6 && sty.Width(ll.title) > ll.w-8 {
		sty.Font.Size -= 0.5
	}
	return sty
}

func markStyle() text.Style { return textStyle(noteSize) }

// setTop reserves the room above the data area.
func (ll *lineLayout) setTop(vrules []*rule) {
	ll.top = 4
	if ll.title != "" {
		ll.top += ll.titleStyle().Height(ll.title) + 4
	}
	for _, r := range vrules {
		if r.label != "" {
			ll.rows++
		}
	}
	ll.top += vg.Length(ll.rows)*(noteSize*1.3) + 2
}

// plotCanvas is the part of c that gonum's plot (axes and data) is drawn in.
func (ll *lineLayout) plotCanvas(c draw.Canvas, where int) draw.Canvas {
	lw, lh := ll.legend.size()
	right := vg.Length(6)
	bottom := vg.Length(0)
	switch where {
	case legendRight:
		right = lw + 10
	case legendBelow:
		bottom = lh + 6
	}
	return draw.Crop(c, 2, -right, bottom+2, -ll.top)
}

// place decides where the legend goes and puts its box there. With obstacles (the plotted
// segments in the canvas of dc), the corners of the data area are tried first, the one
// least in the way of reading first; without, the legend goes in the strip chosen before.
func (ll *lineLayout) place(dc draw.Canvas, obstacles []segment) {
	lw, lh := ll.legend.size()
	if lw == 0 {
		ll.where = legendInside
		return
	}
	if ll.where == legendNone {
		const inset = 4
		for _, corner := range [][2]bool{{false, true}, {true, true}, {false, false}, {true, false}} {
			left, top := corner[0], corner[1]
			r := vg.Rectangle{Min: vg.Point{X: dc.Max.X - inset - lw, Y: dc.Min.Y + inset}}
			if left {
				r.Min.X = dc.Min.X + inset
			}
			if top {
				r.Min.Y = dc.Max.Y - inset - lh
			}
			r.Max = vg.Point{X: r.Min.X + lw, Y: r.Min.Y + lh}
			if r.Min.X < dc.Min.X || r.Min.Y < dc.Min.Y || r.Max.X > dc.Max.X || r.Max.Y > dc.Max.Y {
				continue
			}
			if !hits(r, obstacles, 2) {
				ll.where, ll.legend.box = legendInside, r
				return
			}
		}
		ll.where = legendRight
		if lw > ll.w*0.36 {
			ll.where = legendBelow
		}
		return
	}
	switch ll.where {
	case legendRight:
		x := ll.w - 4 - lw
		ll.legend.box = vg.Rectangle{Min: vg.Point{X: x, Y: dc.Max.Y - lh}, Max: vg.Point{X: x + lw, Y: dc.Max.Y}}
	case legendBelow:
		x := max(2, min(dc.Min.X, ll.w-2-lw))
		ll.legend.box = vg.Rectangle{Min: vg.Point{X: x, Y: 2}, Max: vg.Point{X: x + lw, Y: 2 + lh}}
	}
}

func (ll *lineLayout) legendBox() Box {
	if len(ll.legend.entries) == 0 {
		return Box{}
	}
	return boxOf(ll.legend.box)
}

// drawTexts draws the title, the legend and the labels of the marks.
func (ll *lineLayout) drawTexts(c draw.Canvas, p *gplot.Plot, dc draw.Canvas, vrules, hrules []*rule) {
	if ll.title != "" {
		sty := ll.titleStyle()
		sty.XAlign = draw.XCenter
		ext := sty.FontExtents()
		c.FillText(sty, vg.Point{X: ll.w / 2, Y: ll.h - 3 - ext.Ascent}, ll.title)
	}
	ll.legend.draw(c)
	trX, trY := p.Transforms(&dc)
	sty := markStyle()
	ext := sty.FontExtents()
	var placed []vg.Rectangle
	row := 0
	for _, r := range vrules {
		if r.label == "" {
			continue
		}
		wd := sty.Width(r.label)
		x := min(max(trX(r.at)-wd/2, dc.Min.X), ll.w-3-wd)
		base := dc.Max.Y + 3 + ext.Descent + vg.Length(row)*(noteSize*1.3)
		c.FillText(sty, vg.Point{X: x, Y: base}, r.label)
		placed = append(placed, vg.Rectangle{Min: vg.Point{X: x, Y: base - ext.Descent}, Max: vg.Point{X: x + wd, Y: base + ext.Ascent}})
		row++
	}
	avoid := append([]vg.Rectangle(nil), placed...)
	if ll.where == legendInside && len(ll.legend.entries) > 0 {
		avoid = append(avoid, ll.legend.box)
	}
	for _, r := range hrules {
		if r.label == "" {
			continue
		}
		y := trY(r.at)
		wd, ht := sty.Width(r.label), ext.Ascent+ext.Descent
		var box vg.Rectangle
		for _, cand := range []struct {
			right, above bool
		}{{true, true}, {true, false}, {false, true}, {false, false}} {
			x := dc.Max.X - 3 - wd
			if !cand.right {
				x = dc.Min.X + 3
			}
			y0 := y + 2
			if !cand.above {
				y0 = y - 2 - ht
			}
			box = vg.Rectangle{Min: vg.Point{X: x, Y: y0}, Max: vg.Point{X: x + wd, Y: y0 + ht}}
			if box.Max.Y <= dc.Max.Y && box.Min.Y >= dc.Min.Y && !overlapsAny(box, avoid) {
				break
			}
		}
		c.SetColor(color.NRGBA{0xFF, 0xFF, 0xFF, 0xC0})
		c.Fill(box.Path())
		c.FillText(sty, vg.Point{X: box.Min.X, Y: box.Min.Y + ext.Descent}, r.label)
		avoid = append(avoid, box)
	}
}

func overlapsAny(r vg.Rectangle, rs []vg.Rectangle) bool {
	for _, o := range rs {
		if boxOf(r).Overlaps(boxOf(o)) {
			return true
		}
	}
	return false
}

// segment is a stretch of the figure's drawing that a legend must not cover: a line from a
// to b, pad points thick on either side (a marker is a segment of no length).
type segment struct {
	a, b vg.Point
	pad  vg.Length
}

// hits reports whether rectangle r, grown by margin, meets any of the segments.
func hits(r vg.Rectangle, segs []segment, margin vg.Length) bool {
	for _, s := range segs {
		g := s.pad + margin
		if clips(float64(r.Min.X-g), float64(r.Min.Y-g), float64(r.Max.X+g), float64(r.Max.Y+g),
			float64(s.a.X), float64(s.a.Y), float64(s.b.X), float64(s.b.Y)) {
			return true
		}
	}
	return false
}

// clips reports whether the segment (x0, y0)-(x1, y1) meets the rectangle [xa, xb] x [ya, yb]
// (Liang-Barsky clipping: the segment's parameter interval inside each slab must overlap).
func clips(xa, ya, xb, yb, x0, y0, x1, y1 float64) bool {
	t0, t1 := 0.0, 1.0
	dx, dy := x1-x0, y1-y0
	for _, e := range [4][2]float64{{-dx, x0 - xa}, {dx, xb - x0}, {-dy, y0 - ya}, {dy, yb - y0}} {
		p, q := e[0], e[1]
		if p == 0 {
			if q < 0 {
				return false
			}
			continue
		}
		t := q / p
		if p < 0 {
			t0 = math.Max(t0, t)
		} else {
			t1 = math.Min(t1, t)
		}
		if t0 > t1 {
			return false
		}
	}
	return true
}

// segments lists what the line figure draws in the data area dc, in its coordinates.
func (l Line) segments(p *gplot.Plot, dc draw.Canvas, vrules, hrules []*rule) []segment {
	trX, trY := p.Transforms(&dc)
	var out []segment
	for _, s := range l.Series {
		var prev *vg.Point
		for i := range s.X {
			if i >= len(s.Y) || !ok(s.X[i], l.XLog) || !ok(s.Y[i], l.YLog) {
				prev = nil
				continue
			}
			pt := vg.Point{X: trX(s.X[i]), Y: trY(s.Y[i])}
			switch {
			case s.NoLine || s.Marks || prev == nil:
				out = append(out, segment{a: pt, b: pt, pad: 3})
			}
			if prev != nil && !s.NoLine {
				out = append(out, segment{a: *prev, b: pt, pad: 1})
			}
			if s.Err != nil && i < len(s.Err) && s.Err[i] > 0 && !math.IsInf(s.Err[i], 0) {
				lo := s.Y[i] - s.Err[i]
				if l.YLog && lo <= 0 {
					lo = s.Y[i] * 1e-3
				}
				out = append(out, segment{a: vg.Point{X: pt.X, Y: trY(lo)}, b: vg.Point{X: pt.X, Y: trY(s.Y[i] + s.Err[i])}, pad: 2})
			}
			prev = &pt
		}
		for _, x := range s.Missing {
			if ok(x, l.XLog) {
				pt := vg.Point{X: trX(x), Y: dc.Min.Y + 3.5}
				out = append(out, segment{a: pt, b: pt, pad: 4})
			}
		}
	}
	for _, r := range vrules {
		x := trX(r.at)
		out = append(out, segment{a: vg.Point{X: x, Y: dc.Min.Y}, b: vg.Point{X: x, Y: dc.Max.Y}, pad: 1})
	}
	for _, r := range hrules {
		y := trY(r.at)
		out = append(out, segment{a: vg.Point{X: dc.Min.X, Y: y}, b: vg.Point{X: dc.Max.X, Y: y}, pad: 1})
	}
	return out
}
