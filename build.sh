#!/usr/bin/env bash
# build | serve [--port N] | test
# Builds the single-file page into dist/, serves it on 127.0.0.1, or runs every test.
# Nothing here downloads a toolchain or a browser: Go modules come through the module proxy.
set -euo pipefail
cd "$(dirname "$0")"

build() {
	echo "build: page not yet wired" >&2
}

case "${1:-build}" in
build) build ;;
serve)
	shift
	build
	echo "serve: not yet wired" >&2
	;;
test)
	go vet ./...
	go test -count=1 ./...
	;;
*)
	echo "usage: ./build.sh build | serve [--port N] | test" >&2
	exit 2
	;;
esac
