package ui

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/vugu/vugu"

	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
	"hdrisk/protocol"
)

// Planner defaults: a target in dB and the largest m/n searched.
const (
	planTargetDB = -20.0
	planAlphaMax = 10.0
)

// planRow is the answer for one design shape.
type planRow struct {
	Shape, Label string
	Current      bool
	Scen         scenario.Scenario
	Out          *study.PlanResult
	Err          string
	cancel       func()
}

// planInit sets the view's run state the first time it is used.
func (c *PlanView) planInit() {
	if c.inited || c.Model == nil {
		return
	}
	c.inited, c.run = true, RunIdle
}

// Init implements vugu's initializer.
func (c *PlanView) Init(vugu.InitCtx) { c.planInit() }

// Run is the data-run hook.
func (c *PlanView) Run() string {
	if c.run == "" {
		return RunIdle
	}
	return c.run
}

// Running reports whether plans are being computed.
func (c *PlanView) Running() bool { return c.run == RunRunning }

// TargetText, AlphaMaxText, Unit and Over are the planner's settings, from the page state.
func (c *PlanView) TargetText() string   { return c.views().Target }
func (c *PlanView) AlphaMaxText() string { return c.views().AlphaMax }
func (c *PlanView) Unit() string         { return c.views().Unit }
func (c *PlanView) Over() string         { return c.views().Over }

func (c *PlanView) views() *Views {
	if c.Model == nil {
		return &Views{}
	}
	c.Model.Check() // fits the tuned weight to the penalty
	return c.Model.Views()
}

// Weights are the regularizations the planner can tune for the current penalty: name and
// label. Special cases are: while the scenario is invalid, the weight in force alone.
func (c *PlanView) Weights() [][2]string {
	if c.Model == nil {
		return nil
	}
	if ch := c.Model.Check(); ch.Err == nil {
		return Weights(ch.Scenario)
	}
	return [][2]string{{c.Over(), c.Over()}}
}

// Set stores one setting: "target", "unit" (db or mse), "alpha_max" or "over".
// Special cases are: an unknown name is an error.
func (c *PlanView) Set(name, text string) error {
	c.planInit()
	if c.Model == nil {
		return fmt.Errorf("no scenario")
	}
	return c.Model.SetPlan(name, text)
}

func (c *PlanView) typed(e vugu.DOMEvent, name string) {
	_ = c.Set(name, e.PropString("target", "value"))
}

// Stale tells whether the plans on screen were computed for another scenario or other
// settings than the page's: they are then marked, with a button to compute them again.
func (c *PlanView) Stale() bool {
	if c.Model == nil || len(c.rows) == 0 || c.run == RunRunning {
		return false
	}
	v := c.views()
	t, err1 := strconv.ParseFloat(strings.TrimSpace(v.Target), 64)
	a, err2 := strconv.ParseFloat(strings.TrimSpace(v.AlphaMax), 64)
	return err1 != nil || err2 != nil || t != c.target || a != c.alphaMax || (v.Unit == "mse") != c.mse ||
		v.Over != c.over || c.key != c.Model.problemKey()
}

