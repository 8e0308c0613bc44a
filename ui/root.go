package ui

import (
	"fmt"
	"strconv"
	"strings"
	"time"

	"github.com/vugu/vugu"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/scenario"
	"hdrisk/protocol"
)

// viewTab is one tab of the views area.
type viewTab struct{ Name, Label string }

// viewTabs are the views below the figures, in tab order. A tab shows only once its panel
// in root.vugu holds its view (page.css), so views can arrive one at a time.
var viewTabs = []viewTab{
	{"curve", "Curve"}, {"map", "Map"}, {"plan", "Plan"}, {"check", "Finite-size check"},
	{"data", "Your data"}, {"share", "Save and share"}, {"about", "Assumptions"},
}

// Init starts the first evaluation as the page comes up.
func (c *Root) Init(vugu.InitCtx) {
	if c.Model == nil {
		c.Model = NewModel()
	}
	c.changed()
}

// State is the page root's data-state (contract 4): "busy" while figures are being computed,
// "error" when the scenario in the editor has no figures of its own (the message says why),
// "ready" otherwise.
func (c *Root) State() string {
	switch {
	case c.busy:
		return "busy"
	case c.problem != "":
		return "error"
	default:
		return "ready"
	}
}

// Tab returns the name of the selected view, from the page state.
func (c *Root) Tab() string { return c.Model.Views().Tab }

// showTab selects the view named name. Special cases are: an unknown name changes nothing.
func (c *Root) showTab(name string) { c.Model.SetTab(name) }

func (c *Root) selectedText(name string) string { return strconv.FormatBool(c.Tab() == name) }

// fieldless is the problem of the scenario that no single input can be blamed for, shown
// at the foot of the editor; "" when there is none.
func (c *Root) fieldless() string {
	if c.checked.Err == nil || len(c.checked.Invalid) > 0 {
		return ""
	}
	return c.checked.Err.Error()
}

// Reload puts s in the editor (a link, a file, an example) and evaluates it.
// Special cases are: a scenario whose kinds the page does not offer is an error and the
// editor keeps what it had.
func (c *Root) Reload(s scenario.Scenario) error {
	if err := c.Model.Load(s); err != nil {
		return err
	}
	c.changed()
	return nil
}

// changed checks the editor's inputs and evaluates the scenario they make, cancelling an
// evaluation still running. An invalid scenario keeps the last valid one's figures and
// plots on screen, marked as such. It is called with the render lock held.
func (c *Root) changed() {
	if c.cancel != nil {
		c.cancel()
		c.cancel = nil
	}
	c.checked = c.Model.Check()
	if err := c.checked.Err; err != nil {
		c.busy, c.problem, c.stale = false, err.Error(), c.have
		return
	}
	c.updatePlots()
	if c.Eval == nil {
		c.busy, c.problem, c.stale = false, "the calculator is not connected", c.have
		return
	}
	c.busy, c.problem = true, ""
	chk := c.checked
	c.evalStart = c.now()
	finish := func(f Figures, err error) {
		c.cancel, c.onWorker = nil, false
		c.busy = false
		if err != nil {
			c.problem, c.stale = err.Error(), c.have
			return
		}
		c.Figures, c.have, c.stale = f, true, false
		c.summary = Summary(chk.Scenario)
		c.support = hasZeroAtom(chk) && chk.Problem.Penalty.HasZeroRegion()
		c.zeroes = chk.Problem.Penalty.HasZeroRegion()
	}
	// An evaluation that took longer than slowEval in the page stalls the editor while it
	// runs; the next evaluations of scenarios of the same kinds go to a compute worker, where
	// a new edit cancels them at once (the worker is replaced).
	key := c.Model.Kind("design") + "|" + c.Model.Kind("signal") + "|" + c.Model.Kind("penalty")
	if c.slowKinds == key && c.Jobs != nil {
		data, err := bareJSON(chk.Scenario)
		if err == nil {
			c.onWorker = true
			c.cancel = start(c.Jobs, protocol.Eval, protocol.EvalArgs{Scenario: data}, nil, func(r fixedpoint.Result, err error) {
				finish(FiguresOf(r), err)
			})
			c.tick()
			return
		}
	}
	c.cancel = c.Eval.Evaluate(chk, func(f Figures, err error) {
		if d := c.now().Sub(c.evalStart); d > slowEval {
			c.slowKinds = key
		} else if c.slowKinds == key {
			c.slowKinds = ""
		}
		finish(f, err)
	})
}

