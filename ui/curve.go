package ui

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"math"
	"slices"
	"strconv"
	"time"

	"github.com/vugu/vugu"

	"hdrisk/engine/plot"
	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
	"hdrisk/protocol"
)

// sweepPoints is the number of points a new sweep proposes.
const sweepPoints = 200

// maxCurveSeries bounds the curves drawn at once (the palette has eight colours).
const maxCurveSeries = 8

// curveSeries is one swept curve: the scenario it belongs to and its points.
type curveSeries struct {
	Label  string
	Scen   scenario.Scenario
	Axis   study.Axis
	keptID int    // the page state's KeptCurve this is, for a kept curve
	key    string // the problem it was computed for (Model.problemKey)
	Points []study.Point
	cancel func()
	err    string
	done   bool

	// A curve per value: the number that sets each (family), its values and the curves
	// computed at them (protocol.Curves jobs, each a block of one curve's points); Points
	// then holds all their points.
	family string
	at     []float64
	curves []study.Curve
}

// curveInit sets the view's own display settings the first time it is used.
func (c *CurveView) curveInit() {
	if c.inited || c.Model == nil {
		return
	}
	c.inited, c.Quantity, c.run = true, "nmse_db", RunIdle
}

// Init implements vugu's initializer.
func (c *CurveView) Init(vugu.InitCtx) { c.curveInit() }

// Run is the data-run hook: idle, running, done, cancelled or error.
func (c *CurveView) Run() string {
	if c.run == "" {
		return RunIdle
	}
	return c.run
}

// Running reports whether any job of the view is on its way.
func (c *CurveView) Running() bool { return c.run == RunRunning }

// Axis returns the texts of the sweep's inputs, from the page state.
func (c *CurveView) Axis() axisText {
	if c.Model == nil {
		return axisText{}
	}
	c.Model.Check() // proposes an axis, or replaces one that stopped fitting
	return c.Model.Views().Curve
}

// Paths are the numbers of the current scenario that can be swept.
func (c *CurveView) Paths() []scenario.PathInfo { return modelPaths(c.Model) }

// Quantities are the numbers a curve can show on its y axis.
// Those of a generalized linear model (cosine, test error, ...) are offered for such a
// scenario only.
func (c *CurveView) Quantities() []study.Observable { return modelQuantities(c.Model) }

// Set stores one setting: "over", "from", "to", "points", "log", "curves" (the number
// that sets each curve, "" for one curve), "curves_at" (its values), "ylog", "quantity" or
// "tuned" (the weight of the best-tuned curve: "l1", "l2", "l1+l2", or "" for none).
// Choosing "over" proposes a range for it; a logarithmic vertical axis is kept only for a
// quantity that is never negative. Special cases are: an unknown name is an error.
func (c *CurveView) Set(name, text string) error {
	c.curveInit()
	switch name {
	case "over", "from", "to", "points", "log", "curves", "curves_at":
		if c.Model == nil {
			return fmt.Errorf("no scenario")
		}
		return c.Model.SetCurve(name, text)
	case "ylog":
		c.YLog = text == "true" && plot.LogAllowed(c.Quantity)
		c.redraw()
	case "quantity":
		c.Quantity = text
		c.YLog = c.YLog && plot.LogAllowed(text)
		c.redraw()
	case "tuned":
		c.Tuned = text
	default:
		return fmt.Errorf("no setting %q", name)
	}
	return nil
}

func (c *CurveView) typed(e vugu.DOMEvent, name string) {
	_ = c.Set(name, e.PropString("target", "value"))
}

func (c *CurveView) ticked(e vugu.DOMEvent, name string) {
	_ = c.Set(name, strconv.FormatBool(e.PropBool("target", "checked")))
}

func (c *CurveView) now() time.Time {
	if c.Clock != nil {
		return c.Clock()
	}
	return time.Now()
}

// spec reads the settings and the scenario in the editor.
func (c *CurveView) spec() (scenario.Scenario, study.Axis, error) {
	if c.Model == nil {
		return scenario.Scenario{}, study.Axis{}, fmt.Errorf("no scenario")
	}
	ch := c.Model.Check()
	if ch.Err != nil {
		return scenario.Scenario{}, study.Axis{}, fmt.Errorf("the scenario in the editor has a problem: %v", ch.Err)
	}
	ax := c.Model.Views().Curve
	over, from, to, n, err := ax.parse("sweep", scenario.MaxSweepPoints)
	if err != nil {
		return scenario.Scenario{}, study.Axis{}, err
	}
	return ch.Scenario, study.Axis{Over: over, From: from, To: to, Points: n, Log: ax.Log}, nil
}

