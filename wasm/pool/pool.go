//go:build js && wasm

// Package pool runs jobs (package job) on a set of Web Workers, one job per worker at a time,
// each worker running the page's own wasm module. Jobs beyond the number of workers wait in
// order. Cancelling a running job terminates its worker and starts a fresh one, which is the
// only way to stop Go code running in a worker. A worker that fails or stops while running a
// job, or whose job passes its time limit (StallLimit without a reply, RunLimit in all), is
// replaced the same way and its job reported failed with the reason; the other jobs go on.
package pool

import (
	"encoding/json"
	"errors"
	"fmt"
	"sync"
	"time"
	"unsafe"

	"github.com/hack-pad/safejs"

	"hdrisk/protocol"
)

// Boot is what the page loader leaves in globalThis.hdriskBoot: the compiled module, the text
// of the worker script (Go's wasm_exec.js followed by the worker bootstrap) and the number of
// workers to run.
type Boot struct {
	Module       safejs.Value
	WorkerSource string
	Threads      int
}

// ReadBoot reads globalThis.hdriskBoot. Special cases are: a missing object or field is an
// error naming the field.
func ReadBoot() (Boot, error) {
	var b Boot
	o, err := safejs.Global().Get("hdriskBoot")
	if err != nil || o.IsUndefined() || o.IsNull() {
		return b, errors.New("hdriskBoot: missing (the page loader did not run)")
	}
	if b.Module, err = o.Get("module"); err != nil || b.Module.IsUndefined() {
		return b, errors.New("hdriskBoot.module: missing")
	}
	src, err := o.Get("workerSource")
	if err == nil {
		b.WorkerSource, err = src.String()
	}
	if err != nil || b.WorkerSource == "" {
		return b, errors.New("hdriskBoot.workerSource: missing")
	}
	n, err := o.Get("threads")
	if err == nil {
		b.Threads, err = n.Int()
	}
	if err != nil || b.Threads < 1 {
		b.Threads = 1
	}
	return b, nil
}

// Time limits of one job (protocol.JobStallLimit, protocol.JobRunLimit).
const (
	StallLimit = protocol.JobStallLimit
	RunLimit   = protocol.JobRunLimit
)

// Pool is a set of workers. Its methods may be called from any goroutine.
type Pool struct {
	boot Boot
	url  string // blob: URL of the worker script

	mu       sync.Mutex
	workers  []*worker
	queue    []*Task
	nextID   uint64
	broken   error // set when a worker could not start; every later job fails with it
	sawReady bool

	// Callbacks wait in pending (guarded by mu) and are run in order by one goroutine, woken
	// through wake; the queue is unbounded so that a slow callback never blocks a worker event.
	pending []func()
	wake    chan struct{}
}

type worker struct {
	js      safejs.Value
	handler safejs.Func
	ready   bool
	task    *Task
}

// Task is one job handed to the pool.
type Task struct {
	pool     *Pool
	req      protocol.Request
	progress func(done, total int)
	done     func(result json.RawMessage, err error)
	w        *worker
	over     bool // finished or cancelled: no more callbacks
	started  time.Time
	timer    *time.Timer // the time limit of a running task
}

// New starts n workers from boot (n < 1 means boot.Threads).
func New(boot Boot, n int) (*Pool, error) {
	if n < 1 {
		n = boot.Threads
	}
	url, err := blobURL(boot.WorkerSource)
	if err != nil {
		return nil, err
	}
	p := &Pool{boot: boot, url: url, wake: make(chan struct{}, 1)}
	go p.deliver()
	p.mu.Lock()
	defer p.mu.Unlock()
	for i := 0; i < n; i++ {
		w, err := p.spawn()
		if err != nil {
			return nil, err
		}
		p.workers = append(p.workers, w)
	}
	return p, nil
}

// Size is the number of workers.
func (p *Pool) Size() int {
	p.mu.Lock()
	defer p.mu.Unlock()
	return len(p.workers)
}

