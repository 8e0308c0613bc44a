package ui

import "github.com/vugu/vugu"

// Init starts the first evaluation as the page comes up.
func (c *Root) Init(vugu.InitCtx) {
	if c.Model == nil {
		c.Model = NewModel()
	}
	c.changed()
}

// State is the page root's data-state (contract 4): "busy" while figures are being computed,
// "error" when the scenario has no figures (the message says why), "ready" otherwise.
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

// changed drops the figures of the old scenario and evaluates the new one, cancelling an
// evaluation still running. It is called with the render lock held.
func (c *Root) changed() {
	if c.cancel != nil {
		c.cancel()
		c.cancel = nil
	}
	c.have = false
	data, err := c.Model.JSON()
	if err != nil {
		c.busy, c.problem = false, err.Error()
		return
	}
	if c.Eval == nil {
		c.busy, c.problem = false, "the calculator is not connected"
		return
	}
	c.busy, c.problem = true, ""
	c.cancel = c.Eval.Evaluate(data, func(f Figures, err error) {
		c.cancel = nil
		c.busy = false
		if err != nil {
			c.problem = err.Error()
			return
		}
		c.Figures, c.have = f, true
	})
}
