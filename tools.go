//go:build tools

// Package tools pins the code generator that the build runs with `go run`, so that a clean
// machine needs nothing installed by hand.
package tools

import _ "github.com/vugu/vugu/cmd/vugugen"
