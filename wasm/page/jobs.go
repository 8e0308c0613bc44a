//go:build js && wasm

package page

import (
	"encoding/json"
	"sync"
	"time"

	"github.com/vugu/vugu"

	"hdrisk/wasm/pool"
)

// progressEvery is the shortest time between two progress reports of one job: each costs the
// page a render, and about ten a second is as often as anyone reads a count.
const progressEvery = 100 * time.Millisecond

// jobs implements ui.Jobs over the worker pool, calling back under the render lock so that
// components may change their state directly.
type jobs struct {
	pool *pool.Pool
	env  vugu.EventEnv
}

// Start implements ui.Jobs. Progress is thinned to one report per progressEvery, always the
// latest: a report that comes sooner waits for the rest of the interval and is replaced by
// any that comes meanwhile.
func (j *jobs) Start(kind string, args any, progress func(done, total int), done func([]byte, error)) func() {
	// cancelled and finished are read and written under the render lock only.
	cancelled, finished := false, false
	var onProgress func(int, int)
	var stopProgress func()
	if progress != nil {
		var mu sync.Mutex
		var last time.Time
		var timer *time.Timer
		var d, t int
		show := func() {
			mu.Lock()
			dd, tt := d, t
			timer, last = nil, time.Now()
			mu.Unlock()
			j.env.Lock()
			if cancelled || finished {
				j.env.UnlockOnly()
				return
			}
			progress(dd, tt)
			j.env.UnlockRender()
		}
		onProgress = func(dn, tn int) {
			mu.Lock()
			d, t = dn, tn
			if timer != nil {
				mu.Unlock()
				return
			}
			if wait := progressEvery - time.Since(last); wait > 0 {
				timer = time.AfterFunc(wait, show)
				mu.Unlock()
				return
			}
			mu.Unlock()
			show()
		}
		stopProgress = func() {
			mu.Lock()
			if timer != nil {
				timer.Stop()
				timer = nil
			}
			mu.Unlock()
		}
	}
	t := j.pool.Start(kind, args, onProgress, func(res json.RawMessage, err error) {
		if stopProgress != nil {
			stopProgress()
		}
		j.env.Lock()
		defer j.env.UnlockRender()
		if !cancelled {
			finished = true
			done(res, err)
		}
	})
	// Called under the render lock, like the callbacks, so the flag needs no lock of its own.
	return func() {
		cancelled = true
		if stopProgress != nil {
			stopProgress()
		}
		t.Cancel()
	}
}

// Size is the number of workers, so that a view can share one job's work between them
// (the finite-size check's trials).
func (j *jobs) Size() int { return j.pool.Size() }
