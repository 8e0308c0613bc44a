package protocol

import "hdrisk/engine/plot"

// FigureArgs are the arguments of Figure: one of Line or Heat, rendered as SVG. The page
// makes a PNG from the SVG itself, on a canvas of the browser.
type FigureArgs struct {
	Line *plot.Line `json:"line,omitempty"`
	Heat *plot.Heat `json:"heat,omitempty"`
	// HeatZ is Heat.Z packed as Points packs its numbers (see Packed): a map's 10,000
	// values written as JSON numbers take a worker longer to read than the map takes to draw.
	HeatZ []byte `json:"heat_z,omitempty"`
	PDF   bool   `json:"pdf,omitempty"` // a PDF as well, for a download
}

// Packed returns a with the values of its heat map moved into HeatZ (a is not changed).
func (a FigureArgs) Packed() FigureArgs {
	if a.Heat == nil || a.Heat.Z == nil {
		return a
	}
	h := *a.Heat
	a.HeatZ = packFloats(len(h.Z), func(i int) float64 { return h.Z[i] })
	h.Z, a.Heat = nil, &h
	return a
}

// Unpacked returns a with the values of HeatZ back in its heat map. Special cases are:
// HeatZ of another length than the map's grid is an error.
func (a FigureArgs) Unpacked() (FigureArgs, error) {
	if a.Heat == nil || a.HeatZ == nil {
		return a, nil
	}
	h := *a.Heat
	z, err := unpackFloats(a.HeatZ, len(h.X)*len(h.Y), "heat z")
	if err != nil {
		return a, err
	}
	h.Z, a.Heat, a.HeatZ = z, &h, nil
	return a, nil
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
