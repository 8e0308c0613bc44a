// Package ui holds the page's vugu components and the plain Go state behind them. It does no
// mathematics and never touches the browser directly: figures come through an Evaluator that
// the wasm/ side supplies, so everything here builds and tests natively.
//
// The .vugu files are compiled to _gen.go files by
//
//	go run github.com/vugu/vugu/cmd/vugugen -skip-go-mod -skip-main ui/
//
// (./build.sh build does this); the generated files are committed.
package ui