// CurvesOver is the number that sets each curve ("" for one curve), from the page state.
func (c *CurveView) CurvesOver() string {
	if c.Model == nil {
		return ""
	}
	c.Model.Check()
	return c.Model.Views().Curves
}

// CurvesAt is the text of the curves' values, from the page state.
func (c *CurveView) CurvesAt() string {
	if c.Model == nil {
		return ""
	}
	return c.Model.Views().CurvesAt
}

// curvesChoices is the "One curve per" menu: none, then every number but the varied one.
func (c *CurveView) curvesChoices() []pathChoice {
	out := []pathChoice{{Name: "", Text: "none (one curve)", Title: "Draw one curve"}}
	over := c.Axis().Over
	for _, p := range c.varyChoices() {
		if p.Name != over {
			out = append(out, p)
		}
	}
	return out
}

// curvesSpec reads the curves' settings: the number and its values ("" and nil for one
// curve). The engine checks the values against the number's range.
func (c *CurveView) curvesSpec() (string, []float64, error) {
	field := c.CurvesOver()
	if field == "" {
		return "", nil, nil
	}
	at, err := parseValues(c.CurvesAt())
	if err != nil {
		return "", nil, err
	}
	if len(at) == 0 {
		return "", nil, fmt.Errorf("one curve per %s: give its values, separated by commas", field)
	}
	return field, at, nil
}

// Start sweeps the scenario in the editor (replacing the curve of the current scenario and
// keeping the kept ones), with the best regularization when the sweep is over l1 or l2 and
// the Bayes-optimal error when the signal law has one and the sweep leaves it unchanged.
// The settings go into the scenario's study (view, sweep, best).
func (c *CurveView) Start() {
	c.curveInit()
	c.problem, c.note = "", ""
	s, ax, err := c.spec()
	if err != nil {
		c.problem = err.Error()
		return
	}
	field, at, err := c.curvesSpec()
	if err != nil {
		c.problem = err.Error()
		return
	}
	if c.Jobs == nil {
		c.problem = "the compute workers are still starting; try again in a moment"
		return
	}
	if field != "" && len(at)+len(c.Model.Views().Kept) > maxCurveSeries {
		c.problem = fmt.Sprintf("at most %d curves at once: give fewer values or clear the kept curves", maxCurveSeries)
		return
	}
	if k := c.Model.Views().Kept; len(k) > 0 && k[0].Axis.Over != ax.Over {
		c.problem = fmt.Sprintf("the kept curves vary %s, not %s: clear them first, so that no curve is drawn on another's axis",
			pathLabel(s, k[0].Axis.Over), pathLabel(s, ax.Over))
		return
	}
	if field != "" {
		c.startFamily(s, ax, field, at)
		return
	}
	isWeight := plot.WantsBest(s, ax.Over)
	if isWeight {
		_ = c.Model.SetPlan("over", ax.Over) // the one "best over" setting of the study
	}
	c.Model.ranStudy("curve", partSweep)

	c.stopAll()
	c.axis = ax
	c.best, c.bestErr, c.bayes, c.bayesNote = nil, "", nil, ""
	c.current = &curveSeries{Label: c.label(s, "this scenario"), Scen: s, Axis: ax, key: c.Model.problemKey()}
	c.tuned, c.tunedOver = nil, ""
	c.seconds, c.figSeconds, c.started = 0, 0, c.now()
	c.startSweep(c.current, true)
	if isWeight {
		c.startBest(s, ax.Over)
	}
	if plot.WantsBayes(s, ax.Over) {
		c.startBayes(s)
	} else {
		c.bayesNote = "The Bayes-optimal error is drawn when the sweep varies a penalty setting only; " + pathLabel(s, ax.Over) + " changes the problem itself."
	}
	// The best-tuned curve, a search at every point, queues behind the quick references.
	if c.Tuned != "" {
		c.tuned, c.tunedOver = &curveSeries{Label: plot.TunedCurve(c.Tuned, nil).Label, Scen: s}, c.Tuned
		c.startTuned(c.tuned, c.Tuned)
	}
	c.run = RunRunning
	c.redraw()
}

// familyMaxJobs caps the jobs of one curves-per-value family: each finished job costs the
// page the decoding of its points and a render.
const familyMaxJobs = 32

// minFamilyBlock is the fewest points of one curve a job of a family is given.
const minFamilyBlock = 5

// familyBlocks splits the points of each of curves curves into blocks: 2 per worker, so that
// even a curve that holds nearly all the work (a 4-bit curve's points cost some 40 times a
// 1-bit one's, measured natively) spreads over every worker and the last block to finish
// is short; at most familyMaxJobs jobs in all and minFamilyBlock points a block; one block
// (the whole curve) with one worker.
func (c *CurveView) familyBlocks(curves, points int) [][2]int {
	n := 1
	if wc, ok := c.Jobs.(workerCount); ok && wc.Workers() > 1 {
		n = min(2*wc.Workers(), familyMaxJobs/max(curves, 1), points/minFamilyBlock)
	}
	n = max(n, 1)
	out := make([][2]int, n)
	for k := range out {
		out[k] = [2]int{k * points / n, (k + 1) * points / n}
	}
	return out
}

