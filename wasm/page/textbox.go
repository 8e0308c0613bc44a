//go:build js && wasm

package page

import (
	"errors"
	"fmt"

	"github.com/hack-pad/safejs"
)

// installTextGuard defines the hdriskText property of text inputs and text areas, which ui
// binds in place of value. The renderer sets every bound property at every render; set on
// value, a render that carries the text of one key would overwrite a box in which the user
// has typed the next keys already, and lose them. hdriskText writes value only when the
// page's text for the box differs from what the page last wrote and from what the box last
// reported itself (an input listener records the box's own text at every key), so a box the
// user is typing in is never rewritten, while a text the page changes (a link opened, an
// example) still goes in. The page's Content Security Policy allows no script from text, so
// the property is made of Go functions.
func installTextGuard() error {
	global := safejs.Global()
	object, err := global.Get("Object")
	if err != nil {
		return fmt.Errorf("page: text guard: %w", err)
	}
	setter, err := safejs.FuncOf(func(this safejs.Value, args []safejs.Value) any {
		if len(args) < 1 {
			return nil
		}
		v, err := args[0].String()
		if err != nil {
			return nil
		}
		if last, err := this.Get("_hdriskLast"); err == nil && last.Type() == safejs.TypeString {
			if s, _ := last.String(); s == v {
				return nil
			}
		}
		_ = this.Set("_hdriskLast", v)
		if cur, err := this.Get("value"); err == nil {
			if s, _ := cur.String(); s != v {
				_ = this.Set("value", v)
			}
		}
		return nil
	})
	if err != nil {
		return fmt.Errorf("page: text guard: %w", err)
	}
	getter, err := safejs.FuncOf(func(this safejs.Value, _ []safejs.Value) any {
		v, err := this.Get("value")
		if err != nil {
			return nil
		}
		return v
	})
	if err != nil {
		return fmt.Errorf("page: text guard: %w", err)
	}
	var errs []error
	for _, name := range []string{"HTMLInputElement", "HTMLTextAreaElement"} {
		ctor, err := global.Get(name)
		if err != nil {
			errs = append(errs, err)
			continue
		}
		proto, err := ctor.Get("prototype")
		if err != nil {
			errs = append(errs, err)
			continue
		}
		desc, err := object.New()
		if err == nil {
			err = errors.Join(desc.Set("configurable", true), desc.Set("get", getter), desc.Set("set", setter))
		}
		if err == nil {
			_, err = object.Call("defineProperty", proto, "hdriskText", desc)
		}
		errs = append(errs, err)
	}
	onInput, err := safejs.FuncOf(func(_ safejs.Value, args []safejs.Value) any {
		if len(args) < 1 {
			return nil
		}
		t, err := args[0].Get("target")
		if err != nil || t.IsNull() || t.IsUndefined() {
			return nil
		}
		if v, err := t.Get("value"); err == nil && v.Type() == safejs.TypeString {
			_ = t.Set("_hdriskLast", v)
		}
		return nil
	})
	if err == nil {
		var doc safejs.Value
		if doc, err = global.Get("document"); err == nil {
			_, err = doc.Call("addEventListener", "input", onInput, true)
		}
	}
	if err = errors.Join(append(errs, err)...); err != nil {
		return fmt.Errorf("page: text guard: %w", err)
	}
	return nil
}
