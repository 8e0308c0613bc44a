// Package wasm is the browser side of the page: one js/wasm program (cmd/page) that runs the
// vugu interface when it finds a document and serves compute jobs when it is started inside a
// Web Worker. Every call into the browser goes through github.com/hack-pad/safejs, so that a
// failing call is an error, not a panic. Layout lives in ui/, mathematics in engine/.
package wasm
