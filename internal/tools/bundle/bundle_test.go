package main

import (
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/base64"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

func inputs() Inputs {
	shell, err := os.ReadFile(filepath.Join("..", "..", "..", "static", "shell.html"))
	if err != nil {
		panic(err)
	}
	return Inputs{
		Shell:      string(shell),
		CSS:        "body { color: #000 }",
		WasmExec:   "globalThis.Go = class {};",
		VuguHelper: "(function(){window.vuguRender = function(){};})()",
		Boot:       "console.log('boot');",
		Worker:     "self.onmessage = null;",
		Wasm:       append([]byte("\x00asm\x01\x00\x00\x00"), bytes.Repeat([]byte{7}, 1000)...),
	}
}

var (
	scriptRe = regexp.MustCompile(`(?s)<script([^>]*)>(.*?)</script>`)
	styleRe  = regexp.MustCompile(`(?s)<style>(.*?)</style>`)
	cspRe    = regexp.MustCompile(`http-equiv="Content-Security-Policy" content="([^"]*)"`)
)

func sha(s string) string {
	sum := sha256.Sum256([]byte(s))
	return "'sha256-" + base64.StdEncoding.EncodeToString(sum[:]) + "'"
}

// Every script that runs and the style sheet must be allowed by hash, data blocks must not
// run, and the policy must forbid every kind of request (CSP Level 3 directives).
func TestPolicyCoversExactlyThePage(t *testing.T) {
	in := inputs()
	page, err := Assemble(in)
	if err != nil {
		t.Fatal(err)
	}
	m := cspRe.FindSubmatch(page)
	if m == nil {
		t.Fatal("no Content-Security-Policy meta tag")
	}
	csp := string(m[1])
	if i, j := bytes.Index(page, []byte("Content-Security-Policy")), bytes.Index(page, []byte("<script")); i > j {
		t.Errorf("the policy comes after the first script")
	}
	for _, d := range []string{"default-src 'none'", "connect-src 'none'", "worker-src blob:", "img-src data: blob:", "'wasm-unsafe-eval'", "base-uri 'none'", "form-action 'none'"} {
		if !strings.Contains(csp, d) {
			t.Errorf("policy lacks %s: %s", d, csp)
		}
	}
	for _, bad := range []string{"'unsafe-inline'", "'unsafe-eval'", "http:", "https:", "*"} {
		if strings.Contains(csp, bad) {
			t.Errorf("policy allows %s: %s", bad, csp)
		}
	}
	run := 0
	for _, s := range scriptRe.FindAllSubmatch(page, -1) {
		attrs, body := string(s[1]), string(s[2])
		if strings.Contains(attrs, "type=") {
			if strings.Contains(csp, sha(body)) {
				t.Errorf("a data block (%s) is allowed to run", attrs)
			}
			continue
		}
		run++
		if !strings.Contains(csp, sha(body)) {
			t.Errorf("script %s runs but its hash is not in the policy", attrs)
		}
	}
	if run != 3 {
		t.Errorf("%d scripts run, want 3 (wasm_exec.js, vugu helper, boot)", run)
	}
	st := styleRe.FindSubmatch(page)
	if st == nil || string(st[1]) != in.CSS || !strings.Contains(csp, sha(in.CSS)) {
		t.Errorf("style sheet missing or not allowed by hash")
	}
}

func TestPayloadRoundTrips(t *testing.T) {
	in := inputs()
	page, err := Assemble(in)
	if err != nil {
		t.Fatal(err)
	}
	var payload string
	for _, s := range scriptRe.FindAllSubmatch(page, -1) {
		if strings.Contains(string(s[1]), `id="hdrisk-wasm"`) {
			payload = string(s[2])
		}
	}
	gz, err := base64.StdEncoding.DecodeString(payload)
	if err != nil {
		t.Fatal(err)
	}
	zr, err := gzip.NewReader(bytes.NewReader(gz))
	if err != nil {
		t.Fatal(err)
	}
	got, err := io.ReadAll(zr)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, in.Wasm) {
		t.Errorf("payload decodes to %d bytes that differ from the %d-byte binary", len(got), len(in.Wasm))
	}
}

func TestAssembleRefuses(t *testing.T) {
	cases := []struct {
		name string
		edit func(*Inputs)
		want string
	}{
		{"end tag in a script", func(in *Inputs) { in.Boot = "x = '</SCRIPT>';" }, "boot: contains an end tag"},
		{"end tag in the css", func(in *Inputs) { in.CSS = "a{}</style>" }, "css: contains an end tag"},
		{"empty worker", func(in *Inputs) { in.Worker = " \n" }, "worker: empty"},
		{"not wasm", func(in *Inputs) { in.Wasm = []byte("#!/bin/sh\necho hi") }, "not a WebAssembly binary"},
		{"unknown template field", func(in *Inputs) { in.Shell += "{{.Nope}}" }, "shell:"},
	}
	for _, c := range cases {
		in := inputs()
		c.edit(&in)
		if _, err := Assemble(in); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want %q", c.name, err, c.want)
		}
	}
}

func TestHelperScript(t *testing.T) {
	src := []byte("package domrender\n\nconst other = 1\n\nconst jsHelperScript = \"(function(){\\\"x\\\"})()\"\n")
	got, err := HelperScript(src)
	if err != nil || got != `(function(){"x"})()` {
		t.Errorf("HelperScript = %q, %v", got, err)
	}
	if _, err := HelperScript([]byte("package x\nconst jsHelperScript = 3\n")); err == nil {
		t.Errorf("a non-string constant was accepted")
	}
	if _, err := HelperScript([]byte("package x\n")); err == nil {
		t.Errorf("a file without the constant was accepted")
	}
}

// The vugu release in go.mod must still carry its helper in the form HelperScript reads, and
// the helper must skip itself when it has already run (the page's eval shim relies on that).
func TestHelperScriptOfPinnedVugu(t *testing.T) {
	out, err := exec.Command("go", "list", "-m", "-f", "{{.Dir}}", "github.com/vugu/vugu").Output()
	if err != nil {
		t.Fatalf("go list: %v", err)
	}
	src, err := os.ReadFile(filepath.Join(strings.TrimSpace(string(out)), "domrender", "renderer-js-script.go"))
	if err != nil {
		t.Fatal(err)
	}
	h, err := HelperScript(src)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(h, "(function(){if(window.vuguRender)return;") {
		t.Errorf("vugu's helper no longer starts with its run-once guard: %.60q", h)
	}
}
