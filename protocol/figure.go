package protocol

import "hdrisk/engine/plot"

// FigureArgs are the arguments of Figure: one of Line or Heat, rendered as SVG. The page
// makes a PNG from the SVG itself, on a canvas of the browser.
type FigureArgs struct {
	Line *plot.Line `json:"line,omitempty"`
	Heat *plot.Heat `json:"heat,omitempty"`
	PDF  bool       `json:"pdf,omitempty"` // a PDF as well, for a download
}

// FigureResult is the rendered figure: its SVG (base64 in JSON), its PDF when asked for,
// and where its data area lies, for the pointer readout.
type FigureResult struct {
	Data  []byte     `json:"data"`
	PDF   []byte     `json:"pdf,omitempty"`
	Frame plot.Frame `json:"frame"`
}

// Figure renders a figure.
var Figure = Kind[FigureArgs, FigureResult]{Name: "figure"}
