package ui

import (
	"math"

	"hdrisk/engine/plot"
	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
	"hdrisk/protocol"
)

// planPoints is the number of values of m/n the plan's figure draws.
const planPoints = 40

// planFig is the plan view's figure: for the scenario's own design, the best-tuned error
// against m/n from a quarter of the answer to twice it, with the target and the answer.
type planFig struct {
	box    figureBox
	spec   plot.PlanFigure
	cancel func()
	err    string
}

// startFigure computes the best-tuned curve around the answer of the scenario's own row,
// once its plan has reached the target, and draws it.
func (c *PlanView) startFigure() {
	f := &c.fig
	if f.cancel != nil {
		f.cancel()
		f.cancel = nil
	}
	f.err = ""
	f.box.clear()
	if len(c.rows) == 0 || c.rows[0].Out == nil || !c.rows[0].Out.Reached || c.Jobs == nil {
		return
	}
	r := c.rows[0]
	a := r.Out.Alpha
	ax := study.Axis{Over: "alpha", From: math.Max(a/4, 1e-3), To: math.Min(2*a, scenario.MaxAlpha), Points: planPoints, Log: true}
	data, err := bareJSON(r.Scen)
	if err != nil {
		f.err = err.Error()
		return
	}
	over := r.Out.Best.Over
	f.spec = plot.PlanFigure{Scenario: r.Scen, Over: over, Target: c.target, MSE: c.mse, Alpha: a}
	f.cancel = start(c.Jobs, protocol.Tuned, protocol.TunedArgs{SweepArgs: protocol.SweepArgs{Scenario: data, Axis: ax}, Best: over}, nil,
		func(res protocol.TunedResult, err error) {
			f.cancel = nil
			if err != nil {
				f.err = "no figure: " + err.Error()
				return
			}
			f.spec.Curve = res.Points
			c.drawFigure()
		})
}

func (c *PlanView) drawFigure() {
	l, ok := c.fig.spec.Line()
	if !ok {
		c.fig.box.clear()
		return
	}
	c.fig.box.drawLine(c.Browser, "panel-plan", l)
}

// FigureURL is the plan's figure; "" while there is none.
func (c *PlanView) FigureURL() string {
	if l := c.fig.box.line; l != nil {
		if w, h := figureSize(c.Browser, "panel-plan"); w != l.Width || h != l.Height {
			c.drawFigure()
		}
	}
	return c.fig.box.url
}

// FigureProblem says why there is no figure.
func (c *PlanView) FigureProblem() string {
	if c.fig.err != "" {
		return c.fig.err
	}
	return c.fig.box.problem
}

// ExportFigure saves the plan's figure as svg, png or pdf.
func (c *PlanView) ExportFigure(what string) {
	c.fig.box.save(c.Jobs, c.Browser, "hdrisk-plan", what, nil, func(err error) { c.problem = err.Error() })
}
