//go:build js && wasm

package page

import (
	"errors"
	"fmt"
	"os"
	"strings"
	"sync"

	"github.com/hack-pad/safejs"
	"github.com/vugu/vugu"

	"hdrisk/ui"
)

// CopyFieldAttr marks the read-only field that shows the text offered for copying. When the
// clipboard is refused (file:// pages, a denied permission, an old browser), Copy selects that
// field's text so that the user can copy it with the keyboard.
const CopyFieldAttr = "data-copy-field"

// browser implements ui.Browser over safejs: every call into JavaScript returns an error
// instead of panicking, and callbacks reach the interface on a goroutine of their own under
// the render lock, never inside a browser event (where blocking on the lock would stall the
// event loop).
type browser struct {
	env vugu.EventEnv

	mu       sync.Mutex
	lastFrag string // the fragment last set or reported, so popstate and hashchange report a move once
	onFrag   func(string)
}

func newBrowser(env vugu.EventEnv) *browser {
	b := &browser{env: env}
	b.lastFrag = b.Fragment()
	return b
}

// locked runs f on a goroutine of its own with the render lock held and renders afterwards.
func (b *browser) locked(f func()) {
	go func() {
		b.env.Lock()
		defer b.env.UnlockRender()
		f()
	}()
}

func global(path ...string) (safejs.Value, error) {
	v := safejs.Global()
	for _, p := range path {
		var err error
		if v, err = v.Get(p); err != nil {
			return v, fmt.Errorf("%s: %w", strings.Join(path, "."), err)
		}
		if v.IsUndefined() || v.IsNull() {
			return v, fmt.Errorf("%s: not available in this browser", strings.Join(path, "."))
		}
	}
	return v, nil
}

func str(v safejs.Value, err error) string {
	if err != nil {
		return ""
	}
	s, err := v.String()
	if err != nil {
		return ""
	}
	return s
}

// Address returns location.href without its fragment.
func (b *browser) Address() string {
	href := str(global("location", "href"))
	if i := strings.IndexByte(href, '#'); i >= 0 {
		href = href[:i]
	}
	return href
}

// Fragment returns location.hash without its '#'.
func (b *browser) Fragment() string {
	return strings.TrimPrefix(str(global("location", "hash")), "#")
}

// SetFragment writes frag through history.pushState or replaceState, which change the address
// without a hashchange event or a reload. An empty frag leaves the address without a fragment.
// Special cases are: a browser that refuses (some file:// settings) leaves the address as it
// was and says so on the console.
func (b *browser) SetFragment(frag string, push bool) {
	b.mu.Lock()
	b.lastFrag = frag
	b.mu.Unlock()
	url := "#" + frag
	if frag == "" {
		url = str(global("location", "pathname")) + str(global("location", "search"))
	}
	method := "replaceState"
	if push {
		method = "pushState"
	}
	h, err := global("history")
	if err == nil {
		_, err = h.Call(method, nil, "", url)
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, "hdrisk: address bar:", err)
	}
}

// OnFragment listens to popstate (back, forward) and hashchange (an edited address). Both
// may fire for one move; the fragment is reported once.
func (b *browser) OnFragment(f func(string)) {
	b.mu.Lock()
	first := b.onFrag == nil
	b.onFrag = f
	b.mu.Unlock()
	if !first {
		return
	}
	fn, err := safejs.FuncOf(func(safejs.Value, []safejs.Value) any {
		frag := b.Fragment()
		b.mu.Lock()
		same := frag == b.lastFrag
		b.lastFrag = frag
		f := b.onFrag
		b.mu.Unlock()
		if !same {
			b.locked(func() { f(frag) })
		}
		return nil
	})
	if err == nil {
		var w safejs.Value
		if w, err = global(); err == nil {
			_, err = w.Call("addEventListener", "popstate", fn)
			if err == nil {
				_, err = w.Call("addEventListener", "hashchange", fn)
			}
		}
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, "hdrisk: history:", err)
	}
}

