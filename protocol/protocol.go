// Package protocol is the typed protocol between the page and its compute workers: the
// messages (Request, Reply), the kinds of work with their argument and result types, and the
// codec that carries engine values across as they are. It imports the engine and no browser
// code, so the page (ui, wasm/page) and the workers (wasm/job) share one set of types.
//
// The page posts a Request as JSON text (with a Bulky argument's large text beside it as
// bytes); the worker answers with Replies as JSON text: any
// number of "progress" replies, then exactly one "result" or "error". A reply with a result
// is posted as two texts, the reply without its result and the result, so that the page
// takes in a large result without scanning it as part of the reply. Results are encoded
// with Marshal, which keeps NaN (written null) where the engine means "undefined", and carries
// sweeps and maps as packed columns (Points).
package protocol

import (
	"encoding/json"
)

// Request is one piece of work. Args holds the arguments of Kind; Bulk, when not empty, is
// the large text of Bulky arguments, which travels beside the JSON (as a second part of the
// message), never inside it.
type Request struct {
	ID   uint64          `json:"id"`
	Kind string          `json:"kind"`
	Args json.RawMessage `json:"args"`
	Bulk string          `json:"-"`
}

// Reply types.
const (
	Ready    = "ready"    // the worker has started and takes requests (ID 0)
	Progress = "progress" // Done of Total steps are finished
	Result   = "result"   // Result holds the kind's result, encoded by Marshal
	Failed   = "error"    // Error says what went wrong
	Fatal    = "fatal"    // the worker itself could not start (sent by the bootstrap script)
)

// Reply is one message from a worker.
type Reply struct {
	ID     uint64          `json:"id"`
	Type   string          `json:"type"`
	Done   int             `json:"done,omitempty"`
	Total  int             `json:"total,omitempty"`
	Result json.RawMessage `json:"result,omitempty"`
	Error  string          `json:"error,omitempty"`
}

// Kind is a kind of work with the types of its arguments A and of its result R. Both sides
// name a kind by one of the variables below, so that the page cannot send arguments of one
// kind to another or read a result as the wrong type.
type Kind[A, R any] struct{ Name string }

// EncodeArgs encodes arguments of the kind.
func (k Kind[A, R]) EncodeArgs(a A) ([]byte, error) { return Marshal(a) }

// DecodeArgs decodes arguments of the kind. Special cases are: text that is not the kind's
// arguments is an error naming the kind.
func (k Kind[A, R]) DecodeArgs(b []byte) (A, error) {
	var a A
	if err := Unmarshal(b, &a); err != nil {
		return a, &ArgsError{Kind: k.Name, Err: err}
	}
	return a, nil
}

// DecodeResult decodes a result of the kind.
func (k Kind[A, R]) DecodeResult(b []byte) (R, error) {
	var r R
	err := Unmarshal(b, &r)
	return r, err
}

// ArgsError is arguments that do not decode as those of their kind.
type ArgsError struct {
	Kind string
	Err  error
}

func (e *ArgsError) Error() string { return e.Kind + " arguments: " + e.Err.Error() }

func (e *ArgsError) Unwrap() error { return e.Err }
