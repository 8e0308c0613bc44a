//go:build js && wasm

package page

import (
	"github.com/hack-pad/safejs"

	"hdrisk/ui"
)

// GuardInput implements ui.InputGuard with listeners on the document in the capture phase:
// they run before the browser inserts a paste and before it lays out the new text, and they
// need no element, which the renderer makes anew each time the box's view is shown. The
// text itself never crosses into Go, only its length.
func (b *browser) GuardInput(id string, limit int, refused func(length int)) {
	doc, err := global("document")
	if err != nil {
		return
	}
	ours := func(args []safejs.Value) (ev, target safejs.Value, ok bool) {
		if len(args) == 0 {
			return ev, target, false
		}
		ev = args[0]
		target, err := ev.Get("target")
		if err != nil || target.IsNull() || target.IsUndefined() {
			return ev, target, false
		}
		return ev, target, str(target.Get("id")) == id
	}
	wrap, err := global("Object")
	if err != nil {
		return
	}
	length := func(v safejs.Value, err error) int {
		if err != nil || v.Type() != safejs.TypeNumber {
			return 0
		}
		n, _ := v.Int()
		return n
	}
	paste, err := safejs.FuncOf(func(_ safejs.Value, args []safejs.Value) any {
		ev, _, ok := ours(args)
		if !ok {
			return nil
		}
		data, err := ev.Get("clipboardData")
		if err != nil || data.IsNull() || data.IsUndefined() {
			return nil
		}
		text, err := data.Call("getData", "text/plain")
		if err != nil {
			return nil
		}
		// A string has a length but is no object, and only an object's properties can be
		// read from Go; its wrapper object has the same length, without copying the text.
		boxed, err := wrap.Invoke(text)
		if err != nil {
			return nil
		}
		if n := length(boxed.Get("length")); n > limit {
			_, _ = ev.Call("preventDefault")
			b.locked(func() { refused(n) })
		}
		return nil
	})
	if err != nil {
		return
	}
	input, err := safejs.FuncOf(func(_ safejs.Value, args []safejs.Value) any {
		_, target, ok := ours(args)
		if !ok {
			return nil
		}
		if n := length(target.Get("textLength")); n > limit {
			_ = target.Set("value", "")
			b.locked(func() { refused(n) })
		}
		return nil
	})
	if err != nil {
		return
	}
	_, _ = doc.Call("addEventListener", "paste", paste, true)
	_, _ = doc.Call("addEventListener", "input", input, true)
}

var _ ui.InputGuard = (*browser)(nil)