// startFamily draws one curve per value of field: one protocol.Curves job per block of
// points of each value (familyBlocks), so that the curves are shared between the workers
// and one slow curve does not keep one busy while the others idle. The references of one
// curve (best weight, Bayes-optimal error, best-tuned curve) belong to one scenario and are
// not drawn.
func (c *CurveView) startFamily(s scenario.Scenario, ax study.Axis, field string, at []float64) {
	c.Model.ranStudy("curve", partSweep)
	c.stopAll()
	c.axis = ax
	c.best, c.bestErr, c.bayes, c.bayesNote = nil, "", nil, ""
	c.tuned, c.tunedOver = nil, ""
	c.note = "One curve per value of " + pathLabel(s, field) + ": the best weight, the Bayes-optimal error and the best-tuned curve are drawn for one curve only."
	cs := &curveSeries{Label: c.label(s, "this scenario"), Scen: s, Axis: ax, key: c.Model.problemKey(),
		family: field, at: at, curves: make([]study.Curve, len(at))}
	c.current = cs
	c.seconds, c.figSeconds, c.started = 0, 0, c.now()
	t0 := c.started
	data, err := bareJSON(s)
	if err != nil {
		cs.err, cs.done = err.Error(), true
		c.settle()
		return
	}
	blocks := c.familyBlocks(len(at), ax.Points)
	cancels := make([]func(), len(at)*len(blocks))
	pending := len(cancels)
	cs.cancel = cancelAll(cancels)
	for i, v := range at {
		cs.curves[i] = study.Curve{Value: v, Points: make([]study.Point, ax.Points)}
	}
	// Block by block across the curves: the pool runs the jobs in the order they are posted.
	for kb, b := range blocks {
		for i, v := range at {
			args := protocol.CurvesArgs{Scenario: data, Axis: ax, Curves: field, At: []float64{v}}
			if len(blocks) > 1 {
				args.PointFrom, args.PointTo = b[0], b[1]
			}
			slot := kb*len(at) + i
			cancels[slot] = start(c.Jobs, protocol.Curves, args, nil, func(r study.Curves, err error) {
				cancels[slot] = nil
				pending--
				if err == nil && (len(r.Curves) != 1 || len(r.Curves[0].Points) != b[1]-b[0]) {
					err = fmt.Errorf("the curve at %s = %s came back incomplete (points %d to %d)", field, full(v), b[0], b[1])
				}
				if err != nil {
					cs.cancel()
					cs.cancel, cs.done, cs.err = nil, true, err.Error()
					c.settle()
					return
				}
				copy(cs.curves[i].Points[b[0]:], r.Curves[0].Points)
				if pending > 0 {
					return
				}
				var all []study.Point
				for _, cv := range cs.curves {
					all = append(all, cv.Points...)
				}
				cs.cancel, cs.done, cs.Points = nil, true, all
				c.seconds = c.now().Sub(t0).Seconds()
				c.settle()
			})
		}
	}
	c.run = RunRunning
	c.redraw()
}

// figuresWarm is set once the page has drawn its first figure.
var figuresWarm bool

// warmFigures draws a throw-away figure when the curve view first shows: the first figure
// drawn in the page pays for loading the font and for the first run of the layout code (a
// quarter of a second in WebAssembly), which would otherwise fall between a sweep's numbers
// and their figure, or hold up the numbers themselves.
func warmFigures() {
	if !figuresWarm {
		figuresWarm = true
		plot.Warm()
	}
}

// label names a curve by what sets it apart.
func (c *CurveView) label(s scenario.Scenario, fallback string) string {
	g, _ := FindGroup("design")
	k, ok := g.kind(s.Design.Shape)
	if !ok {
		return fallback
	}
	pen := kindLabel("penalty", s.Penalty.Kind)
	var bits []string
	for _, name := range slices.Sorted(mapKeys(s.Penalty.Params)) {
		if name != c.axis.Over {
			bits = append(bits, name+" "+num4(s.Penalty.Params[name]))
		}
	}
	l := k.Label + ", " + pen
	if len(bits) > 0 {
		l += " (" + joinComma(bits) + ")"
	}
	return l
}

func mapKeys(m map[string]float64) func(func(string) bool) {
	return func(yield func(string) bool) {
		for k := range m {
			if !yield(k) {
				return
			}
		}
	}
}

