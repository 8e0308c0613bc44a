//go:build js && wasm

// Package page runs the vugu interface of ui/ in the browser and connects it to the compute
// workers of package pool.
package page

import (
	"encoding/json"
	"errors"
	"fmt"
	"os"

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
	root := &ui.Root{Model: ui.NewModel(), Eval: &evaluator{env: env}, Browser: newBrowser(env)}
	started := false
	for ok := true; ok; ok = renderer.EventWait() {
		// Building reads the components, which evaluations change under the write lock.
		env.RLock()
		out, state := build.RunBuild(root), root.State()
		env.RUnlock()
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
}

// Evaluate implements ui.Evaluator. The job runs on a goroutine of its own, which the Go
// scheduler starts once the render loop waits for events. Cancel is called under the render
// lock and done is called under it, so the cancelled flag needs no lock of its own.
func (e *evaluator) Evaluate(scenario []byte, done func(ui.Figures, error)) func() {
	cancelled := false
	args, err := json.Marshal(job.EvalArgs{Scenario: scenario})
	go func() {
		var f ui.Figures
		if err == nil {
			var last job.Reply
			job.Run(job.Request{Kind: "eval", Args: args}, func(r job.Reply) { last = r })
			switch {
			case last.Type == job.Failed:
				err = errors.New(last.Error)
			default:
				err = json.Unmarshal(last.Result, &f)
			}
		}
		e.env.Lock()
		defer e.env.UnlockRender()
		if !cancelled {
			done(f, err)
		}
	}()
	return func() { cancelled = true }
}
