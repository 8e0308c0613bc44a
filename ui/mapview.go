package ui

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/vugu/vugu"

	"hdrisk/engine/plot"
	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
	"hdrisk/protocol"
)

// mapPoints is the number of values per axis a new map proposes.
const mapPoints = 100

// mapBlocksPerWorker is how many blocks of rows a map gives each worker. The pool runs one
// block per worker and queues the rest: a few blocks each even out the load (rows differ in
// cost) and move the progress bar, while every finished block costs the page a render and
// the decoding of its cells, so there are not many.
const mapBlocksPerWorker = 2

// mapBlocksUnknown is the number of blocks when the pool does not say how many workers it has.
const mapBlocksUnknown = 8

// workerCount is what a Jobs offers when it can say how many workers it has.
type workerCount interface{ Workers() int }

// blocks returns how many blocks of rows a map of rows rows is split into.
func (c *Mapview) blockCount(rows int) int {
	n := mapBlocksUnknown
	if wc, ok := c.Jobs.(workerCount); ok && wc.Workers() > 0 {
		n = mapBlocksPerWorker * wc.Workers()
	}
	return max(1, min(rows, n))
}

// mapInit sets the view's own display settings the first time it is used.
func (c *Mapview) mapInit() {
	if c.inited || c.Model == nil {
		return
	}
	c.inited, c.Quantity, c.run = true, "nmse_db", RunIdle
}

// Init implements vugu's initializer.
func (c *Mapview) Init(vugu.InitCtx) { c.mapInit() }

// Run is the data-run hook: idle, running, done, cancelled or error.
func (c *Mapview) Run() string {
	if c.run == "" {
		return RunIdle
	}
	return c.run
}

// Running reports whether the map is being computed.
func (c *Mapview) Running() bool { return c.run == RunRunning }

// X and Y return the texts of the two axes' inputs.
func (c *Mapview) X() axisText { return c.axisTexts()[0] }
func (c *Mapview) Y() axisText { return c.axisTexts()[1] }

// axisTexts are the page state's map axes, proposed or fitted to the scenario first.
func (c *Mapview) axisTexts() [2]axisText {
	if c.Model == nil {
		return [2]axisText{}
	}
	c.Model.Check()
	return c.Model.Views().Map
}

// Paths are the numbers of the current scenario a map can vary.
func (c *Mapview) Paths() []scenario.PathInfo { return modelPaths(c.Model) }

// Quantities are the numbers the colours can show: those of a generalized linear model
// (cosine, test error, ...) for such a scenario only, as the curve view offers them.
func (c *Mapview) Quantities() []study.Observable { return modelQuantities(c.Model) }

// Set stores one setting: "x.over", "x.from", "x.to", "x.points", "x.log", the same for
// "y.", or "quantity". Special cases are: an unknown name is an error.
func (c *Mapview) Set(name, text string) error {
	c.mapInit()
	if name == "quantity" {
		c.Quantity = text
		c.redraw()
		return nil
	}
	if len(name) < 3 || (name[:2] != "x." && name[:2] != "y.") {
		return fmt.Errorf("no setting %q", name)
	}
	k := 0
	if name[0] == 'y' {
		k = 1
	}
	if c.Model == nil {
		return fmt.Errorf("no scenario")
	}
	return c.Model.SetMapAxis(k, name[2:], text)
}

func (c *Mapview) typed(e vugu.DOMEvent, name string) {
	_ = c.Set(name, e.PropString("target", "value"))
}

func (c *Mapview) ticked(e vugu.DOMEvent, name string) {
	_ = c.Set(name, strconv.FormatBool(e.PropBool("target", "checked")))
}

func (c *Mapview) now() time.Time {
	if c.Clock != nil {
		return c.Clock()
	}
	return time.Now()
}

