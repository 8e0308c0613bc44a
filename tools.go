//go:build tools

// Package tools pins the code generators that the build runs with `go run`, so that a clean
// machine needs nothing installed by hand, and the libraries the packages are being built on.
package tools

import (
	_ "github.com/chromedp/chromedp"
	_ "github.com/hack-pad/safejs"
	_ "github.com/vugu/vugu/cmd/vugugen"
	_ "gonum.org/v1/gonum/mat"
	_ "gonum.org/v1/gonum/integrate/quad"
	_ "gonum.org/v1/gonum/stat/distuv"
	_ "gonum.org/v1/gonum/optimize"
	_ "gonum.org/v1/gonum/mathext"
	_ "gonum.org/v1/plot"
	_ "gonum.org/v1/plot/vg/vgsvg"
	_ "gonum.org/v1/plot/vg/vgimg"
)
