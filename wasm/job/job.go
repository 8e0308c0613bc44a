// Package job is the registry of the kinds of work a worker can do (the protocol's kinds,
// package protocol) and runs them. It holds no browser code, so it builds and tests natively.
//
// A worker runs one request at a time. Cancelling is the page's business: it terminates the
// worker and starts a fresh one, so a Runner never has to watch for cancellation.
package job

import (
	"encoding/json"
	"fmt"
	"sort"
	"sync"
	"time"

	"hdrisk/protocol"
)

// Runner does the work of one kind. It decodes args itself (bulk is the large text of
// protocol.Bulky arguments, sent beside them; "" when there is none), calls progress(done, total) as it
// goes (as often as it likes; Run thins the calls out), and returns a value that
// protocol.Marshal encodes. Errors name the argument and the reason.
type Runner func(args json.RawMessage, bulk string, progress func(done, total int)) (any, error)

var (
	mu      sync.RWMutex
	runners = map[string]Runner{}
)

// Register makes kind available to workers. Kinds are registered from init functions, one
// file per kind. Special cases are: registering an empty kind, a nil runner or a kind twice
// panics, since each is a programming error found at start-up.
func Register(kind string, r Runner) {
	mu.Lock()
	defer mu.Unlock()
	if kind == "" || r == nil {
		panic("job: Register needs a kind and a runner")
	}
	if _, dup := runners[kind]; dup {
		panic("job: kind registered twice: " + kind)
	}
	runners[kind] = r
}

// Serve registers run as the worker side of the protocol's kind k: its arguments are
// decoded as k's (with the bulk text put back when A has one: protocol.BulkSetter), and its
// result is k's result type.
func Serve[A, R any](k protocol.Kind[A, R], run func(A, func(done, total int)) (R, error)) {
	Register(k.Name, func(raw json.RawMessage, bulk string, progress func(done, total int)) (any, error) {
		a, err := k.DecodeArgs(raw)
		if err != nil {
			return nil, err
		}
		if s, ok := any(&a).(protocol.BulkSetter); ok && bulk != "" {
			s.SetBulk(bulk)
		}
		return run(a, progress)
	})
}

// Kinds returns the registered kinds, sorted.
func Kinds() []string {
	mu.RLock()
	defer mu.RUnlock()
	ks := make([]string, 0, len(runners))
	for k := range runners {
		ks = append(ks, k)
	}
	sort.Strings(ks)
	return ks
}

// minGap is the least time between two progress replies: frequent enough for a smooth bar,
// rare enough that posting messages costs nothing next to the work.
const minGap = 50 * time.Millisecond

// Run runs req and hands every reply to emit, in order, ending with exactly one Result or
// Failed reply. A panic in the runner is reported as a Failed reply, not propagated, so that
// one bad request cannot take the worker down.
// Special cases are: an unknown kind is a Failed reply naming it.
func Run(req protocol.Request, emit func(protocol.Reply)) {
	mu.RLock()
	r, ok := runners[req.Kind]
	mu.RUnlock()
	if !ok {
		emit(protocol.Reply{ID: req.ID, Type: protocol.Failed, Error: fmt.Sprintf("kind: unknown job kind %q", req.Kind)})
		return
	}
	var last time.Time
	progress := func(done, total int) {
		now := time.Now()
		if done < total && now.Sub(last) < minGap {
			return
		}
		last = now
		emit(protocol.Reply{ID: req.ID, Type: protocol.Progress, Done: done, Total: total})
	}
	v, err := call(r, req.Args, req.Bulk, progress)
	if err != nil {
		emit(protocol.Reply{ID: req.ID, Type: protocol.Failed, Error: err.Error()})
		return
	}
	b, err := protocol.Marshal(v)
	if err != nil {
		emit(protocol.Reply{ID: req.ID, Type: protocol.Failed, Error: "result: " + err.Error()})
		return
	}
	emit(protocol.Reply{ID: req.ID, Type: protocol.Result, Result: b})
}

func call(r Runner, args json.RawMessage, bulk string, progress func(int, int)) (v any, err error) {
	defer func() {
		if p := recover(); p != nil {
			err = fmt.Errorf("internal error: %v", p)
		}
	}()
	return r(args, bulk, progress)
}

// Handle decodes one request text and runs it, with bulk as its protocol.Request.Bulk. It is
// what a worker does with each message.
// Special cases are: text that is not a protocol.Request is a Failed reply with ID 0.
func Handle(text, bulk string, emit func(protocol.Reply)) {
	var req protocol.Request
	if err := json.Unmarshal([]byte(text), &req); err != nil {
		emit(protocol.Reply{Type: protocol.Failed, Error: "request: " + err.Error()})
		return
	}
	req.Bulk = bulk
	Run(req, emit)
}
