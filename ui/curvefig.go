package ui

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/vugu/vugu"

	"hdrisk/engine/plot"
	"hdrisk/engine/scenario"
	"hdrisk/protocol"
)

// figureBox is a figure drawn on a compute worker (job kind "figure") and shown as an
// <img>, with the readout of the value under the pointer and the exports. Drawing runs on a
// worker because rendering a heat map takes longer in the page than the page may stand
// still. The curve and map views share it.
type figureBox struct {
	spec    protocol.FigureArgs // the figure shown (or on its way)
	svg     []byte              // the figure shown, for saving
	url     string              // its URL (see imageURL); "" when there is none
	br      Browser             // the holder of url
	frame   plot.Frame          // where its data area lies
	problem string              // why there is no figure
	readout string              // the values under the pointer, in words
	cancel  func()              // the drawing on its way, if any
	saving  int                 // exports on their way
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
	b.cancel = start(jobs, protocol.Figure, spec, nil, func(r protocol.FigureResult, err error) {
		b.cancel = nil
		if err != nil {
			b.problem = "the figure could not be drawn: " + err.Error()
			return
		}
		b.setImage(br, r.Data)
		b.frame, b.readout = r.Frame, ""
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

// point updates the readout from a pointer event on the overlay that covers the image
// exactly: offsetX/offsetY are the pointer position in it, clientWidth/clientHeight its
// displayed size. say turns data coordinates into words.
func (b *figureBox) point(e vugu.DOMEvent, say func(x, y float64) string) {
	b.pointAt(e.PropFloat64("offsetX"), e.PropFloat64("offsetY"),
		e.PropFloat64("target", "clientWidth"), e.PropFloat64("target", "clientHeight"), say)
}

// pointAt is point with the numbers taken out of the event.
func (b *figureBox) pointAt(px, py, w, h float64, say func(x, y float64) string) {
	if b.url == "" {
		b.readout = ""
		return
	}
	x, y, inside := b.frame.At(px, py, w, h)
	if !inside {
		b.readout = ""
		return
	}
	b.readout = say(x, y)
}

// leave clears the readout when the pointer leaves the figure.
func (b *figureBox) leave() { b.readout = "" }

// save offers the figure (svg, or png drawn from it by the browser) or its data (csv) as a
// download named base.what; problems are handed to report.
func (b *figureBox) save(br Browser, base, what string, csv func() ([]byte, error), report func(error)) {
	if br == nil {
		report(errNoBrowser)
		return
	}
	name := base + "." + what
	var err error
	switch what {
	case "csv":
		var data []byte
		if data, err = csv(); err == nil {
			err = br.Download(name, "text/csv", data)
		}
	case "svg", "png":
		if b.svg == nil {
			err = fmt.Errorf("there is no figure to save yet")
		} else if what == "svg" {
			err = br.Download(name, "image/svg+xml", b.svg)
		} else {
			b.saving++
			savePNG(br, name, b.svg, report, func() { b.saving-- })
		}
	default:
		err = fmt.Errorf("cannot save as %q", what)
	}
	if err != nil {
		report(err)
	}
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

// pathLabel returns the short name of a path of s for an axis: its name, "m/n" for alpha,
// with its unit when it has one.
func pathLabel(s scenario.Scenario, name string) string {
	for _, p := range s.Paths() {
		if p.Name == name || p.Path == name {
			n := p.Name
			if n == "alpha" {
				n = "m/n"
			}
			if p.Unit != "" {
				n += " (" + p.Unit + ")"
			}
			return n
		}
	}
	return name
}

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

// modelPaths returns the numbers of the model's scenario that studies can vary. Special
// cases are: while the inputs are invalid, the numbers of the same kinds seen last are
// kept; nil before any valid scenario of these kinds.
func modelPaths(m *Model) []scenario.PathInfo {
	if m == nil {
		return nil
	}
	key := m.Kind("design") + "|" + m.Kind("signal") + "|" + m.Kind("penalty") + "|" + m.Scale
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