// Start asks, for the current design and for each other shape at the same m/n scale, the
// smallest m/n whose best-regularized error reaches the target. Each shape is one job; the
// settings go into the scenario's study.plan (the target in dB).
func (c *PlanView) Start() {
	c.planInit()
	c.problem = ""
	if c.Model == nil {
		return
	}
	ch := c.Model.Check()
	if ch.Err != nil {
		c.problem = "the scenario in the editor has a problem: " + ch.Err.Error()
		return
	}
	v := c.Model.Views()
	target, err := strconv.ParseFloat(strings.TrimSpace(v.Target), 64)
	if err != nil || math.IsNaN(target) || math.IsInf(target, 0) {
		c.problem = fmt.Sprintf("target: %q is not a number", strings.TrimSpace(v.Target))
		return
	}
	amax, err := strconv.ParseFloat(strings.TrimSpace(v.AlphaMax), 64)
	if err != nil || !(amax > 0 && amax <= scenario.MaxAlpha) {
		c.problem = fmt.Sprintf("largest m/n: a number in (0, %g], not %q", float64(scenario.MaxAlpha), strings.TrimSpace(v.AlphaMax))
		return
	}
	if v.Over == "" {
		c.problem = "tune: the " + ch.Scenario.Penalty.Kind + " penalty has no weight to tune"
		return
	}
	isMSE := v.Unit == "mse"
	if isMSE && !(target > 0) {
		c.problem = "target: an MSE target must be > 0"
		return
	}
	s := ch.Scenario
	db := target
	if isMSE {
		db = 10 * math.Log10(target/ch.Problem.Signal.Second())
	}
	if c.Jobs == nil {
		c.problem = "the compute workers are still starting; try again in a moment"
		return
	}
	if err := (scenario.Scenario{Kind: s.Kind, Version: s.Version, Title: s.Title, Design: s.Design, Signal: s.Signal,
		Noise: s.Noise, Penalty: s.Penalty, Study: &scenario.Study{View: "plan", Plan: &scenario.Plan{TargetDB: db, AlphaMax: amax}}}).Validate(); err != nil {
		c.problem = err.Error()
		return
	}
	c.Model.ranStudy("plan", partPlan, partBest)
	c.over, c.key = v.Over, c.Model.problemKey()

	c.stop()
	c.target, c.mse, c.alphaMax = target, isMSE, amax
	c.rows = nil
	g, _ := FindGroup("design")
	cur, _ := g.kind(s.Design.Shape)
	c.rows = append(c.rows, &planRow{Shape: s.Design.Shape, Label: cur.Label + " (this scenario)", Current: true, Scen: s})
	for _, k := range g.Kinds {
		if k.Name == s.Design.Shape {
			continue
		}
		if o, ok := withShape(s, k.Name); ok {
			c.rows = append(c.rows, &planRow{Shape: k.Name, Label: k.Label, Scen: o})
		}
	}
	c.run = RunRunning
	for _, r := range c.rows {
		r := r
		data, err := bareJSON(r.Scen)
		if err != nil {
			r.Err = err.Error()
			continue
		}
		r.cancel = start(c.Jobs, protocol.Plan, protocol.PlanArgs{Scenario: data, Target: target, MSE: isMSE, AlphaMax: amax, Over: v.Over}, nil,
			func(out study.PlanResult, err error) {
				r.cancel = nil
				if err != nil {
					r.Err = err.Error()
				} else {
					r.Out = &out
				}
				c.settle()
			})
	}
	c.settle()
}

func (c *PlanView) settle() {
	for _, r := range c.rows {
		if r.cancel != nil {
			return
		}
	}
	if c.run == RunRunning {
		c.run = RunDone
		if len(c.rows) > 0 && c.rows[0].Err != "" {
			c.run, c.problem = RunError, c.rows[0].Err
		}
		c.startFigure()
	}
}

// Cancel stops the plans still running.
func (c *PlanView) Cancel() {
	if c.run != RunRunning {
		return
	}
	c.stop()
	c.run = RunCancelled
}

func (c *PlanView) stop() {
	if c.fig.cancel != nil {
		c.fig.cancel()
		c.fig.cancel = nil
	}
	for _, r := range c.rows {
		if r.cancel != nil {
			r.cancel()
			r.cancel = nil
			if r.Out == nil && r.Err == "" {
				r.Err = "cancelled"
			}
		}
	}
}

// Problem says what stopped the view.
func (c *PlanView) Problem() string { return c.problem }

// planLine is one row of the answer table.
type planLine struct {
	Label, Name, Value, Alpha, Weight, Error, Note string
	Reached                                        bool
}

