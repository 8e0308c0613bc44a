//go:build js && wasm

package page

// SetStyle sets one property of the style of the element with the given id through the CSS
// object model (element.style.setProperty), which the page's content policy allows where
// it refuses style attributes. Special cases are: a missing element is ignored.
func (b *browser) SetStyle(id, property, value string) {
	doc, err := global("document")
	if err != nil {
		return
	}
	el, err := doc.Call("getElementById", id)
	if err != nil || el.IsNull() || el.IsUndefined() {
		return
	}
	st, err := el.Get("style")
	if err != nil {
		return
	}
	_, _ = st.Call("setProperty", property, value)
}
