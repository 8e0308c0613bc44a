//go:build !js

package main

import "hdrisk/engine/plot"

func pngOf(f *plot.Figure) ([]byte, error) { return f.PNG() }