// Lines are the answers, one per design shape, with their data-figure hooks:
// plan_alpha (this scenario) and plan_alpha_SHAPE (every shape); data-value is the m/n
// found, or "not reached".
func (c *PlanView) Lines() []planLine {
	var out []planLine
	for _, r := range c.rows {
		l := planLine{Label: r.Label, Name: "plan_alpha_" + r.Shape}
		switch {
		case r.Out != nil && r.Out.Reached:
			o := r.Out
			l.Reached, l.Value, l.Alpha = true, full(o.Alpha), num4(o.Alpha)
			l.Weight = fmt.Sprintf("%s = %s", o.Best.Over, num4(o.Best.Value))
			l.Error = num4(o.Best.Result.NMSEdB) + " dB"
			l.Note = o.Reason
		case r.Out != nil:
			o := r.Out
			l.Value, l.Alpha = "not reached", "not reached up to m/n = "+num4(c.alphaMax)
			l.Note = o.Reason
			l.Error = "lowest " + num4(o.Best.Result.NMSEdB) + " dB"
		case r.Err != "":
			l.Value, l.Alpha, l.Note = "error", "—", r.Err
		default:
			l.Value, l.Alpha = "running", "computing…"
		}
		out = append(out, l)
	}
	return out
}

// Headline is this scenario's answer with its hook (name, value, text); ok is false before
// there is one.
func (c *PlanView) Headline() (h [3]string, ok bool) {
	if len(c.rows) == 0 || c.rows[0].Out == nil {
		return h, false
	}
	o := c.rows[0].Out
	unit := " dB"
	if c.mse {
		unit = " (MSE)"
	}
	if !o.Reached {
		return [3]string{"plan_alpha", "not reached", fmt.Sprintf("The target %s%s is not reached up to m/n = %s. %s", num4(c.target), unit, num4(c.alphaMax), o.Reason)}, true
	}
	return [3]string{"plan_alpha", full(o.Alpha), fmt.Sprintf("To reach %s%s this design needs m/n = %s measurements per unknown, with %s = %s.",
		num4(c.target), unit, num4(o.Alpha), o.Best.Over, num4(o.Best.Value))}, true
}

// Status says how far the plans are.
func (c *PlanView) Status() string {
	switch c.run {
	case RunRunning:
		n := 0
		for _, r := range c.rows {
			if r.cancel == nil {
				n++
			}
		}
		return fmt.Sprintf("Planning: %d of %d designs done…", n, len(c.rows))
	case RunCancelled:
		return "Cancelled."
	}
	return ""
}

// CSV writes the answers: design, target, unit, alpha_max, reached, alpha, weight, value,
// nmse_db at the answer, solves and the engine's reason.
func (c *PlanView) CSV() ([]byte, error) {
	if len(c.rows) == 0 {
		return nil, fmt.Errorf("no plan to save yet")
	}
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	unit := "db"
	if c.mse {
		unit = "mse"
	}
	_ = w.Write([]string{"design", "target", "unit", "alpha_max", "reached", "alpha", "weight", "weight_value", "nmse_db", "solves", "reason"})
	for _, r := range c.rows {
		rec := []string{r.Shape, full(c.target), unit, full(c.alphaMax)}
		if r.Out == nil {
			rec = append(rec, "", "", "", "", "", "", r.Err)
		} else {
			o := r.Out
			alpha := ""
			if o.Reached {
				alpha = full(o.Alpha)
			}
			rec = append(rec, strconv.FormatBool(o.Reached), alpha, o.Best.Over, full(o.Best.Value),
				full(o.Best.Result.NMSEdB), strconv.Itoa(o.Solves), o.Reason)
		}
		_ = w.Write(rec)
	}
	w.Flush()
	return b.Bytes(), w.Error()
}

// Export saves the answers as CSV.
func (c *PlanView) Export() {
	if c.Browser == nil {
		c.problem = "saving a file needs the browser"
		return
	}
	data, err := c.CSV()
	if err == nil {
		err = c.Browser.Download("hdrisk-plan.csv", "text/csv", data)
	}
	if err != nil {
		c.problem = err.Error()
	}
}

func (c *PlanView) hasHeadline() bool { _, ok := c.Headline(); return ok }

func (c *PlanView) headline() [3]string { h, _ := c.Headline(); return h }

func (c *PlanView) staleText() string { return strconv.FormatBool(c.Stale()) }
