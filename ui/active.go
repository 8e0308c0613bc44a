package ui

import "github.com/vugu/vugu"

// Compute forgets the pasted texts while the view's tab is not selected: its boxes are not
// built then, and come back empty (their text is never sent back through the renderer, see
// data-view.vugu), so reading them must not find a text the user no longer sees.
func (c *DataView) Compute(vugu.ComputeCtx) {
	if !c.Active {
		c.design.text, c.signal.text = "", ""
	}
}
