//go:build js

package main

import (
	"errors"

	"hdrisk/engine/plot"
)

// pngOf refuses: engine/plot links its raster backend only outside the browser, where the
// page draws its PNGs itself; the command line is built for an operating system.
func pngOf(*plot.Figure) ([]byte, error) {
	return nil, errors.New("PNG figures are drawn by the command line built for an operating system")
}
