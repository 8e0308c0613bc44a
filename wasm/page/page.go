//go:build js && wasm

// Package page runs the vugu interface of ui/ in the browser and connects it to the compute
// workers of package pool.
package page

import (
	"encoding/json"
	"fmt"

	"github.com/hack-pad/safejs"
	"github.com/vugu/vugu"
	"github.com/vugu/vugu/domrender"

	"hdrisk/ui"
	"hdrisk/wasm/pool"
)

// Run mounts the interface on #hdrisk and renders until the page goes away.
func Run() error {
	boot, err := pool.ReadBoot()
	if err != nil {
		return err
	}
	workers, err := pool.New(boot, 0)
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
	root := &ui.Root{Model: ui.NewModel(), Eval: &evaluator{pool: workers, env: env}}
	for ok := true; ok; ok = renderer.EventWait() {
		if err := renderer.Render(build.RunBuild(root)); err != nil {
			return fmt.Errorf("page: render: %w", err)
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

// evaluator runs the "eval" job on the workers for ui.Root.
type evaluator struct {
	pool *pool.Pool
	env  vugu.EventEnv
}

// evalArgs are the arguments of the "eval" job (see wasm/job/eval.go).
type evalArgs struct {
	Scenario json.RawMessage `json:"scenario"`
}

// Evaluate implements ui.Evaluator. Cancel is called under the render lock and done is called
// under it, so the cancelled flag needs no lock of its own.
func (e *evaluator) Evaluate(scenario []byte, done func(ui.Figures, error)) func() {
	cancelled := false
	t := e.pool.Start("eval", evalArgs{Scenario: scenario}, nil, func(res json.RawMessage, err error) {
		var f ui.Figures
		if err == nil {
			if uerr := json.Unmarshal(res, &f); uerr != nil {
				err = fmt.Errorf("eval result: %w", uerr)
			}
		}
		e.env.Lock()
		defer e.env.UnlockRender()
		if !cancelled {
			done(f, err)
		}
	})
	return func() {
		cancelled = true
		t.Cancel()
	}
}