func joinComma(s []string) string {
	out := ""
	for i, t := range s {
		if i > 0 {
			out += ", "
		}
		out += t
	}
	return out
}

// minSweepBlock is the fewest points a worker is given when a sweep is shared out: below
// that, posting and decoding cost more than the worker saves.
const minSweepBlock = 25

// sweepBlocks splits the points of the axis into about one block per worker.
func (c *CurveView) sweepBlocks(points int) [][2]int {
	n := 1
	if wc, ok := c.Jobs.(workerCount); ok && wc.Workers() > 1 {
		n = wc.Workers()
	}
	n = max(1, min(n, points/minSweepBlock))
	out := make([][2]int, n)
	for k := range out {
		out[k] = [2]int{k * points / n, (k + 1) * points / n}
	}
	return out
}

// startSweep runs the sweep of one series as jobs, one block of points per worker; timed
// is set for the main curve, whose time in the page is reported. Each block starts cold
// at its first point (the numbers agree with one whole sweep to the fixed point's
// tolerance), so that a 200-point sweep takes a fraction of the time of one worker.
func (c *CurveView) startSweep(cs *curveSeries, timed bool) {
	data, err := bareJSON(cs.Scen)
	if err != nil {
		cs.err, cs.done = err.Error(), true
		return
	}
	t0 := c.now()
	blocks := c.sweepBlocks(cs.Axis.Points)
	cancels := make([]func(), len(blocks))
	pending := len(blocks)
	pts := make([]study.Point, cs.Axis.Points)
	cs.cancel = cancelAll(cancels)
	for i, b := range blocks {
		// No progress callback: a sweep takes a fraction of a second, and every progress
		// message would cost the page a render while it runs.
		args := protocol.SweepArgs{Scenario: data, Axis: cs.Axis}
		if len(blocks) > 1 {
			args.PointFrom, args.PointTo = b[0], b[1]
		}
		cancels[i] = start(c.Jobs, protocol.Sweep, args, nil, func(r protocol.SweepResult, err error) {
			cancels[i] = nil
			pending--
			if err == nil && len(r.Points) != b[1]-b[0] {
				err = fmt.Errorf("points %d to %d came back incomplete", b[0], b[1])
			}
			if err != nil {
				cs.cancel()
				cs.cancel, cs.done, cs.err = nil, true, err.Error()
				c.settle()
				return
			}
			copy(pts[b[0]:], r.Points)
			if pending > 0 {
				return
			}
			cs.cancel, cs.done, cs.Points = nil, true, pts
			if timed {
				c.seconds = c.now().Sub(t0).Seconds()
			}
			c.settle()
		})
	}
}

// startTuned runs the best-tuned curve of cs's scenario as jobs, one block of points per
// worker as startSweep does: each point is a search over the weight, so the blocks matter.
func (c *CurveView) startTuned(cs *curveSeries, best string) {
	data, err := bareJSON(cs.Scen)
	if err != nil {
		cs.err, cs.done = err.Error(), true
		return
	}
	blocks := c.sweepBlocks(c.axis.Points)
	cancels := make([]func(), len(blocks))
	pending := len(blocks)
	pts := make([]study.Point, c.axis.Points)
	cs.cancel = cancelAll(cancels)
	for i, b := range blocks {
		args := protocol.TunedArgs{SweepArgs: protocol.SweepArgs{Scenario: data, Axis: c.axis}, Best: best}
		if len(blocks) > 1 {
			args.PointFrom, args.PointTo = b[0], b[1]
		}
		cancels[i] = start(c.Jobs, protocol.Tuned, args, nil, func(r protocol.TunedResult, err error) {
			cancels[i] = nil
			pending--
			if err == nil && len(r.Points) != b[1]-b[0] {
				err = fmt.Errorf("points %d to %d came back incomplete", b[0], b[1])
			}
			if err != nil {
				cs.cancel()
				cs.cancel, cs.done, cs.err = nil, true, "no best-tuned curve: "+err.Error()
				c.settle()
				return
			}
			copy(pts[b[0]:], r.Points)
			if pending > 0 {
				return
			}
			cs.cancel, cs.done, cs.Points = nil, true, pts
			c.settle()
		})
	}
}

func (c *CurveView) startBest(s scenario.Scenario, over string) {
	data, err := bareJSON(s)
	if err != nil {
		c.bestErr = err.Error()
		return
	}
	c.bestCancel = start(c.Jobs, protocol.Best, protocol.BestArgs{Scenario: data, Over: over}, nil, func(b study.BestResult, err error) {
		c.bestCancel = nil
		if err != nil {
			c.bestErr = "no best " + over + ": " + err.Error()
		} else {
			c.best = &b
		}
		c.settle()
	})
}

