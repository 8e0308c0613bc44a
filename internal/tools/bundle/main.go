package main

import (
	"flag"
	"fmt"
	"os"
	"path/filepath"
)

func main() {
	var (
		shell  = flag.String("shell", "static/shell.html", "page template")
		css    = flag.String("css", "static/page.css", "style sheet")
		boot   = flag.String("boot", "static/boot.js", "main-thread loader")
		worker = flag.String("worker", "static/worker.js", "worker bootstrap")
		exec   = flag.String("wasm-exec", "", "Go's wasm_exec.js (from $(go env GOROOT)/lib/wasm)")
		helper = flag.String("vugu-helper", "", "vugu's domrender/renderer-js-script.go")
		wasm   = flag.String("wasm", "", "the js/wasm binary")
		out    = flag.String("out", "dist/hdrisk.html", "the page to write")
	)
	flag.Parse()
	if err := run(*shell, *css, *boot, *worker, *exec, *helper, *wasm, *out); err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
}

func run(shell, css, boot, worker, exec, helper, wasm, out string) error {
	read := func(path string) ([]byte, error) {
		if path == "" {
			return nil, fmt.Errorf("bundle: a required path is empty (see -help)")
		}
		return os.ReadFile(path)
	}
	var in Inputs
	texts := []struct {
		path string
		dst  *string
	}{{shell, &in.Shell}, {css, &in.CSS}, {boot, &in.Boot}, {worker, &in.Worker}, {exec, &in.WasmExec}}
	for _, t := range texts {
		b, err := read(t.path)
		if err != nil {
			return err
		}
		*t.dst = string(b)
	}
	src, err := read(helper)
	if err != nil {
		return err
	}
	if in.VuguHelper, err = HelperScript(src); err != nil {
		return err
	}
	if in.Wasm, err = read(wasm); err != nil {
		return err
	}
	page, err := Assemble(in)
	if err != nil {
		return err
	}
	if err := os.MkdirAll(filepath.Dir(out), 0o755); err != nil {
		return err
	}
	tmp := out + ".tmp"
	if err := os.WriteFile(tmp, page, 0o644); err != nil {
		return err
	}
	return os.Rename(tmp, out)
}
