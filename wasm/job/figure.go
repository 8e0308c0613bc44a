package job

import (
	"errors"
	"math"

	"hdrisk/engine/plot"
	"hdrisk/protocol"
)

func init() {
	Serve(protocol.Figure, func(a protocol.FigureArgs, _ func(int, int)) (protocol.FigureResult, error) { return Figure(a) })
}

// finiteMarks drops marks that cannot be placed.
func finiteMarks(ms []plot.Mark) []plot.Mark {
	var out []plot.Mark
	for _, m := range ms {
		if !math.IsNaN(m.At) && !math.IsInf(m.At, 0) {
			out = append(out, m)
		}
	}
	return out
}

// Figure builds a figure and renders it as SVG, and as PDF when asked. Special cases are: neither or both of Line
// and Heat is an error; marks at a NaN or infinite place are left out; the errors of plot's
// Build and render are returned as they are.
func Figure(a protocol.FigureArgs) (protocol.FigureResult, error) {
	a, err := a.Unpacked()
	if err != nil {
		return protocol.FigureResult{}, err
	}
	var f *plot.Figure
	switch {
	case a.Line != nil && a.Heat == nil:
		l := *a.Line
		l.VLines, l.HLines = finiteMarks(l.VLines), finiteMarks(l.HLines)
		f, err = l.Build()
	case a.Heat != nil && a.Line == nil:
		f, err = a.Heat.Build()
	default:
		return protocol.FigureResult{}, errors.New("figure: give exactly one of line and heat")
	}
	if err != nil {
		return protocol.FigureResult{}, err
	}
	data, err := f.SVG()
	if err != nil {
		return protocol.FigureResult{}, err
	}
	r := protocol.FigureResult{Data: data, Frame: f.Frame()}
	if a.PDF {
		if r.PDF, err = f.PDF(); err != nil {
			return protocol.FigureResult{}, err
		}
	}
	return r, nil
}
