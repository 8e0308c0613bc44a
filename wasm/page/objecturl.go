//go:build js && wasm

package page

import (
	"errors"
	"fmt"
	"math"
	"sync"

	"github.com/hack-pad/safejs"
)

// ObjectURL holds data in a Blob and returns its blob: URL, for an <img src> that would be
// too long as a data: URL (the page's renderer passes every attribute through a 16 KB
// buffer, and a figure's SVG is often larger) and for downloads. The URL stays valid until
// RevokeObjectURL.
func (b *browser) ObjectURL(mime string, data []byte) (string, error) {
	fail := func(err error) (string, error) {
		return "", fmt.Errorf("holding %d bytes of %s: %w", len(data), mime, err)
	}
	u8c, err := global("Uint8Array")
	if err != nil {
		return fail(err)
	}
	u8, err := u8c.New(len(data))
	if err != nil {
		return fail(err)
	}
	if _, err := safejs.CopyBytesToJS(u8, data); err != nil {
		return fail(err)
	}
	blobc, err := global("Blob")
	if err != nil {
		return fail(err)
	}
	parts, err := safejs.ValueOf([]any{safejs.Unsafe(u8)})
	if err != nil {
		return fail(err)
	}
	blob, err := blobc.New(parts, map[string]any{"type": mime})
	if err != nil {
		return fail(err)
	}
	urlc, err := global("URL")
	if err != nil {
		return fail(err)
	}
	href, err := urlc.Call("createObjectURL", blob)
	if err != nil {
		return fail(err)
	}
	s, err := href.String()
	if err != nil {
		return fail(err)
	}
	return s, nil
}

// RevokeObjectURL releases a URL made by ObjectURL. Special cases are: any other text is
// ignored by the browser.
func (b *browser) RevokeObjectURL(u string) {
	if urlc, err := global("URL"); err == nil {
		_, _ = urlc.Call("revokeObjectURL", u)
	}
}

// SVGToPNG loads svg as an image from a blob: URL (the page's content policy allows img-src
// blob:), draws it on a canvas filled white at scale device pixels per CSS pixel, and encodes
// the canvas with toBlob("image/png"). Rendering the PNG in the browser keeps gonum/plot's
// raster backend and its fonts out of the page's WebAssembly. done is called once, under the
// render lock.
func (b *browser) SVGToPNG(svg []byte, scale float64, done func([]byte, error)) {
	var once sync.Once
	finish := func(png []byte, err error) {
		once.Do(func() {
			if err != nil {
				err = fmt.Errorf("drawing the figure as PNG: %w", err)
			}
			b.locked(func() { done(png, err) })
		})
	}
	if !(scale > 0 && scale <= 8) {
		finish(nil, fmt.Errorf("scale: in (0, 8], not %v", scale))
		return
	}
	url, err := b.ObjectURL("image/svg+xml", svg)
	if err != nil {
		finish(nil, err)
		return
	}
	imgc, err := global("Image")
	var img safejs.Value
	if err == nil {
		img, err = imgc.New()
	}
	if err != nil {
		b.RevokeObjectURL(url)
		finish(nil, err)
		return
	}
	var onLoad, onError safejs.Func
	release := func() {
		b.RevokeObjectURL(url)
		_ = img.Set("onload", nil)
		_ = img.Set("onerror", nil)
		onLoad.Release()
		onError.Release()
	}
	onLoad, err = safejs.FuncOf(func(safejs.Value, []safejs.Value) any {
		err := drawPNG(img, scale, finish)
		go release()
		if err != nil {
			finish(nil, err)
		}
		return nil
	})
	if err == nil {
		onError, err = safejs.FuncOf(func(safejs.Value, []safejs.Value) any {
			go release()
			finish(nil, errors.New("the browser could not read the SVG image"))
			return nil
		})
	}
	if err == nil {
		err = errors.Join(img.Set("onload", onLoad), img.Set("onerror", onError), img.Set("src", url))
	}
	if err != nil {
		release()
		finish(nil, err)
	}
}

// drawPNG draws the loaded img on a white canvas scale times its natural size and has the
// canvas encode it; finish receives the PNG's bytes or the reason there are none.
func drawPNG(img safejs.Value, scale float64, finish func([]byte, error)) error {
	size := func(name string) (int, error) {
		v, err := img.Get(name)
		if err != nil {
			return 0, err
		}
		f, err := v.Float()
		if err != nil {
			return 0, err
		}
		n := int(math.Round(f * scale))
		if n < 1 || n > 16384 {
			return 0, fmt.Errorf("a PNG %d pixels across is not drawn", n)
		}
		return n, nil
	}
	w, err := size("naturalWidth")
	if err != nil {
		return err
	}
	h, err := size("naturalHeight")
	if err != nil {
		return err
	}
	doc, err := global("document")
	if err != nil {
		return err
	}
	canvas, err := doc.Call("createElement", "canvas")
	if err != nil {
		return err
	}
	if err := errors.Join(canvas.Set("width", w), canvas.Set("height", h)); err != nil {
		return err
	}
	ctx, err := canvas.Call("getContext", "2d")
	if err != nil || ctx.IsNull() {
		return errors.New("the browser offers no canvas to draw on")
	}
	// A transparent background would show a viewer's own colour behind the axes.
	if err := ctx.Set("fillStyle", "#ffffff"); err != nil {
		return err
	}
	if _, err := ctx.Call("fillRect", 0, 0, w, h); err != nil {
		return err
	}
	if _, err := ctx.Call("drawImage", img, 0, 0, w, h); err != nil {
		return err
	}
	var onBlob safejs.Func
	onBlob, err = safejs.FuncOf(func(_ safejs.Value, args []safejs.Value) any {
		go onBlob.Release()
		if len(args) == 0 || args[0].IsNull() || args[0].IsUndefined() {
			finish(nil, errors.New("the browser could not encode the canvas as PNG"))
			return nil
		}
		p, err := args[0].Call("arrayBuffer")
		if err != nil {
			finish(nil, err)
			return nil
		}
		then(p, func(buf safejs.Value) {
			finish(bytesOf(buf))
		}, func(err error) { finish(nil, err) })
		return nil
	})
	if err != nil {
		return err
	}
	if _, err := canvas.Call("toBlob", onBlob, "image/png"); err != nil {
		onBlob.Release()
		return err
	}
	return nil
}

// bytesOf copies an ArrayBuffer into Go.
func bytesOf(buf safejs.Value) ([]byte, error) {
	u8c, err := global("Uint8Array")
	if err != nil {
		return nil, err
	}
	u8, err := u8c.New(buf)
	if err != nil {
		return nil, err
	}
	n, err := u8.Length()
	if err != nil {
		return nil, err
	}
	data := make([]byte, n)
	if _, err := safejs.CopyBytesToGo(data, u8); err != nil {
		return nil, err
	}
	return data, nil
}