func (c *CurveView) startBayes(s scenario.Scenario) {
	data, err := bareJSON(s)
	if err != nil {
		return
	}
	c.bayesCancel = start(c.Jobs, protocol.Bayes, protocol.BayesArgs{Scenario: data}, nil, func(b study.BayesResult, err error) {
		c.bayesCancel = nil
		if err != nil {
			c.bayesNote = "No Bayes-optimal reference: " + err.Error()
		} else {
			c.bayes = &b
		}
		c.settle()
	})
}

// Keep turns the current curve into a kept one, drawn beside the next sweeps.
func (c *CurveView) Keep() {
	if c.current == nil || !c.current.done || c.current.err != "" {
		return
	}
	if len(c.kept)+1 >= maxCurveSeries {
		c.problem = fmt.Sprintf("at most %d curves at once: clear some first", maxCurveSeries)
		return
	}
	cur := c.current
	c.Model.SetKept(append(slices.Clone(c.Model.Views().Kept), KeptCurve{Label: cur.Label, Scenario: cur.Scen, Axis: cur.Axis}))
	k := c.Model.Views().Kept
	cur.keptID = k[len(k)-1].ID
	c.kept = append(c.kept, cur)
	c.current = nil
	c.redraw()
}

// syncKept makes the view's kept curves those of the page state: a curve the state holds
// and the view has not computed (an autosave restored) is swept again from its settings;
// one the state no longer holds (a link opened) is dropped.
func (c *CurveView) syncKept() {
	if c.Model == nil || c.Jobs == nil {
		return
	}
	want := c.Model.Views().Kept
	same := len(want) == len(c.kept)
	for i := 0; same && i < len(want); i++ {
		same = c.kept[i].keptID == want[i].ID
	}
	if same {
		return
	}
	have := map[int]*curveSeries{}
	for _, cs := range c.kept {
		have[cs.keptID] = cs
	}
	next := make([]*curveSeries, 0, len(want))
	started := false
	for _, k := range want {
		if cs, ok := have[k.ID]; ok {
			next = append(next, cs)
			delete(have, k.ID)
			continue
		}
		cs := &curveSeries{Label: k.Label, Scen: k.Scenario, Axis: k.Axis, keptID: k.ID}
		next = append(next, cs)
		c.startSweep(cs, false)
		started = true
	}
	for _, cs := range have {
		if cs.cancel != nil {
			cs.cancel()
		}
	}
	c.kept = next
	if c.axis.Over == "" && len(want) > 0 {
		c.axis = want[0].Axis
	}
	if started {
		c.run = RunRunning
	}
	c.settle()
}

// Stale tells whether the current curve was computed for another scenario or axis than
// the page's: it is then marked, with a button to compute it again.
func (c *CurveView) Stale() bool {
	if c.Model == nil || c.current == nil || !c.current.done {
		return false
	}
	_, ax, err := c.spec()
	field, at, ferr := c.curvesSpec()
	return err != nil || ferr != nil || ax != c.current.Axis || c.current.key != c.Model.problemKey() ||
		field != c.current.family || !slices.Equal(at, c.current.at)
}

// Compute implements vugu's computer: the kept curves follow the page state.
func (c *CurveView) Compute(vugu.ComputeCtx) { c.syncKept() }

// Compare sweeps the same axis for every other design shape with the same m/n and scale
// (shapes at the editor's default settings; listed singular values are left out).
func (c *CurveView) Compare() {
	c.curveInit()
	c.problem = ""
	s, ax, err := c.spec()
	if err != nil {
		c.problem = err.Error()
		return
	}
	if c.Jobs == nil {
		c.problem = "the compute workers are still starting; try again in a moment"
		return
	}
	if field, _, _ := c.curvesSpec(); field != "" {
		c.problem = "Comparing design shapes draws one curve per shape: set \"One curve per\" to none first."
		return
	}
	if c.current == nil || c.axis != ax || c.current.family != "" {
		c.Start()
		if c.problem != "" {
			return
		}
	}
	g, _ := FindGroup("design")
	for _, k := range g.Kinds {
		if k.Name == s.Design.Shape || len(c.kept)+2 > maxCurveSeries {
			continue
		}
		o, ok := withShape(s, k.Name)
		if !ok {
			continue
		}
		kept := append(slices.Clone(c.Model.Views().Kept), KeptCurve{Label: c.label(o, k.Label), Scenario: o, Axis: ax})
		c.Model.SetKept(kept)
		cs := &curveSeries{Label: kept[len(kept)-1].Label, Scen: o, Axis: ax, keptID: c.Model.Views().Kept[len(kept)-1].ID}
		c.kept = append(c.kept, cs)
		c.startSweep(cs, false)
	}
	c.run = RunRunning
	c.redraw()
}