// then waits for a JavaScript promise and calls ok or fail (with the rejection's text) on
// a goroutine of its own. Special cases are: a value that is not a promise fails at once.
func then(p safejs.Value, ok func(safejs.Value), fail func(error)) {
	var onOK, onErr safejs.Func
	release := func() {
		onOK.Release()
		onErr.Release()
	}
	var err error
	onOK, err = safejs.FuncOf(func(_ safejs.Value, args []safejs.Value) any {
		v := safejs.Undefined()
		if len(args) > 0 {
			v = args[0]
		}
		go func() { release(); ok(v) }()
		return nil
	})
	if err != nil {
		fail(err)
		return
	}
	onErr, err = safejs.FuncOf(func(_ safejs.Value, args []safejs.Value) any {
		msg := "refused"
		if len(args) > 0 {
			if m := str(args[0].Get("message")); m != "" {
				msg = m
			} else if s, e := args[0].String(); e == nil {
				msg = s
			}
		}
		go func() { release(); fail(errors.New(msg)) }()
		return nil
	})
	if err != nil {
		onOK.Release()
		fail(err)
		return
	}
	if _, err := p.Call("then", onOK, onErr); err != nil {
		release()
		fail(err)
	}
}

// Copy writes text with navigator.clipboard.writeText. Where that is missing or refused, it
// selects the text in the page's field marked data-copy-field (the link shown read-only),
// tries the older copy command on that selection, and otherwise reports an error telling the
// user to press the copy key: the text is then selected and ready.
func (b *browser) Copy(text string, done func(error)) {
	report := func(err error) { b.locked(func() { done(err) }) }
	fallback := func(why error) {
		b.locked(func() { done(b.selectField(text, why)) })
	}
	clip, err := global("navigator", "clipboard")
	if err != nil {
		fallback(err)
		return
	}
	p, err := clip.Call("writeText", text)
	if err != nil {
		fallback(err)
		return
	}
	then(p, func(safejs.Value) { report(nil) }, fallback)
}

// selectField selects the copy field holding text and tries document.execCommand("copy").
// It runs under the render lock, after vugu has put the text in the field.
func (b *browser) selectField(text string, why error) error {
	refused := fmt.Errorf("the browser did not let the page use the clipboard (%v); the link is selected in the box: press Ctrl+C (⌘C on a Mac) to copy it", why)
	doc, err := global("document")
	if err != nil {
		return refused
	}
	el, err := doc.Call("querySelector", "["+CopyFieldAttr+"]")
	if err != nil || el.IsNull() || el.IsUndefined() {
		return refused
	}
	if v := str(el.Get("value")); v != text {
		_ = el.Set("value", text)
	}
	_, _ = el.Call("focus")
	if _, err := el.Call("select"); err != nil {
		return refused
	}
	if ok, err := doc.Call("execCommand", "copy"); err == nil {
		if yes, _ := ok.Bool(); yes {
			return nil
		}
	}
	return refused
}

func storage() (safejs.Value, error) {
	// Reading window.localStorage itself throws in some file:// and privacy settings.
	return global("localStorage")
}

// Load reads key from localStorage. Special cases are: storage that is missing or throws
// reads as absent.
func (b *browser) Load(key string) (string, bool) {
	s, err := storage()
	if err != nil {
		return "", false
	}
	v, err := s.Call("getItem", key)
	if err != nil || v.IsNull() || v.IsUndefined() {
		return "", false
	}
	text, err := v.String()
	return text, err == nil
}

// Store writes key to localStorage. Special cases are: storage that is missing, refused or
// full is an error saying so.
func (b *browser) Store(key, value string) error {
	s, err := storage()
	if err != nil {
		return fmt.Errorf("this browser keeps no local storage for the page: %w", err)
	}
	if _, err := s.Call("setItem", key, value); err != nil {
		return fmt.Errorf("the browser refused to keep %d characters in local storage: %w", len(value), err)
	}
	return nil
}

// Download offers data as a file through a Blob, an object URL and a temporary <a download>
// clicked once; the URL is revoked a minute later, when the browser has long read it.
func (b *browser) Download(name, mime string, data []byte) error {
	fail := func(err error) error { return fmt.Errorf("saving %s: %w", name, err) }
	href, err := b.ObjectURL(mime, data)
	if err != nil {
		return fail(err)
	}
	doc, err := global("document")
	if err != nil {
		return fail(err)
	}
	body, err := global("document", "body")
	if err != nil {
		return fail(err)
	}
	a, err := doc.Call("createElement", "a")
	if err == nil {
		err = errors.Join(a.Set("href", href), a.Set("download", name), a.Set("hidden", true))
	}
	if err == nil {
		_, err = body.Call("appendChild", a)
	}
	if err == nil {
		_, err = a.Call("click")
		_, _ = a.Call("remove")
	}
	var revoke safejs.Func
	revoke, ferr := safejs.FuncOf(func(safejs.Value, []safejs.Value) any {
		b.RevokeObjectURL(href)
		go revoke.Release()
		return nil
	})
	if ferr == nil {
		if w, e := global(); e == nil {
			_, _ = w.Call("setTimeout", revoke, 60000)
		}
	}
	if err != nil {
		return fail(err)
	}
	return nil
}

