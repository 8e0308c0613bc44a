//go:build js && wasm

package page

import (
	"encoding/json"
	"errors"
	"sync"

	"github.com/hack-pad/safejs"

	"hdrisk/wasm/pool"
)

// exposeJobs publishes the worker pool to the page's JavaScript as globalThis.hdriskJobs, for
// the browser test and for anyone trying a job kind from the developer console:
//
//	id = hdriskJobs.start(kind, argsJSON, onProgress(done, total), onDone(errorText, resultJSON))
//	hdriskJobs.cancel(id)   // terminates the worker running it and starts a fresh one
//	hdriskJobs.size()       // number of workers
//
// onDone gets an empty errorText on success. The page itself calls the pool from Go.
func exposeJobs(p *pool.Pool) error {
	var (
		mu    sync.Mutex
		tasks = map[int]*pool.Task{}
		next  int
	)
	call := func(f safejs.Value, args ...any) {
		if f.Type() == safejs.TypeFunction {
			_, _ = f.Invoke(args...)
		}
	}
	start, err := safejs.FuncOf(func(_ safejs.Value, args []safejs.Value) any {
		if len(args) < 4 {
			return -1
		}
		kind, err1 := args[0].String()
		text, err2 := args[1].String()
		onProgress, onDone := args[2], args[3]
		mu.Lock()
		next++
		id := next
		mu.Unlock()
		if err := errors.Join(err1, err2); err != nil {
			go call(onDone, "arguments: "+err.Error(), "")
			return id
		}
		t := p.Start(kind, json.RawMessage(text), func(done, total int) {
			call(onProgress, done, total)
		}, func(res json.RawMessage, err error) {
			mu.Lock()
			delete(tasks, id)
			mu.Unlock()
			if err != nil {
				call(onDone, err.Error(), "")
				return
			}
			call(onDone, "", string(res))
		})
		mu.Lock()
		tasks[id] = t
		mu.Unlock()
		return id
	})
	if err != nil {
		return err
	}
	cancel, err := safejs.FuncOf(func(_ safejs.Value, args []safejs.Value) any {
		if len(args) < 1 {
			return nil
		}
		id, err := args[0].Int()
		if err != nil {
			return nil
		}
		mu.Lock()
		t := tasks[id]
		delete(tasks, id)
		mu.Unlock()
		if t != nil {
			t.Cancel()
		}
		return nil
	})
	if err != nil {
		return err
	}
	size, err := safejs.FuncOf(func(safejs.Value, []safejs.Value) any { return p.Size() })
	if err != nil {
		return err
	}
	obj, err := safejs.ValueOf(map[string]any{})
	if err != nil {
		return err
	}
	for name, f := range map[string]safejs.Func{"start": start, "cancel": cancel, "size": size} {
		if err := obj.Set(name, f); err != nil {
			return err
		}
	}
	return safejs.Global().Set("hdriskJobs", obj)
}