// Clear drops the kept curves.
func (c *CurveView) Clear() {
	for _, cs := range c.kept {
		if cs.cancel != nil {
			cs.cancel()
		}
	}
	c.kept = nil
	c.Model.SetKept(nil)
	c.settle()
}

// Cancel stops every job of the view; finished curves stay.
func (c *CurveView) Cancel() {
	if c.run != RunRunning {
		return
	}
	c.stopAll()
	c.run = RunCancelled
	c.redraw()
}

func (c *CurveView) stopAll() {
	for _, cs := range c.jobsOf() {
		if cs.cancel != nil {
			cs.cancel()
			cs.cancel = nil
			if !cs.done {
				cs.done, cs.err = true, "cancelled"
			}
		}
	}
	for _, f := range []*func(){&c.bestCancel, &c.bayesCancel} {
		if *f != nil {
			(*f)()
			*f = nil
		}
	}
}

func (c *CurveView) all() []*curveSeries {
	out := append([]*curveSeries(nil), c.kept...)
	if c.current != nil {
		out = append(out, c.current)
	}
	return out
}

// jobsOf lists every series with jobs: the curves and the best-tuned one.
func (c *CurveView) jobsOf() []*curveSeries {
	out := c.all()
	if c.tuned != nil {
		out = append(out, c.tuned)
	}
	return out
}

// settle updates the run state after a job ends and redraws: the figure is drawn as soon as
// the sweep's numbers are in, and again as each reference line or curve arrives.
func (c *CurveView) settle() {
	busy := c.bestCancel != nil || c.bayesCancel != nil
	for _, cs := range c.jobsOf() {
		busy = busy || !cs.done
	}
	switch {
	case busy:
		c.run = RunRunning
	case c.current != nil && c.current.err != "" && c.current.err != "cancelled":
		c.run, c.problem = RunError, c.current.err
	case c.run == RunCancelled:
	default:
		c.run = RunDone
	}
	c.redraw()
}

// quantity returns the observable shown on the y axis.
// A quantity of a generalized model chosen for an earlier scenario falls back to NMSE in dB.
func (c *CurveView) quantity() study.Observable {
	for _, o := range c.Quantities() {
		if o.Name == c.Quantity {
			return o
		}
	}
	return plot.Observable("nmse_db")
}

// figureSpec is the line figure of every finished curve, drawn as the command line draws
// it (plot.SweepFigure): a curve alone needs no legend; beside its best-tuned curve it is
// named by the weight the other re-tunes.
func (c *CurveView) figureSpec() (plot.Line, bool) {
	sf := plot.SweepFigure{Scenario: c.current0(), Quantity: c.quantity().Name, YLog: c.YLog, Axis: c.axis}
	tuned := c.tuned != nil && len(c.tuned.Points) > 0
	for _, cs := range c.all() {
		if cs.family != "" {
			if cs.done && cs.err == "" {
				sf.Curves = append(sf.Curves, plot.ValueCurves(cs.Scen, study.Curves{Over: cs.Axis.Over, Field: cs.family, Curves: cs.curves})...)
			}
			continue
		}
		label := cs.Label
		if len(c.kept) == 0 {
			label = ""
			if tuned {
				label = plot.FixedLabel(cs.Scen, c.tunedOver)
			}
		}
		sf.Curves = append(sf.Curves, plot.Curve{Label: label, Points: cs.Points})
	}
	if tuned {
		tc := plot.TunedCurve(c.tunedOver, nil)
		tc.Points = c.tuned.Points
		sf.Curves = append(sf.Curves, tc)
	}
	if c.best != nil && c.best.AtBound == "" {
		sf.Best = &plot.BestMark{Over: c.best.Over, Value: c.best.Value}
	}
	if c.bayes != nil {
		u := c.bayes.Optimal
		sf.Bayes = &u
	}
	return sf.Line()
}

// current0 is the scenario of the latest sweep (or of the first kept one).
func (c *CurveView) current0() scenario.Scenario {
	if c.current != nil {
		return c.current.Scen
	}
	if len(c.kept) > 0 {
		return c.kept[0].Scen
	}
	return scenario.Scenario{}
}

// redraw draws the figure in the page, at once.
func (c *CurveView) redraw() {
	l, ok := c.figureSpec()
	if !ok {
		c.box.clear()
		return
	}
	c.box.drawLine(c.Browser, "panel-curve", l)
	if c.current != nil && c.current.done && len(c.current.Points) > 0 && c.figSeconds == 0 && c.box.url != "" {
		c.figSeconds = c.now().Sub(c.started).Seconds()
	}
}

// FigureURL is the figure as a data: URL; "" when there is none.
func (c *CurveView) FigureURL() string {
	warmFigures()
	c.fit()
	return c.box.url
}