// ReadFile reads the first file chosen in the input with id inputID through File.arrayBuffer,
// after checking its size against limit, and clears the input so that choosing the same file
// again reads it again.
func (b *browser) ReadFile(inputID string, limit int64, done func(name string, data []byte, err error)) {
	finish := func(name string, data []byte, err error) { b.locked(func() { done(name, data, err) }) }
	doc, err := global("document")
	if err != nil {
		finish("", nil, err)
		return
	}
	input, err := doc.Call("getElementById", inputID)
	if err != nil || input.IsNull() || input.IsUndefined() {
		finish("", nil, fmt.Errorf("no file box %q on the page", inputID))
		return
	}
	files, err := input.Get("files")
	n := 0
	if err == nil && !files.IsNull() && !files.IsUndefined() {
		n, err = files.Length()
	}
	if err != nil || n == 0 {
		finish("", nil, errors.New("no file was chosen"))
		return
	}
	f, err := files.Index(0)
	if err != nil {
		finish("", nil, err)
		return
	}
	name := str(f.Get("name"))
	_ = input.Set("value", "")
	sizeV, err := f.Get("size")
	var size float64
	if err == nil {
		size, err = sizeV.Float()
	}
	if err != nil {
		finish(name, nil, fmt.Errorf("%s: the browser did not tell the file's size: %w", name, err))
		return
	}
	if size > float64(limit) {
		finish(name, nil, fmt.Errorf("%s is %.0f bytes, more than the %d bytes accepted; nothing was read", name, size, limit))
		return
	}
	p, err := f.Call("arrayBuffer")
	if err != nil {
		finish(name, nil, fmt.Errorf("%s: the browser cannot read files here: %w", name, err))
		return
	}
	then(p, func(buf safejs.Value) {
		u8c, err := global("Uint8Array")
		var u8 safejs.Value
		if err == nil {
			u8, err = u8c.New(buf)
		}
		var data []byte
		if err == nil {
			var n int
			if n, err = u8.Length(); err == nil {
				if int64(n) > limit {
					err = fmt.Errorf("it is %d bytes, more than the %d bytes accepted", n, limit)
				} else {
					data = make([]byte, n)
					_, err = safejs.CopyBytesToGo(data, u8)
				}
			}
		}
		if err != nil {
			finish(name, nil, fmt.Errorf("%s: %w", name, err))
			return
		}
		finish(name, data, nil)
	}, func(err error) { finish(name, nil, fmt.Errorf("%s could not be read: %w", name, err)) })
}

// InputText implements ui.InputReader. A textarea tells its text's length (textLength)
// without handing over the text, which is then read only when it is at most limit UTF-16
// code units long; for other inputs the text is read and its UTF-8 length counted.
func (b *browser) InputText(id string, limit int) (string, int, error) {
	doc, err := global("document")
	if err != nil {
		return "", 0, err
	}
	el, err := doc.Call("getElementById", id)
	if err != nil || el.IsNull() || el.IsUndefined() {
		return "", 0, fmt.Errorf("no box %q on the page", id)
	}
	if lv, err := el.Get("textLength"); err == nil && lv.Type() == safejs.TypeNumber {
		if n, err := lv.Int(); err == nil && n > limit {
			return "", n, nil
		}
	}
	text := str(el.Get("value"))
	if len(text) > limit {
		return "", len(text), nil
	}
	return text, len(text), nil
}

// ClearInput implements ui.InputReader.
func (b *browser) ClearInput(id string) {
	if doc, err := global("document"); err == nil {
		if el, err := doc.Call("getElementById", id); err == nil && !el.IsNull() && !el.IsUndefined() {
			_ = el.Set("value", "")
		}
	}
}

// SetInput implements ui.InputWriter.
func (b *browser) SetInput(id, text string) {
	if doc, err := global("document"); err == nil {
		if el, err := doc.Call("getElementById", id); err == nil && !el.IsNull() && !el.IsUndefined() {
			if str(el.Get("value")) != text {
				_ = el.Set("value", text)
			}
		}
	}
}

var (
	_ ui.Browser     = (*browser)(nil)
	_ ui.InputReader = (*browser)(nil)
	_ ui.InputWriter = (*browser)(nil)
)