// mapAxes reads the two axes of a map from their texts.
func mapAxes(t [2]axisText) ([2]study.Axis, error) {
	var ax [2]study.Axis
	for k, p := range []string{"map x", "map y"} {
		over, from, to, n, err := t[k].parse(p, scenario.MaxMapPoints)
		if err != nil {
			return ax, err
		}
		ax[k] = study.Axis{Over: over, From: from, To: to, Points: n, Log: t[k].Log}
	}
	if ax[0].Over == ax[1].Over {
		return ax, fmt.Errorf("map: choose two different numbers for the two axes")
	}
	return ax, nil
}

// Stale tells whether the map on screen was computed for another scenario or other axes
// than the page's: it is then marked, with a button to compute it again.
func (c *Mapview) Stale() bool {
	if c.Model == nil || len(c.cells) == 0 || c.run == RunRunning {
		return false
	}
	ax, err := mapAxes(c.Model.Views().Map)
	return err != nil || ax != c.axes || c.key != c.Model.problemKey()
}

// Start computes the map of the scenario in the editor, split into blocks of rows that
// run on all the compute workers. The settings go into the scenario's study.map.
func (c *Mapview) Start() {
	c.mapInit()
	c.problem = ""
	if c.Model == nil {
		return
	}
	ch := c.Model.Check()
	if ch.Err != nil {
		c.problem = "the scenario in the editor has a problem: " + ch.Err.Error()
		return
	}
	ax, err := mapAxes(c.Model.Views().Map)
	if err != nil {
		c.problem = err.Error()
		return
	}
	if c.Jobs == nil {
		c.problem = "the compute workers are still starting; try again in a moment"
		return
	}
	s := ch.Scenario
	data, err := bareJSON(s)
	if err != nil {
		c.problem = err.Error()
		return
	}
	c.Model.ranStudy("map", partMap)
	c.key = c.Model.problemKey()

	c.stop()
	c.scen, c.axes = s, ax
	c.cells = make([]study.Point, ax[0].Points*ax[1].Points)
	c.done, c.total, c.seconds, c.figSeconds = 0, ax[1].Points, 0, 0
	c.box.clear()
	c.started = c.now()
	c.run = RunRunning
	rows := ax[1].Points
	nb := c.blockCount(rows)
	c.blocks = make([]func(), nb)
	c.pending = nb
	for b := 0; b < nb; b++ {
		from, to := b*rows/nb, (b+1)*rows/nb
		b := b
		// Progress is counted by finished blocks: a progress message per row from every
		// worker would cost the page a render each, and slow the map it reports on.
		c.blocks[b] = start(c.Jobs, protocol.MapRows, protocol.MapArgs{Scenario: data, X: ax[0], Y: ax[1], RowFrom: from, RowTo: to},
			nil, func(r protocol.MapResult, err error) { c.block(b, from, to, r, err) })
	}
}

// block takes in the cells of one finished block.
func (c *Mapview) block(b, from, to int, r protocol.MapResult, err error) {
	c.blocks[b] = nil
	c.pending--
	if err == nil && (r.RowFrom != from || r.RowTo != to || len(r.Cells) != (to-from)*c.axes[0].Points) {
		err = fmt.Errorf("rows %d to %d came back incomplete", from, to)
	}
	if err != nil {
		c.stop()
		c.run, c.problem = RunError, "the map failed: "+err.Error()
		return
	}
	copy(c.cells[from*c.axes[0].Points:], r.Cells)
	c.done += to - from
	if c.pending > 0 {
		return
	}
	c.seconds = c.now().Sub(c.started).Seconds()
	c.run = RunDone
	c.redraw()
}

// Cancel stops the map; the page stays as it was before it started.
func (c *Mapview) Cancel() {
	if c.run != RunRunning {
		return
	}
	c.stop()
	c.run = RunCancelled
}

func (c *Mapview) stop() {
	for i, f := range c.blocks {
		if f != nil {
			f()
			c.blocks[i] = nil
		}
	}
	c.pending = 0
}

// Progress returns the rows done and the rows in all.
func (c *Mapview) Progress() (done, total int) { return c.done, c.total }

