package job

import (
	"encoding/json"
	"errors"
	"math"

	"hdrisk/engine/plot"
)

// SeriesArgs is a plot.Series that travels as JSON (NaN gaps as null).
type SeriesArgs struct {
	Name    string  `json:"name,omitempty"`
	X       []Float `json:"x"`
	Y       []Float `json:"y"`
	Err     []Float `json:"err,omitempty"`
	Missing []Float `json:"missing,omitempty"`
	Marks   bool    `json:"marks,omitempty"`
	NoLine  bool    `json:"no_line,omitempty"`
	Dashed  bool    `json:"dashed,omitempty"`
}

// LineArgs is a plot.Line that travels as JSON.
type LineArgs struct {
	Title, XLabel, YLabel string
	XLog, YLog            bool
	Series                []SeriesArgs
	VLines, HLines        []plot.Mark
	XTicks, YTicks        []Float
	Width, Height         float64 `json:",omitempty"`
}

// HeatArgs is a plot.Heat that travels as JSON (cells without a value as null).
type HeatArgs struct {
	Title, XLabel, YLabel, ZLabel string
	X, Y, Z                       []Float
	XLog, YLog                    bool
	Lines                         []SeriesArgs
	Levels                        []Float // nil: plot's default levels
	MarkLowest                    bool    `json:",omitempty"`
	XTicks, YTicks                []Float
	Width, Height                 float64 `json:",omitempty"`
}

// FigureArgs are the arguments of the "figure" kind: one of Line or Heat, rendered as SVG.
// The page makes a PNG from the SVG itself, on a canvas of the browser.
type FigureArgs struct {
	Line *LineArgs `json:"line,omitempty"`
	Heat *HeatArgs `json:"heat,omitempty"`
	PDF  bool      `json:"pdf,omitempty"` // a PDF as well, for a download
}

// FigureResult is the rendered figure: its SVG (base64 in JSON), the PDF when asked for,
// and where its data area lies, for the pointer readout.
type FigureResult struct {
	Data  []byte     `json:"data"`
	PDF   []byte     `json:"pdf,omitempty"`
	Frame plot.Frame `json:"frame"`
}

func init() { Register("figure", runFigure) }

// Floats converts numbers to their JSON form.
func Floats(v []float64) []Float {
	if v == nil {
		return nil
	}
	out := make([]Float, len(v))
	for i, x := range v {
		out[i] = Float(x)
	}
	return out
}

func floats(v []Float) []float64 {
	if v == nil {
		return nil
	}
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = float64(x)
	}
	return out
}

// SeriesOf converts a plot.Series to its JSON form.
func SeriesOf(s plot.Series) SeriesArgs {
	return SeriesArgs{Name: s.Name, X: Floats(s.X), Y: Floats(s.Y), Err: Floats(s.Err), Missing: Floats(s.Missing),
		Marks: s.Marks, NoLine: s.NoLine, Dashed: s.Dashed}
}

func (s SeriesArgs) series() plot.Series {
	return plot.Series{Name: s.Name, X: floats(s.X), Y: floats(s.Y), Err: floats(s.Err), Missing: floats(s.Missing),
		Marks: s.Marks, NoLine: s.NoLine, Dashed: s.Dashed}
}

// LineOf converts a plot.Line to its JSON form.
func LineOf(l plot.Line) *LineArgs {
	a := &LineArgs{Title: l.Title, XLabel: l.XLabel, YLabel: l.YLabel, XLog: l.XLog, YLog: l.YLog, VLines: finiteMarks(l.VLines), HLines: finiteMarks(l.HLines),
		XTicks: Floats(l.XTicks), YTicks: Floats(l.YTicks), Width: l.Width, Height: l.Height}
	for _, s := range l.Series {
		a.Series = append(a.Series, SeriesOf(s))
	}
	return a
}

// finiteMarks drops marks that cannot be placed (and could not travel as JSON).
func finiteMarks(ms []plot.Mark) []plot.Mark {
	var out []plot.Mark
	for _, m := range ms {
		if !math.IsNaN(m.At) && !math.IsInf(m.At, 0) {
			out = append(out, m)
		}
	}
	return out
}

// HeatOf converts a plot.Heat to its JSON form.
func HeatOf(h plot.Heat) *HeatArgs {
	a := &HeatArgs{Title: h.Title, XLabel: h.XLabel, YLabel: h.YLabel, ZLabel: h.ZLabel, X: Floats(h.X), Y: Floats(h.Y), Z: Floats(h.Z),
		XLog: h.XLog, YLog: h.YLog, Levels: Floats(h.Levels), MarkLowest: h.MarkLowest, XTicks: Floats(h.XTicks), YTicks: Floats(h.YTicks),
		Width: h.Width, Height: h.Height}
	for _, s := range h.Lines {
		a.Lines = append(a.Lines, SeriesOf(s))
	}
	return a
}

// Figure builds a figure and renders it as SVG. Special cases are: neither or both of Line
// and Heat is an error; the errors of plot's Build and render are returned as they are.
func Figure(a FigureArgs) (FigureResult, error) {
	var (
		f   *plot.Figure
		err error
	)
	switch {
	case a.Line != nil && a.Heat == nil:
		l := plot.Line{Title: a.Line.Title, XLabel: a.Line.XLabel, YLabel: a.Line.YLabel, XLog: a.Line.XLog, YLog: a.Line.YLog,
			VLines: a.Line.VLines, HLines: a.Line.HLines, XTicks: floats(a.Line.XTicks), YTicks: floats(a.Line.YTicks),
			Width: a.Line.Width, Height: a.Line.Height}
		for _, s := range a.Line.Series {
			l.Series = append(l.Series, s.series())
		}
		f, err = l.Build()
	case a.Heat != nil && a.Line == nil:
		h := plot.Heat{Title: a.Heat.Title, XLabel: a.Heat.XLabel, YLabel: a.Heat.YLabel, ZLabel: a.Heat.ZLabel,
			X: floats(a.Heat.X), Y: floats(a.Heat.Y), Z: floats(a.Heat.Z), XLog: a.Heat.XLog, YLog: a.Heat.YLog, Levels: floats(a.Heat.Levels),
			MarkLowest: a.Heat.MarkLowest, XTicks: floats(a.Heat.XTicks), YTicks: floats(a.Heat.YTicks), Width: a.Heat.Width, Height: a.Heat.Height}
		for _, s := range a.Heat.Lines {
			h.Lines = append(h.Lines, s.series())
		}
		f, err = h.Build()
	default:
		return FigureResult{}, errors.New("figure: give exactly one of line and heat")
	}
	if err != nil {
		return FigureResult{}, err
	}
	data, err := f.SVG()
	if err != nil {
		return FigureResult{}, err
	}
	r := FigureResult{Data: data, Frame: f.Frame()}
	if a.PDF {
		if r.PDF, err = f.PDF(); err != nil {
			return FigureResult{}, err
		}
	}
	return r, nil
}

func runFigure(raw json.RawMessage, _ func(done, total int)) (any, error) {
	var a FigureArgs
	if err := json.Unmarshal(raw, &a); err != nil {
		return nil, errors.New("figure arguments: " + err.Error())
	}
	return Figure(a)
}
