package ui

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/vugu/vugu"

	"hdrisk/engine/plot"
	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
	"hdrisk/protocol"
)

// figureBox is a figure shown as an <img>, with the readout of the value under the pointer,
// a crosshair on the point it reads, and the exports. A line figure is drawn in the page as
// soon as its numbers are there (a few milliseconds); a heat map is drawn on a compute
// worker (job kind "figure"), because rendering one takes longer than the page may stand
// still. The curve and map views share it.
type figureBox struct {
	line    *plot.Line          // the line figure shown, drawn in the page; nil for a heat map
	spec    protocol.FigureArgs // the heat figure shown (or on its way)
	svg     []byte              // the figure shown
	url     string              // its URL (see imageURL); "" when there is none
	br      Browser             // the holder of url
	frame   plot.Frame          // where its data area lies
	problem string              // why there is no figure
	readout string              // the values under the pointer, in words
	cross   [2]float64          // the crosshair, as fractions of the image from its top-left corner
	crossOn bool
	cancel  func() // the drawing on its way, if any
	saving  int    // exports on their way
}

// elementWidth is what a Browser offers when it can measure an element of the page.
type elementWidth interface{ ElementWidth(id string) float64 }

// fullWidth is the displayed width, in CSS pixels, at and above which a figure is drawn at
// its default size (480 points are 640 CSS pixels): its text is then 10.7 pixels or more.
const fullWidth = 640

// figureSize returns the size to draw a figure at for the panel with the given id: the
// default (0, 0) when the panel is wide enough or cannot be measured, else the panel's
// width, so that the figure is shown at its natural size and its text stays at least 10
// pixels tall on a narrow screen.
func figureSize(br Browser, panel string) (w, h float64) {
	ew, ok := br.(elementWidth)
	if !ok {
		return 0, 0
	}
	css := ew.ElementWidth(panel) - 4 // the image's border
	if !(css > 0) || css >= fullWidth {
		return 0, 0
	}
	w = math.Max(css, 180) * 0.75
	return w, math.Max(150, w*0.72)
}

// setImage shows svg, releasing the image shown before.
func (b *figureBox) setImage(br Browser, svg []byte) {
	b.release()
	u, err := imageURL(br, "image/svg+xml", svg)
	if err != nil {
		b.problem = "the figure cannot be shown: " + err.Error()
		return
	}
	b.svg, b.url, b.br = svg, u, br
}

// release lets go of the image shown, if any.
func (b *figureBox) release() {
	dropImage(b.br, b.url)
	b.svg, b.url, b.br = nil, "", nil
}

// drawLine draws l in the page at the size the panel needs (see figureSize) and shows it.
func (b *figureBox) drawLine(br Browser, panel string, l plot.Line) {
	if b.cancel != nil {
		b.cancel()
		b.cancel = nil
	}
	b.problem = ""
	l.Width, l.Height = figureSize(br, panel)
	f, err := l.Build()
	if err != nil {
		b.problem = "the figure could not be drawn: " + err.Error()
		return
	}
	svg, err := f.SVG()
	if err != nil {
		b.problem = "the figure could not be drawn: " + err.Error()
		return
	}
	b.setImage(br, svg)
	b.line, b.frame, b.readout, b.crossOn = &l, f.Frame(), "", false
}

// draw renders spec on a worker; shown (may be nil) is called once the image is in place.
// The figure shown so far stays until the new one arrives.
func (b *figureBox) draw(jobs Jobs, br Browser, spec protocol.FigureArgs, shown func()) {
	if b.cancel != nil {
		b.cancel()
		b.cancel = nil
	}
	b.spec, b.problem = spec, ""
	if jobs == nil {
		b.problem = "the figure waits for the compute workers"
		return
	}
	b.cancel = start(jobs, protocol.Figure, spec.Packed(), nil, func(r protocol.FigureResult, err error) {
		b.cancel = nil
		if err != nil {
			b.problem = "the figure could not be drawn: " + err.Error()
			return
		}
		b.setImage(br, r.Data)
		b.line, b.frame, b.readout, b.crossOn = nil, r.Frame, "", false
		if shown != nil {
			shown()
		}
	})
}

// Drawing reports whether a figure is on its way.
func (b *figureBox) drawing() bool { return b.cancel != nil }

// clear removes the figure and stops one on its way.
func (b *figureBox) clear() {
	if b.cancel != nil {
		b.cancel()
	}
	b.release()
	*b = figureBox{}
}

