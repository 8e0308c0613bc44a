//go:build js && wasm

package page

// ElementWidth returns the width of the element with the given id in CSS pixels (its
// clientWidth), for the figures that size themselves to stay readable; while the element is
// hidden (a tab's panel just chosen, not laid out yet), the width of its nearest shown
// ancestor. Special cases are: a missing element or a failed call give 0.
func (b *browser) ElementWidth(id string) float64 {
	doc, err := global("document")
	if err != nil {
		return 0
	}
	el, err := doc.Call("getElementById", id)
	if err != nil {
		return 0
	}
	if el.IsNull() || el.IsUndefined() {
		return 0
	}
	for range 8 {
		w, err := el.Get("clientWidth")
		if err != nil {
			return 0
		}
		v, err := w.Float()
		if err != nil {
			return 0
		}
		if v > 0 {
			return v
		}
		if el, err = el.Get("parentElement"); err != nil || el.IsNull() || el.IsUndefined() {
			return 0
		}
	}
	return 0
}
