//go:build js && wasm

package page

import (
	"errors"
	"fmt"

	"github.com/hack-pad/safejs"
)

// maxEchoes bounds the texts a box remembers between two writes of the page; past it the
// oldest echoes are forgotten, which only a page that never renders could reach.
const maxEchoes = 4096

// installTextGuard defines the hdriskText property of text inputs and text areas, which ui
// binds in place of value. The renderer sets every bound property at every render; set on
// value, a render made for one key (it may come after the next keys are in the box) would
// overwrite the box and lose them. hdriskText ignores a text the box itself reported since
// the page last wrote it (an input listener records each), since that is an echo of the
// user's own typing, old or new; any other text (a link opened, an example) goes in and
// clears the record. The page's Content Security Policy allows no script from text, so the
// property is made of Go functions.
func installTextGuard() error {
	global := safejs.Global()
	object, err := global.Get("Object")
	if err != nil {
		return fmt.Errorf("page: text guard: %w", err)
	}
	setCtor, err := global.Get("Set")
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
		if echoes, err := this.Get("_hdriskEchoes"); err == nil && !echoes.IsUndefined() && !echoes.IsNull() {
			if has, err := echoes.Call("has", v); err == nil {
				if yes, _ := has.Bool(); yes {
					return nil
				}
			}
		}
		_ = this.Set("_hdriskEchoes", safejs.Undefined())
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
		v, err := t.Get("value")
		if err != nil || v.Type() != safejs.TypeString {
			return nil
		}
		echoes, err := t.Get("_hdriskEchoes")
		if err != nil {
			return nil
		}
		if n, err := echoes.Get("size"); echoes.IsUndefined() || echoes.IsNull() || err != nil || func() bool { k, _ := n.Int(); return k > maxEchoes }() {
			if echoes, err = setCtor.New(); err != nil {
				return nil
			}
			_ = t.Set("_hdriskEchoes", echoes)
		}
		_, _ = echoes.Call("add", v)
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