// pick names what the pointer reads: given the data coordinates under the pointer and a
// function placing data points on the displayed image (pixels), it returns the readout and
// the data point the crosshair marks (NaN for the pointer itself).
type pick func(x, y float64, where func(x, y float64) (px, py float64)) (text string, cx, cy float64)

// styler is what a Browser offers when it can set a property of an element's style through
// the CSS object model, which the page's content policy allows where it refuses a style
// attribute.
type styler interface {
	SetStyle(id, property, value string)
}

// point updates the readout from a pointer event (mouse, pen or touch) on the overlay that
// covers the image exactly: offsetX/offsetY are the pointer position in it,
// clientWidth/clientHeight its displayed size.
func (b *figureBox) point(e vugu.DOMEvent, say pick) {
	b.pointAt(e.PropFloat64("offsetX"), e.PropFloat64("offsetY"),
		e.PropFloat64("target", "clientWidth"), e.PropFloat64("target", "clientHeight"), say)
}

// placeCross moves the crosshair's lines (ids view-cross-v and view-cross-h) onto the point
// read. It runs after each render: the renderer sets an element's attributes anew, the
// style the object model gave it among them.
func (b *figureBox) placeCross(br Browser, view string) {
	if st, ok := br.(styler); ok && b.crossOn {
		pct := func(f float64) string { return strconv.FormatFloat(100*f, 'f', 2, 64) + "%" }
		st.SetStyle(view+"-cross-v", "left", pct(b.cross[0]))
		st.SetStyle(view+"-cross-h", "top", pct(b.cross[1]))
	}
}

// Rendered implements vugu's rendered handler: it places the crosshair.
func (c *CurveView) Rendered(vugu.RenderedCtx) { c.box.placeCross(c.Browser, "curve") }

// Rendered implements vugu's rendered handler: it places the crosshair.
func (c *Mapview) Rendered(vugu.RenderedCtx) { c.box.placeCross(c.Browser, "map") }

// pointAt is point with the numbers taken out of the event.
func (b *figureBox) pointAt(px, py, w, h float64, say pick) {
	if b.url == "" {
		b.readout, b.crossOn = "", false
		return
	}
	x, y, inside := b.frame.At(px, py, w, h)
	if !inside {
		b.readout, b.crossOn = "", false
		return
	}
	text, cx, cy := say(x, y, func(x, y float64) (float64, float64) { return b.frame.Where(x, y, w, h) })
	b.readout = text
	if math.IsNaN(cx) || math.IsNaN(cy) {
		cx, cy = x, y
	}
	fx, fy := b.frame.Where(cx, cy, 1, 1)
	b.cross, b.crossOn = [2]float64{fx, fy}, !math.IsNaN(fx) && !math.IsNaN(fy)
}

// leave clears the readout when the pointer leaves the figure.
func (b *figureBox) leave() { b.readout, b.crossOn = "", false }

// crossClass is the class that shows the crosshair's lines, or "".
func (b *figureBox) crossClass() string {
	if b.crossOn {
		return " on"
	}
	return ""
}

// save offers the figure (svg, pdf, or png at 2x) or its data (csv) as a download named
// base.what; problems are handed to report. Figures are saved at their default size (480
// by 300 points, the command line's), whatever size the screen shows them at.
func (b *figureBox) save(jobs Jobs, br Browser, base, what string, csv func() ([]byte, error), report func(error)) {
	if br == nil {
		report(errNoBrowser)
		return
	}
	name := base + "." + what
	if what == "csv" {
		data, err := csv()
		if err == nil {
			err = br.Download(name, "text/csv", data)
		}
		if err != nil {
			report(err)
		}
		return
	}
	if what != "svg" && what != "png" && what != "pdf" {
		report(fmt.Errorf("cannot save as %q", what))
		return
	}
	if b.svg == nil {
		report(fmt.Errorf("there is no figure to save yet"))
		return
	}
	offer := func(svg, pdf []byte) {
		var err error
		switch what {
		case "svg":
			err = br.Download(name, "image/svg+xml", svg)
		case "pdf":
			err = br.Download(name, "application/pdf", pdf)
		case "png":
			b.saving++
			savePNG(br, name, svg, report, func() { b.saving-- })
		}
		if err != nil {
			report(err)
		}
	}
	if b.line != nil {
		l := *b.line
		l.Width, l.Height = 0, 0
		f, err := l.Build()
		if err != nil {
			report(err)
			return
		}
		svg, err := f.SVG()
		var pdf []byte
		if err == nil && what == "pdf" {
			pdf, err = f.PDF()
		}
		if err != nil {
			report(err)
			return
		}
		offer(svg, pdf)
		return
	}
	if jobs == nil {
		report(fmt.Errorf("saving the map waits for the compute workers"))
		return
	}
	spec := b.spec
	if spec.Heat != nil {
		h := *spec.Heat
		h.Width, h.Height = 0, 0
		spec.Heat = &h
	}
	spec.PDF = what == "pdf"
	b.saving++
	start(jobs, protocol.Figure, spec.Packed(), nil, func(r protocol.FigureResult, err error) {
		b.saving--
		if err != nil {
			report(err)
			return
		}
		offer(r.Data, r.PDF)
	})
}

