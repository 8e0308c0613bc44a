//go:build js && wasm

package page

import (
	"encoding/json"

	"github.com/vugu/vugu"

	"hdrisk/wasm/pool"
)

// jobs implements ui.Jobs over the worker pool, calling back under the render lock so that
// components may change their state directly.
type jobs struct {
	pool *pool.Pool
	env  vugu.EventEnv
}

func (j *jobs) Start(kind string, args any, progress func(done, total int), done func([]byte, error)) func() {
	cancelled := false
	var onProgress func(int, int)
	if progress != nil {
		onProgress = func(d, t int) {
			j.env.Lock()
			defer j.env.UnlockRender()
			if !cancelled {
				progress(d, t)
			}
		}
	}
	t := j.pool.Start(kind, args, onProgress, func(res json.RawMessage, err error) {
		j.env.Lock()
		defer j.env.UnlockRender()
		if !cancelled {
			done(res, err)
		}
	})
	// Called under the render lock, like the callbacks, so the flag needs no lock of its own.
	return func() {
		cancelled = true
		t.Cancel()
	}
}