// quantity returns the observable the colours show. A quantity of a generalized model
// chosen for an earlier scenario falls back to NMSE in dB.
func (c *Mapview) quantity() study.Observable {
	for _, o := range c.Quantities() {
		if o.Name == c.Quantity {
			return o
		}
	}
	return plot.Observable("nmse_db")
}

// figure is the map as plot.MapFigure draws it, for the page and the command line alike.
func (c *Mapview) figure() plot.MapFigure {
	return plot.MapFigure{Scenario: c.scen, X: c.axes[0], Y: c.axes[1], Quantity: c.quantity().Name, Cells: c.cells}
}

// Ridge returns the best regularization along the weight axis (plot.MapFigure.Ridge).
func (c *Mapview) Ridge() (x, y []float64) { return c.figure().Ridge() }

func (c *Mapview) redraw() {
	if c.run != RunDone || len(c.cells) == 0 {
		return
	}
	h := c.figure().Heat()
	c.levels = h.Levels
	h.Width, h.Height = figureSize(c.Browser, "panel-map")
	c.box.draw(c.Jobs, c.Browser, protocol.FigureArgs{Heat: &h}, func() { c.figSeconds = c.now().Sub(c.started).Seconds() })
}

// FigureURL is the map as a data: URL; "" when there is none.
func (c *Mapview) FigureURL() string {
	c.fit()
	return c.box.url
}

// fit draws the map again, on a worker, when the panel's width asks for another size than
// the one shown.
func (c *Mapview) fit() {
	h := c.box.spec.Heat
	if h == nil || c.box.drawing() {
		return
	}
	if w, ht := figureSize(c.Browser, "panel-map"); w != h.Width || ht != h.Height {
		nh := *h
		nh.Width, nh.Height = w, ht
		c.box.draw(c.Jobs, c.Browser, protocol.FigureArgs{Heat: &nh}, nil)
	}
}

// FigureProblem says why there is no figure.
func (c *Mapview) FigureProblem() string { return c.box.problem }

func (c *Mapview) pointer(e vugu.DOMEvent) { c.box.point(e, c.say) }

func (c *Mapview) leave() { c.box.leave() }

// readoutText is the readout, or how to get one.
func (c *Mapview) readoutText() string {
	if c.box.readout == "" {
		return "Point at the map to read its values."
	}
	return c.box.readout
}

// say names the cell under the pointer and its exact value; the crosshair marks the cell.
func (c *Mapview) say(x, y float64, _ func(x, y float64) (float64, float64)) (string, float64, float64) {
	nx := c.axes[0].Points
	near := func(v float64, k int, log bool) int {
		best, bd := 0, math.Inf(1)
		for i := 0; i < [2]int{nx, c.axes[1].Points}[k]; i++ {
			p := c.cells[i]
			if k == 1 {
				p = c.cells[i*nx]
			}
			w := [2]float64{p.X, p.Y}[k]
			d := math.Abs(w - v)
			if log && w > 0 && v > 0 {
				d = math.Abs(math.Log(w / v))
			}
			if d < bd {
				best, bd = i, d
			}
		}
		return best
	}
	i, j := near(x, 0, c.axes[0].Log), near(y, 1, c.axes[1].Log)
	p := c.cells[j*nx+i]
	q := c.quantity()
	v := "no converged value (" + p.Status() + ")"
	if p.OK() {
		v = q.Label + " " + num4(q.Of(p.Result))
	}
	if p.OK() {
		v = q.Label + " " + full(q.Of(p.Result))
	}
	return fmt.Sprintf("cell %s = %s, %s = %s: %s", c.axes[0].Over, full(p.X), c.axes[1].Over, full(p.Y), v), p.X, p.Y
}

// Status says how far the map is, or how long it took.
func (c *Mapview) Status() string {
	switch c.run {
	case RunRunning:
		return fmt.Sprintf("Computing: %d of %d rows…", c.done, c.total)
	case RunCancelled:
		return fmt.Sprintf("Cancelled after %d of %d rows.", c.done, c.total)
	case RunDone:
		bad := 0
		for _, p := range c.cells {
			if !p.OK() {
				bad++
			}
		}
		t := fmt.Sprintf("%d × %d cells in %.2f s.", c.axes[0].Points, c.axes[1].Points, c.seconds)
		if bad > 0 {
			t += fmt.Sprintf(" %d cells have no converged fixed point: they are grey, and left out of the lowest-error line.", bad)
		}
		return t
	}
	return ""
}