// num formats a number for the page, to 4 significant digits.
func num4(v float64) string {
	if math.IsNaN(v) {
		return "—"
	}
	return strconv.FormatFloat(v, 'g', 4, 64)
}

// full formats a number in full precision, for data-value hooks and files.
func full(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// axisText holds the texts of the inputs of one axis of a study.
type axisText struct {
	Over, From, To, Points string
	Log                    bool
}

// parse reads the axis, naming the input of a bad number (prefix: "sweep", "map x", ...).
// The ranges are the engine's to check.
func (a axisText) parse(prefix string, maxPoints int) (over string, from, to float64, points int, err error) {
	if a.Over == "" {
		return "", 0, 0, 0, fmt.Errorf("%s: choose the number to vary", prefix)
	}
	f := func(name, t string) (float64, error) {
		v, err := strconv.ParseFloat(strings.TrimSpace(t), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, fmt.Errorf("%s %s: %q is not a number", prefix, name, strings.TrimSpace(t))
		}
		return v, nil
	}
	if from, err = f("from", a.From); err != nil {
		return
	}
	if to, err = f("to", a.To); err != nil {
		return
	}
	points, err = strconv.Atoi(strings.TrimSpace(a.Points))
	if err != nil || points < 2 || points > maxPoints {
		return "", 0, 0, 0, fmt.Errorf("%s points: a whole number from 2 to %d, not %q", prefix, maxPoints, strings.TrimSpace(a.Points))
	}
	if from == to {
		return "", 0, 0, 0, fmt.Errorf("%s: from and to must differ", prefix)
	}
	if a.Log && !(from > 0 && to > 0) {
		return "", 0, 0, 0, fmt.Errorf("%s: a logarithmic axis needs from > 0 and to > 0", prefix)
	}
	if from > to {
		from, to = to, from
	}
	return a.Over, from, to, points, nil
}

// defaultAxis proposes a range for a path: its Log flag, and a span within its domain
// around the current value v.
func defaultAxis(p scenario.PathInfo, v float64, points int) axisText {
	lo, hi := v/10, v*10
	if p.Log {
		if !(v > 0) {
			lo, hi = 1e-3, 10
		}
	} else {
		lo, hi = v/2, v*2
		if v == 0 {
			lo, hi = 0, 1
		}
	}
	if p.Name == "alpha" {
		lo, hi = 0.1, 2
	}
	if !math.IsInf(p.Max, 0) && hi > p.Max {
		hi = p.Max
	}
	if lo < p.Min || (p.MinOpen && lo == p.Min) {
		lo = p.Min
		if p.MinOpen || p.Log {
			lo = math.Max(p.Min, hi*1e-3)
			if lo == p.Min {
				lo = p.Min + (hi-p.Min)/100
			}
		}
	}
	// m/n reads best on even steps, where the threshold at 1 sits mid-range.
	log := p.Log && lo > 0 && p.Name != "alpha"
	return axisText{Over: p.Name, From: full(round3(lo)), To: full(round3(hi)), Points: strconv.Itoa(points), Log: log}
}

// round3 rounds to 3 significant digits, so that proposed ranges read well.
func round3(v float64) float64 {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return v
	}
	s, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 3, 64), 64)
	return s
}

// pathLabel returns the short name of a path of s for an axis (see plot.FieldLabel).
func pathLabel(s scenario.Scenario, name string) string { return plot.FieldLabel(s, name) }