func blobURL(source string) (string, error) {
	g := safejs.Global()
	blobCtor, err := g.Get("Blob")
	if err != nil {
		return "", fmt.Errorf("pool: Blob: %w", err)
	}
	parts, err := safejs.ValueOf([]any{source})
	if err != nil {
		return "", fmt.Errorf("pool: worker source: %w", err)
	}
	opts, err := safejs.ValueOf(map[string]any{"type": "text/javascript"})
	if err != nil {
		return "", fmt.Errorf("pool: worker source: %w", err)
	}
	blob, err := blobCtor.New(parts, opts)
	if err != nil {
		return "", fmt.Errorf("pool: Blob: %w", err)
	}
	urlObj, err := g.Get("URL")
	if err != nil {
		return "", fmt.Errorf("pool: URL: %w", err)
	}
	u, err := urlObj.Call("createObjectURL", blob)
	if err != nil {
		return "", fmt.Errorf("pool: createObjectURL: %w", err)
	}
	return u.String()
}

// spawn starts one worker; p.mu is held.
func (p *Pool) spawn() (*worker, error) {
	ctor, err := safejs.Global().Get("Worker")
	if err != nil {
		return nil, fmt.Errorf("pool: Worker: %w", err)
	}
	wjs, err := ctor.New(p.url)
	if err != nil {
		return nil, fmt.Errorf("pool: new Worker: %w", err)
	}
	w := &worker{js: wjs}
	w.handler, err = safejs.FuncOf(func(_ safejs.Value, args []safejs.Value) any {
		text, result, isErr := "", "", false
		if len(args) > 0 {
			if typ, err := args[0].Get("type"); err == nil {
				s, _ := typ.String()
				isErr = s == "error"
			}
			if d, err := args[0].Get("data"); err == nil && !isErr {
				if d.Type() == safejs.TypeObject {
					// A reply and its result, posted side by side (package worker).
					if v, err := d.Index(0); err == nil {
						text, _ = v.String()
					}
					if v, err := d.Index(1); err == nil {
						result, _ = v.String()
					}
				} else {
					text, _ = d.String()
				}
			}
			if isErr {
				if m, err := args[0].Get("message"); err == nil {
					text, _ = m.String()
				}
			}
		}
		go p.receive(w, text, result, isErr)
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("pool: handler: %w", err)
	}
	for _, ev := range []string{"message", "error"} {
		if _, err := wjs.Call("addEventListener", ev, w.handler); err != nil {
			return nil, fmt.Errorf("pool: addEventListener: %w", err)
		}
	}
	msg, err := safejs.ValueOf(map[string]any{"type": "boot"})
	if err == nil {
		err = msg.Set("module", p.boot.Module)
	}
	if err != nil {
		return nil, fmt.Errorf("pool: boot message: %w", err)
	}
	if _, err := wjs.Call("postMessage", msg); err != nil {
		return nil, fmt.Errorf("pool: boot message: %w", err)
	}
	return w, nil
}

// post queues a callback; p.mu is held.
func (p *Pool) post(f func()) {
	p.pending = append(p.pending, f)
	select {
	case p.wake <- struct{}{}:
	default:
	}
}

func (p *Pool) deliver() {
	for range p.wake {
		for {
			p.mu.Lock()
			if len(p.pending) == 0 {
				p.mu.Unlock()
				break
			}
			f := p.pending[0]
			p.pending = p.pending[1:]
			p.mu.Unlock()
			f()
		}
	}
}

// receive handles one message or error event of worker w; result is the result posted
// beside the reply text, if any.
func (p *Pool) receive(w *worker, text, result string, isErr bool) {
	var r protocol.Reply
	switch {
	case isErr:
		r = protocol.Reply{Type: protocol.Fatal, Error: "worker error: " + text}
	default:
		if err := json.Unmarshal([]byte(text), &r); err != nil {
			r = protocol.Reply{Type: protocol.Fatal, Error: "worker sent an unreadable message"}
		} else if result != "" {
			r.Result = json.RawMessage(result)
		}
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	if !p.current(w) {
		return
	}
	switch r.Type {
	case protocol.Ready:
		w.ready = true
		if !p.sawReady {
			p.sawReady = true
			Mark("hdrisk:worker-ready")
		}
		p.dispatch()
	case protocol.Fatal:
		if !w.ready {
			// The worker never started: the module or the browser cannot run one, and a
			// fresh worker would fail the same way.
			p.broken = errors.New(r.Error)
			if t := w.task; t != nil {
				p.finish(t, nil, p.broken)
			}
			for _, t := range p.queue {
				p.finish(t, nil, p.broken)
			}
			p.queue = nil
			return
		}
		p.fail(w, "the worker stopped ("+r.Error+")")
	case protocol.Progress:
		if t := w.task; t != nil && t.req.ID == r.ID && !t.over {
			Mark(fmt.Sprintf("hdrisk:job-%d-progress-%d", r.ID, r.Done))
			p.arm(t)
			if t.progress != nil {
				done, total, f := r.Done, r.Total, t.progress
				p.post(func() { f(done, total) })
			}
		}
	case protocol.Result, protocol.Failed:
		t := w.task
		if t == nil || t.req.ID != r.ID {
			return
		}
		w.task = nil
		Mark(fmt.Sprintf("hdrisk:job-%d-end", r.ID))
		var err error
		if r.Type == protocol.Failed {
			err = errors.New(r.Error)
		}
		p.finish(t, r.Result, err)
		p.dispatch()
	}
}

// current reports whether w is still one of the pool's workers (not terminated); p.mu is held.
func (p *Pool) current(w *worker) bool {
	for _, x := range p.workers {
		if x == w {
			return true
		}
	}
	return false
}

// finish delivers the end of t once; p.mu is held.
func (p *Pool) finish(t *Task, result json.RawMessage, err error) {
	if t.over {
		return
	}
	t.over = true
	t.w = nil
	if t.timer != nil {
		t.timer.Stop()
		t.timer = nil
	}
	if f := t.done; f != nil {
		p.post(func() { f(result, err) })
	}
}

// dispatch hands queued tasks to idle ready workers; p.mu is held.
func (p *Pool) dispatch() {
	for _, w := range p.workers {
		if len(p.queue) == 0 {
			return
		}
		if !w.ready || w.task != nil {
			continue
		}
		t := p.queue[0]
		p.queue = p.queue[1:]
		text, err := json.Marshal(t.req)
		if err == nil {
			err = postRequest(w.js, string(text), t.req.Bulk)
		}
		if err != nil {
			p.finish(t, nil, fmt.Errorf("pool: posting job: %w", err))
			continue
		}
		w.task, t.w = t, w
		t.started = time.Now()
		Mark(fmt.Sprintf("hdrisk:job-%d-%s-posted", t.req.ID, t.req.Kind))
		p.arm(t)
	}
}

// arm (re)starts the time limit of running task t: StallLimit from now, or what is left of
// RunLimit if less; p.mu is held.
func (p *Pool) arm(t *Task) {
	if t.timer != nil {
		t.timer.Stop()
	}
	wait := min(StallLimit, RunLimit-time.Since(t.started))
	t.timer = time.AfterFunc(max(0, wait), func() { p.expire(t) })
}

// expire stops task t at its time limit, if it still runs.
func (p *Pool) expire(t *Task) {
	p.mu.Lock()
	defer p.mu.Unlock()
	if t.over || t.w == nil {
		return
	}
	why := fmt.Sprintf("it sent no progress for %v", StallLimit)
	if time.Since(t.started) >= RunLimit {
		why = fmt.Sprintf("it ran for %v, the longest a job may", RunLimit)
	}
	p.fail(t.w, "the job was stopped: "+why+" (the page's time limit)")
}

// fail reports the task of worker w failed with reason, and replaces w by a fresh worker;
// p.mu is held.
func (p *Pool) fail(w *worker, reason string) {
	if t := w.task; t != nil {
		w.task = nil
		p.finish(t, nil, fmt.Errorf("%s: %s; a fresh worker took its place", t.req.Kind, reason))
	}
	p.replace(w)
	p.dispatch()
}

// replace terminates worker w and puts a fresh one in its place; p.mu is held. Special cases
// are: when no fresh worker can start, w's place is dropped, and the pool is broken once it
// has no worker left.
func (p *Pool) replace(old *worker) {
	for i, w := range p.workers {
		if w != old {
			continue
		}
		// Unhook first: a message already queued for dispatch must not reach a released
		// Go function, which would stop the whole program.
		for _, ev := range []string{"message", "error"} {
			_, _ = old.js.Call("removeEventListener", ev, old.handler)
		}
		_, _ = old.js.Call("terminate")
		old.handler.Release()
		fresh, err := p.spawn()
		if err != nil {
			p.workers = append(p.workers[:i], p.workers[i+1:]...)
			if len(p.workers) == 0 {
				p.broken = err
				for _, t := range p.queue {
					p.finish(t, nil, err)
				}
				p.queue = nil
			}
		} else {
			p.workers[i] = fresh
		}
		return
	}
}

// Start queues a job of the given kind; args is encoded to JSON as the job's arguments.
// progress (may be nil) and done are called on a goroutine of the pool's own, never inside a
// browser callback, in the order the worker sent them; done is called exactly once unless the
// task is cancelled first.
// Special cases are: args that do not encode, or a pool whose workers could not start, are
// reported through done.
func (p *Pool) Start(kind string, args any, progress func(done, total int), done func(json.RawMessage, error)) *Task {
	p.mu.Lock()
	defer p.mu.Unlock()
	p.nextID++
	t := &Task{pool: p, req: protocol.Request{ID: p.nextID, Kind: kind}, progress: progress, done: done}
	if b, ok := args.(protocol.Bulky); ok {
		t.req.Bulk, args = b.BulkText(), b.WithoutBulk()
	}
	b, err := json.Marshal(args)
	switch {
	case err != nil:
		p.finish(t, nil, fmt.Errorf("%s: arguments: %w", kind, err))
	case p.broken != nil:
		p.finish(t, nil, p.broken)
	default:
		t.req.Args = b
		p.queue = append(p.queue, t)
		p.dispatch()
	}
	return t
}

// postRequest posts a request's JSON text to worker w, with its bulk text (when not empty)
// beside it as the bytes of a Uint8Array whose buffer is transferred, not copied
// (protocol.Bulky; the worker reads both in package worker).
func postRequest(w safejs.Value, text, bulk string) error {
	if bulk == "" {
		_, err := w.Call("postMessage", text)
		return err
	}
	ctor, err := safejs.Global().Get("Uint8Array")
	if err != nil {
		return err
	}
	u8, err := ctor.New(len(bulk))
	if err != nil {
		return err
	}
	// CopyBytesToJS only reads its source: the string's bytes go across without a Go copy.
	if _, err := safejs.CopyBytesToJS(u8, unsafe.Slice(unsafe.StringData(bulk), len(bulk))); err != nil {
		return err
	}
	buf, err := u8.Get("buffer")
	if err != nil {
		return err
	}
	_, err = w.Call("postMessage", []any{text, u8}, []any{buf})
	return err
}

// Cancel stops t: a queued task is dropped; a running one has its worker terminated and
// replaced by a fresh one. No callback of t runs after Cancel returns, except one already
// handed to the pool's delivery goroutine.
func (t *Task) Cancel() {
	p := t.pool
	p.mu.Lock()
	defer p.mu.Unlock()
	if t.over {
		return
	}
	t.over = true
	if t.w == nil {
		for i, q := range p.queue {
			if q == t {
				p.queue = append(p.queue[:i], p.queue[i+1:]...)
				break
			}
		}
		return
	}
	old := t.w
	t.w = nil
	if t.timer != nil {
		t.timer.Stop()
		t.timer = nil
	}
	old.task = nil
	p.replace(old)
	p.dispatch()
}

// Mark records a User Timing mark (the browser tests log them to show where start-up time
// and a job's time go: each job's posting, progress reports and end are marked). Failure only
// loses the mark.
func Mark(name string) {
	if perf, err := safejs.Global().Get("performance"); err == nil {
		_, _ = perf.Call("mark", name)
	}
}
