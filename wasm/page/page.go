//go:build js && wasm

// Package page runs the vugu interface of ui/ in the browser and connects it to the compute
// workers of package pool.
package page

import (
	"fmt"
	"os"
	"sync"
	"time"

	"github.com/hack-pad/safejs"
	"github.com/vugu/vugu"
	"github.com/vugu/vugu/domrender"

	"hdrisk/ui"
	"hdrisk/wasm/job"
	"hdrisk/wasm/pool"
)

// Run mounts the interface on #hdrisk and renders until the page goes away.
func Run() error {
	boot, err := pool.ReadBoot()
	if err != nil {
		return err
	}
	if err := installTextGuard(); err != nil {
		return err
	}
	renderer, err := domrender.New("#hdrisk")
	if err != nil {
		return fmt.Errorf("page: renderer: %w", err)
	}
	defer renderer.Release()
	env := renderer.EventEnv()
	build, err := vugu.NewBuildEnv(env)
	if err != nil {
		return fmt.Errorf("page: build: %w", err)
	}
	eval := &evaluator{env: env}
	root := &ui.Root{Model: ui.NewModel(), Eval: eval, Browser: newBrowser(env)}
	started := false
	for ok := true; ok; ok = renderer.EventWait() {
		eval.settle(quickFigures)
		// Building reads the components, which evaluations change under the write lock.
		var out *vugu.BuildResults
		var state string
		pass := func() {
			env.RLock()
			eval.building(func() { out, state = build.RunBuild(root), root.State() })
			env.RUnlock()
		}
		pass()
		if !started && state == "busy" {
			// The first build starts the first evaluation: the first render, which makes
			// the whole page, waits for its figures rather than being made twice.
			eval.settle(firstFigures)
			pass()
		}
		if err := renderer.Render(out); err != nil {
			return fmt.Errorf("page: render: %w", err)
		}
		if !started && state != "busy" {
			pool.Mark("hdrisk:first-result")
			// Workers start only once the first figures are on screen: on a machine with
			// few cores, starting them earlier delays those figures, which do not need them.
			// Without workers the figures still work; only the heavy jobs are missing, so
			// a failure here is reported on the console, not in place of the page.
			workers, err := pool.New(boot, 0)
			if err == nil {
				err = exposeJobs(workers)
				env.Lock()
				root.Jobs = &jobs{pool: workers, env: env}
				env.UnlockRender()
			}
			if err != nil {
				fmt.Fprintln(os.Stderr, "hdrisk: compute workers unavailable:", err)
			}
			started = true
		}
	}
	return nil
}

// Fail shows err in place of the interface and sets data-state="error" (contract 4).
// The message goes in as text, never as markup.
func Fail(err error) {
	doc, e := safejs.Global().Get("document")
	if e != nil {
		return
	}
	root, e := doc.Call("getElementById", "hdrisk")
	if e != nil || root.IsNull() {
		return
	}
	_, _ = root.Call("setAttribute", "data-state", "error")
	p, e := doc.Call("createElement", "p")
	if e != nil {
		return
	}
	_ = p.Set("className", "problem")
	_ = p.Set("textContent", "The calculator could not start: "+err.Error())
	_, _ = root.Call("replaceChildren", p)
}

// evaluator runs the "eval" job for ui.Root inside the page's own program: one fixed point
// takes microseconds, far less than a round trip to a worker that may still be starting, so
// the first figures appear as soon as the page has rendered. Heavy kinds (sweeps, maps,
// finite-size checks) go to the worker pool.
type evaluator struct {
	env vugu.EventEnv

	mu      sync.Mutex
	running int           // evaluations started and not yet ended, cancelled ones included
	waiting chan struct{} // closed when the last running evaluation ends while the loop waits
	builds  int           // builds of the page begun
	inBuild bool          // a build is under way (a component's Init may start an evaluation)
}

// building runs the build f, counted (see Evaluate).
func (e *evaluator) building(f func()) {
	e.mu.Lock()
	e.builds++
	e.inBuild = true
	e.mu.Unlock()
	f()
	e.mu.Lock()
	e.inBuild = false
	e.mu.Unlock()
}

// quickFigures is how long the render loop waits for the figures of an edit before it
// renders the page busy. Each render costs the page tens of milliseconds; an edit whose
// figures come within this time is rendered once, with them, instead of twice.
const quickFigures = 100 * time.Millisecond

// firstFigures is how long the first render waits for the first figures.
const firstFigures = 500 * time.Millisecond

// settle waits up to d for the running evaluations to end. It is called by the render loop
// without the render lock, so that the evaluations can take it to report.
func (e *evaluator) settle(d time.Duration) {
	e.mu.Lock()
	if e.running == 0 {
		e.mu.Unlock()
		return
	}
	w := make(chan struct{})
	e.waiting = w
	e.mu.Unlock()
	t := time.NewTimer(d)
	defer t.Stop()
	select {
	case <-w:
	case <-t.C:
	}
	e.mu.Lock()
	if e.waiting == w {
		e.waiting = nil
	}
	e.mu.Unlock()
}

// Evaluate implements ui.Evaluator. The job runs on a goroutine of its own, which the Go
// scheduler starts once the render loop waits for events. Cancel is called under the render
// lock and done is called under it, so the cancelled flag needs no lock of its own.
// The end of an evaluation asks for a render only when no render is to come that shows it:
// an evaluation started by an event (an edit) has that event's render still to come unless
// a build began since, and the render loop waiting for it (see settle) builds next; a
// cancelled evaluation changes nothing on the page.
func (e *evaluator) Evaluate(chk ui.Checked, done func(ui.Figures, error)) func() {
	cancelled := false
	e.mu.Lock()
	e.running++
	fromEvent, builds := !e.inBuild, e.builds
	e.mu.Unlock()
	go func() {
		r, err := job.EvalChecked(chk.Engine)
		f := ui.FiguresOf(r)
		e.env.Lock()
		shown := !cancelled
		if shown {
			done(f, err)
		}
		e.mu.Lock()
		e.running--
		w := e.waiting
		if e.running > 0 {
			w = nil
		} else {
			e.waiting = nil
		}
		coming := fromEvent && e.builds == builds
		e.mu.Unlock()
		switch {
		case w != nil:
			e.env.UnlockOnly()
			close(w)
		case shown && !coming:
			e.env.UnlockRender()
		default:
			e.env.UnlockOnly()
		}
	}()
	return func() { cancelled = true }
}