// pathOption is the text of a path in a menu: its name, then what it is.
func pathOption(p scenario.PathInfo) string {
	if p.Label == "" || p.Label == p.Name {
		return p.Name
	}
	return p.Name + ": " + p.Label
}

// bareJSON encodes s without its study: the jobs need the problem only, and a study that
// names a field of another penalty must not make a job fail.
func bareJSON(s scenario.Scenario) ([]byte, error) {
	s.Study = nil
	return s.Encode()
}

// withShape returns s with another design shape, its parameters at the editor's defaults and
// the same alpha and scale. Special cases are: shapes with a list parameter (listed singular
// values) have no default to offer and give ok = false.
func withShape(s scenario.Scenario, shape string) (scenario.Scenario, bool) {
	g, _ := FindGroup("design")
	k, found := g.kind(shape)
	if !found {
		return s, false
	}
	params := map[string]float64{}
	for _, p := range k.Params {
		if p.List {
			return s, false
		}
		v, err := strconv.ParseFloat(strings.TrimSpace(p.Default), 64)
		if err != nil {
			return s, false
		}
		params[p.Name] = v
	}
	s.Design = scenario.Design{Shape: shape, Alpha: s.Design.Alpha, Scale: s.Design.Scale, Params: params}
	if s.Validate() != nil {
		return s, false
	}
	return s, true
}

// studyOf returns a copy of the model's study to change (View set to view), for writing back.
func studyOf(m *Model, view string) *scenario.Study {
	st := scenario.Study{}
	if m.Study != nil {
		st = *m.Study
	}
	st.View = view
	return &st
}

// pathCache keeps the numbers a study can vary for the last combination of kinds: they
// depend on the kinds only, and checking the whole scenario at every render of three views
// costs the page more than it may spend on a render.
var pathCache struct {
	key   string
	paths []scenario.PathInfo
}

// modelQuantities returns the numbers a study of the model's scenario can show: those of a
// generalized linear model (cosine, test error, ...) for such a scenario only.
func modelQuantities(m *Model) []study.Observable {
	if m != nil {
		if ch := m.Check(); ch.Err == nil {
			if _, glm := ch.Engine.GLM(); glm {
				return plot.Quantities()
			}
		}
	}
	return study.Observables()
}

// modelPaths returns the numbers of the model's scenario that studies can vary. Special
// cases are: while the inputs are invalid, the numbers of the same kinds seen last are
// kept; nil before any valid scenario of these kinds.
func modelPaths(m *Model) []scenario.PathInfo {
	if m == nil {
		return nil
	}
	key := m.Scale
	for _, g := range Groups() {
		key += "|" + m.Kind(g.Name)
	}
	if key == pathCache.key && pathCache.paths != nil {
		return pathCache.paths
	}
	ch := m.Check()
	if ch.Err != nil {
		return nil
	}
	pathCache.key, pathCache.paths = key, ch.Scenario.Paths()
	return pathCache.paths
}

// The views' crosshair hooks.

func (c *CurveView) crossOn() bool      { return c.box.crossOn }
func (c *CurveView) crossClass() string { return c.box.crossClass() }
func (c *Mapview) crossClass() string   { return c.box.crossClass() }

// LogAllowed reports whether the quantity shown can go on a logarithmic axis.
func (c *CurveView) LogAllowed() bool { return plot.LogAllowed(c.quantity().Name) }

func (c *CurveView) logTitle() string {
	if c.LogAllowed() {
		return "Draw the vertical axis on a logarithmic scale"
	}
	return c.quantity().Label + " can be zero or negative: a logarithmic axis needs a positive quantity"
}

// TunedChoices are the weights the penalty of the scenario can re-tune along the sweep,
// as value and text, "" (none) first.
func (c *CurveView) TunedChoices() [][2]string {
	out := [][2]string{{"", "none"}}
	if c.Model == nil {
		return out
	}
	ch := c.Model.Check()
	if ch.Err != nil {
		return out
	}
	p := ch.Scenario.Penalty.Params
	_, l1 := p["l1"]
	_, l2 := p["l2"]
	if l1 {
		out = append(out, [2]string{"l1", "l1 re-tuned at every point"})
	}
	if l2 {
		out = append(out, [2]string{"l2", "l2 re-tuned at every point"})
	}
	if l1 && l2 {
		out = append(out, [2]string{study.Ratio, "l1 and l2 together (fixed ratio)"})
	}
	return out
}
