//go:build js && wasm

package page

import (
	"fmt"

	"github.com/hack-pad/safejs"
)

// ObjectURL holds data in a Blob and returns its blob: URL, for an <img src> that would be
// too long as a data: URL: the page's renderer passes every attribute through a 16 KB
// buffer, and a figure's SVG is often larger. The URL stays valid until RevokeObjectURL.
func (b *browser) ObjectURL(mime string, data []byte) (string, error) {
	fail := func(err error) (string, error) { return "", fmt.Errorf("holding a %s image: %w", mime, err) }
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