// fit draws the figure again when the panel's width asks for another size than the one
// shown (the window was resized, or the figure was drawn while its tab was hidden).
func (c *CurveView) fit() {
	if c.box.line == nil {
		return
	}
	if w, h := figureSize(c.Browser, "panel-curve"); w != c.box.line.Width || h != c.box.line.Height {
		c.box.drawLine(c.Browser, "panel-curve", *c.box.line)
	}
}

// FigureProblem says why there is no figure.
func (c *CurveView) FigureProblem() string { return c.box.problem }

// Readout is the value under the pointer, in words.
func (c *CurveView) Readout() string { return c.box.readout }

func (c *CurveView) pointer(e vugu.DOMEvent) { c.box.point(e, c.say) }

func (c *CurveView) leave() { c.box.leave() }

// say names the computed point nearest the pointer on the figure, among all its curves:
// the curve, and the exact values there.
func (c *CurveView) say(x, y float64, where func(x, y float64) (float64, float64)) (string, float64, float64) {
	q := c.quantity()
	l, ok := c.figureSpec()
	if !ok {
		return "", math.NaN(), math.NaN()
	}
	px, py := where(x, y)
	bestD, bs, bi := math.Inf(1), -1, -1
	for k, s := range l.Series {
		for i := range s.X {
			if math.IsNaN(s.Y[i]) || (l.YLog && !(s.Y[i] > 0)) {
				continue
			}
			qx, qy := where(s.X[i], s.Y[i])
			if d := math.Hypot(qx-px, qy-py); d < bestD {
				bestD, bs, bi = d, k, i
			}
		}
	}
	if bs < 0 {
		return fmt.Sprintf("pointer: %s = %s, %s = %s", c.axis.Over, num4(x), q.Label, num4(y)), math.NaN(), math.NaN()
	}
	s := l.Series[bs]
	name := s.Name
	if name == "" {
		name = "this scenario"
	}
	return fmt.Sprintf("%s: nearest computed point %s = %s, %s = %s", name, c.axis.Over, full(s.X[bi]), q.Label, full(s.Y[bi])), s.X[bi], s.Y[bi]
}

// Status says how far the sweep is, or how long it took.
func (c *CurveView) Status() string {
	switch c.run {
	case RunRunning:
		return fmt.Sprintf("Sweeping %s points…", c.axisPoints())
	case RunDone:
		if c.current == nil || len(c.current.Points) == 0 {
			return ""
		}
		bad := 0
		for _, p := range c.current.Points {
			if !p.OK() {
				bad++
			}
		}
		t := fmt.Sprintf("%d points in %.3f s.", len(c.current.Points), c.seconds)
		if bad > 0 {
			t += fmt.Sprintf(" %d points have no converged fixed point: they are marked ▵ on the bottom edge, not drawn.", bad)
		}
		return t
	case RunCancelled:
		return "Cancelled."
	}
	return ""
}

// Seconds is the time the last sweep took in the page, from start to result (data hook).
func (c *CurveView) Seconds() string { return full(c.seconds) }

// Problem says what stopped the view, in words.
func (c *CurveView) Problem() string { return c.problem }

// Notes are remarks about the references drawn (or not drawn).
func (c *CurveView) Notes() []string {
	var out []string
	if c.note != "" {
		out = append(out, c.note)
	}
	if c.bestErr != "" {
		out = append(out, c.bestErr)
	}
	if c.best != nil && c.best.AtBound != "" {
		out = append(out, fmt.Sprintf("The lowest error over %s lies at the %s end of the search (%s = %s)%s; no marker is drawn.",
			c.best.Over, c.best.AtBound, c.best.Over, num4(c.best.Value), noteSuffix(c.best.Note)))
	}
	if c.bayesNote != "" {
		out = append(out, c.bayesNote)
	}
	if b := c.bayes; b != nil && b.Differ {
		other, from := b.Informed, "an informed start"
		if b.OptimalStart == study.StartInformed {
			other, from = b.Uninformed, "no prior knowledge, what the algorithm reaches"
		}
		out = append(out, "The Bayes-optimal state evolution has two fixed points here; the line shows the optimal one (of lower free energy), "+
			num4(b.Optimal.NMSEdB)+" dB; the other is "+num4(other.NMSEdB)+" dB (from "+from+").")
	}
	for _, cs := range c.kept {
		if cs.err != "" {
			out = append(out, cs.Label+": "+cs.err)
		}
	}
	return out
}

func noteSuffix(n string) string {
	if n == "" {
		return ""
	}
	return ": " + n
}

