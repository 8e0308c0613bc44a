//go:build js && wasm

// Command page is the single js/wasm program of the page. With a document it runs the
// interface; inside a Web Worker (no document) it serves compute jobs.
package main

import (
	"fmt"
	"os"

	"github.com/hack-pad/safejs"

	"hdrisk/wasm/page"
	"hdrisk/wasm/worker"
)

func main() {
	doc, err := safejs.Global().Get("document")
	if err != nil || doc.IsUndefined() {
		if err := worker.Serve(); err != nil {
			fmt.Fprintln(os.Stderr, err)
		}
		return
	}
	if err := page.Run(); err != nil {
		fmt.Fprintln(os.Stderr, err)
		page.Fail(err)
	}
}
