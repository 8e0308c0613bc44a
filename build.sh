#!/usr/bin/env bash
# build | serve [--port N] | test
# Builds the single-file page into dist/, serves it on 127.0.0.1, or runs every test.
# Nothing here downloads a toolchain or a browser: Go modules come through the module proxy.
set -euo pipefail
cd "$(dirname "$0")"

# generate compiles the .vugu components of ui/ to their committed _gen.go files.
generate() {
	go run github.com/vugu/vugu/cmd/vugugen -skip-go-mod -skip-main ui/
	gofmt -w ui/*_gen.go
}

build() {
	generate
	mkdir -p dist
	local wasm=dist/hdrisk.wasm
	# -tags minimal keeps gonum/plot from linking its raster, PDF, EPS and TeX backends (vgall.go);
	# the page draws SVG only and has the browser turn it into PNG.
	GOOS=js GOARCH=wasm go build -tags minimal -trimpath -ldflags="-s -w" -o "$wasm" ./wasm/cmd/page
	local vugu
	vugu="$(go list -m -f '{{.Dir}}' github.com/vugu/vugu)"
	go run ./internal/tools/bundle \
		-shell static/shell.html -css static/page.css \
		-boot static/boot.js -worker static/worker.js \
		-wasm-exec "$(go env GOROOT)/lib/wasm/wasm_exec.js" \
		-vugu-helper "$vugu/domrender/renderer-js-script.go" \
		-wasm "$wasm" -out dist/hdrisk.html
	rm -f "$wasm"
	echo "built dist/hdrisk.html ($(wc -c <dist/hdrisk.html) bytes)"
}

case "${1:-build}" in
build) build ;;
serve)
	shift
	port=8080
	while [ $# -gt 0 ]; do
		case "$1" in
		--port) port="${2:?--port needs a number}"; shift 2 ;;
		--port=*) port="${1#--port=}"; shift ;;
		*) echo "serve: unknown option $1" >&2; exit 2 ;;
		esac
	done
	build
	exec go run ./internal/tools/serve -dir dist -port "$port"
	;;
test)
	build
	go vet ./...
	go test -count=1 ./...
	;;
*)
	echo "usage: ./build.sh build | serve [--port N] | test" >&2
	exit 2
	;;
esac
