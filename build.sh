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

# examples writes ui/examples_data.go from testdata/scenarios (the go:generate step of ui/).
examples() {
	(cd ui && go run ./examplesmake)
}

# checkformat fails, listing them, when tracked or new Go files are not gofmt-formatted.
checkformat() {
	local bad
	bad="$(gofmt -l $(git ls-files --cached --others --exclude-standard '*.go'))"
	if [ -n "$bad" ]; then
		echo "gofmt: these files are not formatted (run gofmt -w on them):" >&2
		echo "$bad" >&2
		return 1
	fi
}

# checkgenerated regenerates the vugu and example files and fails when they differ from the
# commit, or when a generated file is not committed at all.
checkgenerated() {
	generate
	examples
	local paths=(ui/*_gen.go ui/examples_data.go)
	local new
	new="$(git ls-files --others --exclude-standard -- "${paths[@]}")"
	if ! git diff --exit-code --stat HEAD -- "${paths[@]}" || [ -n "$new" ]; then
		[ -z "$new" ] || echo "$new"
		echo "generated files differ from the commit: regenerate (./build.sh build; cd ui && go generate) and commit them" >&2
		return 1
	fi
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
	checkformat
	checkgenerated
	build
	go vet ./...
	GOOS=js GOARCH=wasm go vet ./wasm/... ./ui/... ./protocol/...
	# The browser tests drive a real page for a few minutes; the default 10-minute limit of a
	# test binary is too close on a loaded 2-core machine.
	go test -count=1 -timeout 25m ./...
	;;
*)
	echo "usage: ./build.sh build | serve [--port N] | test" >&2
	exit 2
	;;
esac
