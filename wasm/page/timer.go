//go:build js && wasm

package page

import (
	"time"

	"hdrisk/ui"
)

// After implements ui.Timer: f runs on a goroutine of its own with the render lock held, and
// the page renders afterwards if f asks for it.
func (b *browser) After(d time.Duration, f func() bool) func() {
	t := time.AfterFunc(d, func() {
		b.env.Lock()
		if f() {
			b.env.UnlockRender()
			return
		}
		b.env.UnlockOnly()
	})
	return func() { t.Stop() }
}

var _ ui.Timer = (*browser)(nil)