// Answers are the key numbers with their hooks: name, full value, text.
func (c *CurveView) Answers() [][3]string {
	var out [][3]string
	if c.best != nil {
		out = append(out, [3]string{"curve_best_value", full(c.best.Value),
			fmt.Sprintf("Best %s: %s (NMSE %s dB)", c.best.Over, num4(c.best.Value), num4(c.best.Result.NMSEdB))})
	}
	if c.bayes != nil {
		text := "Bayes-optimal error: " + num4(c.bayes.Optimal.NMSEdB) + " dB"
		if c.bayes.Differ {
			text += " (another fixed point exists)"
		}
		out = append(out, [3]string{"curve_bayes_nmse_db", full(c.bayes.Optimal.NMSEdB), text})
	}
	if c.current != nil && len(c.current.Points) > 0 && c.run == RunDone {
		t := fmt.Sprintf("Time in the page: %.3f s to the numbers", c.seconds)
		if c.figSeconds > 0 {
			t += fmt.Sprintf(", %.3f s to the figure", c.figSeconds)
		}
		out = append(out, [3]string{"curve_seconds", full(c.seconds), t})
	}
	return out
}

// Curves lists the drawn curves by label (a curve per value by its value).
func (c *CurveView) Curves() []string {
	var out []string
	for _, cs := range c.all() {
		if cs.family != "" {
			for _, v := range cs.at {
				out = append(out, plot.ValueLabel(cs.Scen, cs.family, v))
			}
			continue
		}
		out = append(out, cs.Label)
	}
	return out
}

// LineCount is the number of curves on the figure (data hook).
func (c *CurveView) LineCount() string {
	l, ok := c.figureSpec()
	if !ok {
		return "0"
	}
	return strconv.Itoa(len(l.Series))
}

// HasKept reports whether there are kept curves.
func (c *CurveView) HasKept() bool { return len(c.kept) > 0 }

// ListCurves reports whether the figure has several curves to list by name.
func (c *CurveView) ListCurves() bool {
	return len(c.kept) > 0 || (c.current != nil && c.current.family != "" && c.current.done && c.current.err == "")
}

// CanKeep reports whether the current curve can be kept.
func (c *CurveView) CanKeep() bool {
	return c.current != nil && c.current.done && c.current.err == "" && c.run != RunRunning && c.current.family == ""
}

// CSV writes every curve with every observable (study.WriteCSV) under one header, with a
// first column naming the curve.
func (c *CurveView) CSV() ([]byte, error) {
	var b bytes.Buffer
	type named struct {
		label  string
		points []study.Point
	}
	var curves []named
	for _, cs := range c.all() {
		if cs.family == "" {
			curves = append(curves, named{cs.Label, cs.Points})
			continue
		}
		for _, cv := range cs.curves {
			curves = append(curves, named{plot.ValueLabel(cs.Scen, cs.family, cv.Value), cv.Points})
		}
	}
	for _, cs := range curves {
		if len(cs.points) == 0 {
			continue
		}
		var part bytes.Buffer
		if err := study.WriteCSV(&part, []string{c.axis.Over}, cs.points); err != nil {
			return nil, err
		}
		lines := bytes.SplitAfter(part.Bytes(), []byte("\n"))
		for k, ln := range lines {
			if len(ln) == 0 || (k == 0 && b.Len() > 0) {
				continue
			}
			if k == 0 {
				b.WriteString("curve,")
			} else {
				b.WriteString(csvField(cs.label) + ",")
			}
			b.Write(ln)
		}
	}
	if b.Len() == 0 {
		return nil, fmt.Errorf("no curve to save yet")
	}
	return b.Bytes(), nil
}

// Export saves the figure ("svg", "png", "pdf") or the curves' data ("csv").
func (c *CurveView) Export(what string) {
	c.box.save(c.Jobs, c.Browser, "hdrisk-curve", what, c.CSV, func(err error) { c.problem = err.Error() })
}

// csvField quotes one CSV field as RFC 4180 asks (quotes doubled, the field in quotes).
func csvField(s string) string {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	_ = w.Write([]string{s})
	w.Flush()
	return string(bytes.TrimRight(b.Bytes(), "\n"))
}

// readoutText is the readout, or how to get one.
func (c *CurveView) readoutText() string {
	if c.box.readout == "" {
		return "Point at the figure to read its values."
	}
	return c.box.readout
}

// FigureSeconds is the time from the start of the last sweep to its figure in place (data
// hook; 0 before).
func (c *CurveView) FigureSeconds() string { return full(c.figSeconds) }

func (c *CurveView) axisPoints() string { return strconv.Itoa(c.axis.Points) }

func (c *CurveView) staleText() string { return strconv.FormatBool(c.Stale()) }

// cancelAll returns a function that cancels each job of cancels still running (a nil entry
// is one that has ended) and marks it ended.
func cancelAll(cancels []func()) func() {
	return func() {
		for i, f := range cancels {
			if f != nil {
				f()
				cancels[i] = nil
			}
		}
	}
}
