//go:build js && wasm

// Package worker is the compute side of the page's program: inside a Web Worker it takes job
// requests (package job) from onmessage and answers with progress and results.
package worker

import (
	"encoding/json"
	"fmt"
	"time"
	"unsafe"

	"github.com/hack-pad/safejs"

	"hdrisk/engine/plot"
	"hdrisk/protocol"
	"hdrisk/wasm/job"
)

// Serve installs the message handler, tells the page the worker is ready and never returns.
// Requests are run one after another on a goroutine of their own, since a browser callback
// must not block.
func Serve() error {
	self := safejs.Global()
	post := func(r protocol.Reply) {
		// A result travels beside its reply, not inside it (protocol.Reply), so that the
		// page does not run the JSON scanner over a large result only to find its end.
		result := r.Result
		r.Result = nil
		b, err := json.Marshal(r)
		if err != nil {
			b, result = []byte(fmt.Sprintf(`{"id":%d,"type":"error","error":"reply: cannot encode"}`, r.ID)), nil
		}
		var msg any = string(b)
		if result != nil {
			msg = []any{string(b), string(result)}
		}
		// A failed post leaves the page waiting; there is nobody else to tell.
		_, _ = self.Call("postMessage", msg)
	}
	requests := make(chan [2]string, 16)
	onMessage, err := safejs.FuncOf(func(_ safejs.Value, args []safejs.Value) any {
		var req [2]string // the request's JSON and its bulk text (package pool)
		if len(args) > 0 {
			if d, err := args[0].Get("data"); err == nil {
				req = readRequest(d)
			}
		}
		go func() { requests <- req }()
		return nil
	})
	if err == nil {
		err = self.Set("onmessage", onMessage)
	}
	if err != nil {
		// Tell the page, or its jobs would wait for a worker that never becomes ready.
		post(protocol.Reply{Type: protocol.Fatal, Error: "worker: onmessage: " + err.Error()})
		return fmt.Errorf("worker: onmessage: %w", err)
	}
	post(protocol.Reply{Type: protocol.Ready})
	// The first figure a worker draws loads the font and runs the layout, contour and PNG
	// code for the first time (several times slower in WebAssembly than the next); the worker
	// draws a throw-away one the first time it is idle, so that the first map waits less, and
	// runs a throw-away check for the same reason (job.WarmCheck).
	warm := time.After(300 * time.Millisecond)
	for {
		var req [2]string
		select {
		case req = <-requests:
		case <-warm:
			plot.Warm()
			job.WarmCheck()
			warm = nil
			continue
		}
		if warm != nil {
			warm = time.After(300 * time.Millisecond)
		}
		job.Handle(req[0], req[1], post)
	}
}

// readRequest reads a message of the page: a request's JSON text, or an array of that text and
// a Uint8Array holding its bulk text (protocol.Bulky), copied into Go once.
func readRequest(d safejs.Value) [2]string {
	if d.Type() != safejs.TypeObject {
		text, _ := d.String()
		return [2]string{text, ""}
	}
	var out [2]string
	if v, err := d.Index(0); err == nil {
		out[0], _ = v.String()
	}
	if v, err := d.Index(1); err == nil {
		if n, err := v.Length(); err == nil && n > 0 {
			b := make([]byte, n)
			if _, err := safejs.CopyBytesToGo(b, v); err == nil {
				// b is not written again: the string shares it rather than copying megabytes.
				out[1] = unsafe.String(&b[0], len(b))
			}
		}
	}
	return out
}