// Problem says what stopped the view.
func (c *Mapview) Problem() string { return c.problem }

// Seconds is the time the last map took in the page (data hook).
func (c *Mapview) Seconds() string { return full(c.seconds) }

// Answers are the key numbers with their hooks: name, full value, text.
func (c *Mapview) Answers() [][3]string {
	if c.run != RunDone {
		return nil
	}
	q := c.quantity()
	// The lowest of the quantity the colours show, not of the MSE: the two differ in place
	// wherever E[x0^2] or the quantity's own scale varies over the map.
	// For the cosine the best cell is the highest one (plot.HigherBetter).
	sign, hook, word := 1.0, "map_lowest", "Lowest"
	if plot.HigherBetter(q.Name) {
		sign, hook, word = -1, "map_highest", "Highest"
	}
	lo, at := math.Inf(1), -1
	for k, p := range c.cells {
		if v := sign * q.Of(p.Result); p.OK() && v < lo {
			lo, at = v, k
		}
	}
	t := fmt.Sprintf("Time in the page: %.2f s to the numbers", c.seconds)
	if c.figSeconds > 0 {
		t += fmt.Sprintf(", %.2f s to the map", c.figSeconds)
	}
	out := [][3]string{{"map_seconds", full(c.seconds), t}}
	if at >= 0 {
		p := c.cells[at]
		out = append(out, [3]string{hook, full(sign * lo), fmt.Sprintf("%s on the map: %s %s at %s = %s, %s = %s",
			word, q.Label, num4(q.Of(p.Result)), c.axes[0].Over, num4(p.X), c.axes[1].Over, num4(p.Y))})
	}
	return out
}

// CSV writes every cell with every observable (study.WriteCSV).
func (c *Mapview) CSV() ([]byte, error) {
	if c.run != RunDone {
		return nil, fmt.Errorf("no finished map to save yet")
	}
	var b bytes.Buffer
	if err := study.WriteCSV(&b, []string{c.axes[0].Over, c.axes[1].Over}, c.cells); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// Export saves the map ("svg", "png", "pdf") or its data ("csv").
func (c *Mapview) Export(what string) {
	c.box.save(c.Jobs, c.Browser, "hdrisk-map", what, c.CSV, func(err error) { c.problem = err.Error() })
}

// mapAxisInputs is one axis's group of inputs.
type mapAxisInputs struct {
	Key, Set, Legend string
	Axis             axisText
}

func (c *Mapview) axesForInputs() []mapAxisInputs {
	c.mapInit()
	ax := c.axisTexts()
	return []mapAxisInputs{
		{Key: "map-x", Set: "x.", Legend: "Across (x)", Axis: ax[0]},
		{Key: "map-y", Set: "y.", Legend: "Up (y)", Axis: ax[1]},
	}
}

// FigureSeconds is the time from the start of the last map to its image in place (data
// hook; 0 before).
func (c *Mapview) FigureSeconds() string { return full(c.figSeconds) }

// Caption says what the white lines are: the contour levels, in the colours' unit.
func (c *Mapview) Caption() string {
	if len(c.levels) == 0 {
		return ""
	}
	var ls []string
	for _, l := range c.levels {
		ls = append(ls, num4(l))
	}
	return "White lines: " + c.quantity().Label + " = " + strings.Join(ls, ", ") + "."
}

func (c *Mapview) staleText() string { return strconv.FormatBool(c.Stale()) }

// doneText and totalText are the rows finished and the rows of the map (data hooks).
func (c *Mapview) doneText() string  { return strconv.Itoa(c.done) }
func (c *Mapview) totalText() string { return strconv.Itoa(c.total) }
