// Command bundle assembles the single-file page: markup, CSS, Go's wasm_exec.js, the vugu render
// helper and the gzip-compressed, base64-inlined wasm binary, under a Content-Security-Policy
// that forbids every network request. The page decompresses the binary with
// DecompressionStream("gzip") and instantiates it with WebAssembly.instantiate, so it opens
// from file:// with networking off.
package main

import (
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/base64"
	"fmt"
	"go/ast"
	"go/parser"
	"go/token"
	"regexp"
	"strconv"
	"strings"
	"text/template"
)

// Inputs are the parts of the page, each as text except the wasm binary.
type Inputs struct {
	Shell      string // text/template of the page (see static/shell.html)
	CSS        string // the whole style sheet
	WasmExec   string // Go's wasm_exec.js of the toolchain that built Wasm
	VuguHelper string // vugu's DOM render helper script (see HelperScript)
	Boot       string // the main-thread loader
	Worker     string // the worker bootstrap, appended to WasmExec in the worker's Blob
	Wasm       []byte // the GOOS=js GOARCH=wasm binary
}

// shellData is what the shell template sees. Script and style texts are inserted verbatim;
// Assemble refuses any text that could close its element early.
type shellData struct {
	CSP        string
	CSS        string
	WasmExec   string
	VuguHelper string
	Boot       string
	Worker     string
	Payload    string
}

// closer matches an end tag that would end a script or style element early
// (HTML Living Standard, "script data end tag name state").
var closer = regexp.MustCompile(`(?i)</(script|style)`)

// Assemble returns the page. The inline scripts that run (WasmExec, VuguHelper, Boot) and the
// style sheet are allowed by their SHA-256 hashes; Worker and the payload sit in data blocks
// (script elements of a non-JavaScript type), which never execute and need no hash.
// Special cases are: an empty part or a part that contains "</script" or "</style" is an error
// naming the part.
func Assemble(in Inputs) ([]byte, error) {
	parts := []struct{ name, text string }{
		{"shell", in.Shell}, {"css", in.CSS}, {"wasm_exec.js", in.WasmExec},
		{"vugu helper", in.VuguHelper}, {"boot", in.Boot}, {"worker", in.Worker},
	}
	for _, p := range parts {
		if strings.TrimSpace(p.text) == "" {
			return nil, fmt.Errorf("bundle: %s: empty", p.name)
		}
		if p.name != "shell" && closer.MatchString(p.text) {
			return nil, fmt.Errorf("bundle: %s: contains an end tag that would close its element", p.name)
		}
	}
	if len(in.Wasm) < 8 || !bytes.Equal(in.Wasm[:4], []byte("\x00asm")) {
		return nil, fmt.Errorf("bundle: wasm: not a WebAssembly binary")
	}
	payload, err := compress(in.Wasm)
	if err != nil {
		return nil, fmt.Errorf("bundle: wasm: %w", err)
	}
	tmpl, err := template.New("shell").Option("missingkey=error").Parse(in.Shell)
	if err != nil {
		return nil, fmt.Errorf("bundle: shell: %w", err)
	}
	d := shellData{
		CSS: in.CSS, WasmExec: in.WasmExec, VuguHelper: in.VuguHelper,
		Boot: in.Boot, Worker: in.Worker, Payload: payload,
	}
	d.CSP = Policy([]string{d.WasmExec, d.VuguHelper, d.Boot}, []string{d.CSS})
	var out bytes.Buffer
	if err := tmpl.Execute(&out, d); err != nil {
		return nil, fmt.Errorf("bundle: shell: %w", err)
	}
	return out.Bytes(), nil
}

// Policy returns the Content-Security-Policy of the page: nothing may be fetched or connected
// to; only the given inline scripts and styles (by hash), wasm compilation, blob: workers, and
// data:/blob: images are allowed. Hash sources follow CSP Level 3, section 8.4.
func Policy(scripts, styles []string) string {
	var b strings.Builder
	b.WriteString("default-src 'none'; script-src")
	for _, s := range scripts {
		b.WriteString(" " + hashSource(s))
	}
	b.WriteString(" 'wasm-unsafe-eval'; style-src")
	for _, s := range styles {
		b.WriteString(" " + hashSource(s))
	}
	b.WriteString("; worker-src blob:; img-src data: blob:; connect-src 'none'; font-src 'none';" +
		" object-src 'none'; base-uri 'none'; form-action 'none'")
	return b.String()
}

func hashSource(text string) string {
	sum := sha256.Sum256([]byte(text))
	return "'sha256-" + base64.StdEncoding.EncodeToString(sum[:]) + "'"
}

// compress returns base64(gzip(b)) at the best compression level.
func compress(b []byte) (string, error) {
	var buf bytes.Buffer
	zw, err := gzip.NewWriterLevel(&buf, gzip.BestCompression)
	if err != nil {
		return "", err
	}
	if _, err := zw.Write(b); err != nil {
		return "", err
	}
	if err := zw.Close(); err != nil {
		return "", err
	}
	return base64.StdEncoding.EncodeToString(buf.Bytes()), nil
}

// HelperScript returns the value of the constant jsHelperScript declared in src, the Go source
// of vugu's domrender/renderer-js-script.go. vugu's renderer runs this script through
// window.eval, which the page's policy forbids; the page therefore carries it as an inline
// script allowed by hash, and its eval shim accepts exactly this text.
// Special cases are: a source without the constant, or with a non-string value, is an error.
func HelperScript(src []byte) (string, error) {
	f, err := parser.ParseFile(token.NewFileSet(), "renderer-js-script.go", src, 0)
	if err != nil {
		return "", fmt.Errorf("bundle: vugu helper: %w", err)
	}
	for _, decl := range f.Decls {
		g, ok := decl.(*ast.GenDecl)
		if !ok || g.Tok != token.CONST {
			continue
		}
		for _, spec := range g.Specs {
			vs := spec.(*ast.ValueSpec)
			for i, name := range vs.Names {
				if name.Name != "jsHelperScript" || i >= len(vs.Values) {
					continue
				}
				lit, ok := vs.Values[i].(*ast.BasicLit)
				if !ok || lit.Kind != token.STRING {
					return "", fmt.Errorf("bundle: vugu helper: jsHelperScript is not a string literal")
				}
				return strconv.Unquote(lit.Value)
			}
		}
	}
	return "", fmt.Errorf("bundle: vugu helper: no constant jsHelperScript")
}