// slowEval is the longest evaluation the page runs itself (issue: the editor must stay
// responsive): a longer one blocks the page's only thread while it runs.
const slowEval = 200 * time.Millisecond

func (c *Root) now() time.Time {
	if c.Clock != nil {
		return c.Clock()
	}
	return time.Now()
}

// tick renders the page every quarter second while an evaluation runs on a worker, so that
// its progress line counts the time.
func (c *Root) tick() {
	tm, ok := c.Browser.(Timer)
	if !ok || !c.onWorker {
		return
	}
	tm.After(250*time.Millisecond, func() bool {
		if !c.onWorker {
			return false
		}
		c.tick()
		return true
	})
}

// WorkerNote says that the figures are being computed on a worker, and for how long.
func (c *Root) WorkerNote() string {
	if !c.onWorker {
		return ""
	}
	return fmt.Sprintf("This scenario takes a while to solve, so it is solved on a compute worker and the editor stays free: %.1f s so far.",
		c.now().Sub(c.evalStart).Seconds())
}

// hasZeroAtom tells whether the signal law puts mass exactly at zero: TPP and FDP are then
// meaningful.
func hasZeroAtom(c Checked) bool {
	if c.Problem.Signal == nil || !c.Problem.Signal.Exact() {
		return false
	}
	for _, m := range c.Problem.Signal.Mixture() {
		if m.Weight > 0 && m.Var == 0 && m.Mean == 0 {
			return true
		}
	}
	return false
}

// updatePlots redraws the design and signal figures when their laws changed. A figure that
// cannot be drawn says so in its text alternative and shows no image.
func (c *Root) updatePlots() {
	s := c.checked.Scenario
	if key := fmt.Sprint(s.Design); key != c.designKey {
		c.designKey = key
		p, err := designPlot(c.checked.Problem.Design)
		c.designPlot = c.showPlot(c.designPlot, p, err, "No figure of the design: ")
	}
	if key := fmt.Sprint(s.Signal); key != c.signalKey {
		c.signalKey = key
		p, err := signalPlot(c.checked.Problem.Signal)
		c.signalPlot = c.showPlot(c.signalPlot, p, err, "No figure of the signal: ")
	}
}

// showPlot releases the image of old and returns p with a URL to show it under, or with the
// reason it cannot be shown (err, or the URL's) after why.
func (c *Root) showPlot(old, p lawPlot, err error, why string) lawPlot {
	dropImage(c.Browser, old.URL)
	if err == nil {
		p.URL, err = imageURL(c.Browser, "image/svg+xml", p.svg)
	}
	if err != nil {
		return lawPlot{Alt: why + err.Error()}
	}
	return p
}

// Summary states a scenario in one line of words, for the figures' caption and for print.
func Summary(s scenario.Scenario) string {
	num := func(v float64) string { return strconv.FormatFloat(v, 'g', 6, 64) }
	part := func(group, kind string, params map[string]float64, lists map[string][]float64) string {
		label := kindLabel(group, kind)
		var bits []string
		grp, _ := FindGroup(group)
		k, _ := grp.kind(kind)
		for _, p := range k.Params {
			if p.List {
				bits = append(bits, fmt.Sprintf("%s: %d values", p.Name, len(lists[p.Name])))
			} else {
				bits = append(bits, p.Name+" "+num(params[p.Name]))
			}
		}
		if len(bits) == 0 {
			return label
		}
		return label + " (" + strings.Join(bits, ", ") + ")"
	}
	noise := "variance " + num(s.Noise.Variance)
	if s.Noise.SNR {
		noise = "SNR " + num(s.Noise.SNRdB) + " dB"
	}
	return fmt.Sprintf("Design: %s, m/n = %s, %s scale. Signal: %s. Noise: %s. Penalty: %s.",
		part("design", s.Design.Shape, s.Design.Params, s.Design.Lists), num(s.Design.Alpha), s.Design.Scale,
		part("signal", s.Signal.Law, s.Signal.Params, s.Signal.Lists), noise,
		part("penalty", s.Penalty.Kind, s.Penalty.Params, nil))
}
