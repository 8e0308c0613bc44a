package ui

import (
	"bytes"
	"errors"
	"fmt"
	"image/color"
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/stat/distuv"
	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"hdrisk/engine/design"
	"hdrisk/engine/signal"
)

// The editor's two small figures: the law of the design's singular values and the law of
// the signal's entries. They are drawn here, not by the studies' figure package, because
// they need bars and atoms rather than curves; colours are those of the Okabe-Ito palette
// (Okabe and Ito 2008, "Color Universal Design").
var (
	editorBlue       = color.RGBA{0x00, 0x72, 0xB2, 0xFF}
	editorVermillion = color.RGBA{0xD5, 0x5E, 0x00, 0xFF}
	editorSky        = color.RGBA{0x56, 0xB4, 0xE9, 0xFF}
)

// Size of an editor figure, in points; shown at the width of the editor column.
const (
	editorPlotW = 260
	editorPlotH = 120
	// editorPlotN is the number of columns of the instance whose singular values are shown.
	editorPlotN = 400
	// editorMaxAtoms: a law with at most this many distinct values is drawn as atoms.
	editorMaxAtoms = 12
	// editorSamples is the number of draws histogrammed for a law known only by sampling.
	editorSamples = 20000
)

// lawPlot is a figure of a law as an <img>: its SVG, the URL it is shown under (set by the
// root, see imageURL; "" when there is no image) and a text alternative.
type lawPlot struct {
	URL, Alt string
	svg      []byte
}

// designPlot draws the singular values of an m x n instance of law (n = 400, m = alpha n),
// taken from the quantiles of the law (design.Law.SingularValues): a histogram normalised to
// a density, or atoms with their share when the values take few distinct levels.
func designPlot(law design.Law) (lawPlot, error) {
	n := editorPlotN
	m := max(1, int(math.Round(law.Alpha()*float64(n))))
	sv := law.SingularValues(m, n)
	if len(sv) == 0 {
		return lawPlot{}, errors.New("the design has no singular values to show")
	}
	p := newEditorPlot("singular value", "density")
	lo, hi := slices.Min(sv), slices.Max(sv)
	if atoms, ok := distinct(sv); ok {
		if err := addAtoms(p, atoms, editorBlue, true); err != nil {
			return lawPlot{}, err
		}
		p.Y.Label.Text = "share"
	} else {
		h, err := plotter.NewHist(plotter.Values(sv), 24)
		if err != nil {
			return lawPlot{}, err
		}
		h.Normalize(1)
		h.FillColor, h.LineStyle.Color = editorSky, editorBlue
		p.Add(h)
	}
	alt := fmt.Sprintf("Singular values of a %d x %d instance of this design, from %.3g to %.3g (after scaling).", m, n, lo, hi)
	return render(p, alt)
}

// signalPlot draws the law of one signal entry from its Gaussian-mixture form
// (signal.Law.Mixture): point masses as atoms with their probability, the rest as a density.
// A law whose mixture is a discretization with point masses (not the law itself) is drawn
// as a histogram of draws from the law instead, so that no artefact of the discretization
// shows.
func signalPlot(law signal.Law) (lawPlot, error) {
	comps := law.Mixture()
	var atoms []plotter.XY
	var cont []signal.Component
	for _, c := range comps {
		if c.Weight <= 0 {
			continue
		}
		if c.Var == 0 {
			atoms = append(atoms, plotter.XY{X: c.Mean, Y: c.Weight})
		} else {
			cont = append(cont, c)
		}
	}
	p := newEditorPlot("value of an entry", "density")
	if !law.Exact() && len(atoms) > 0 {
		x := law.Sample(rand.New(rand.NewPCG(1, 2)), editorSamples)
		h, err := plotter.NewHist(plotter.Values(x), 40)
		if err != nil {
			return lawPlot{}, err
		}
		h.Normalize(1)
		h.FillColor, h.LineStyle.Color = editorSky, editorBlue
		p.Add(h)
		return render(p, fmt.Sprintf("Histogram of %d draws of one signal entry.", editorSamples))
	}
	alt := "Law of one signal entry:"
	var top float64 // the highest point of the density
	if len(cont) > 0 {
		lo, hi := math.Inf(1), math.Inf(-1)
		var total float64
		for _, c := range cont {
			total += c.Weight
		}
		for _, c := range cont {
			if c.Weight < 1e-3*total {
				continue
			}
			sd := math.Sqrt(c.Var)
			lo, hi = math.Min(lo, c.Mean-4*sd), math.Max(hi, c.Mean+4*sd)
		}
		for _, a := range atoms {
			lo, hi = math.Min(lo, a.X), math.Max(hi, a.X)
		}
		if rms := math.Sqrt(law.Second()); rms > 0 {
			lo, hi = math.Max(lo, -8*rms), math.Min(hi, 8*rms)
		}
		const points = 241
		line := make(plotter.XYs, points)
		for i := range line {
			x := lo + (hi-lo)*float64(i)/(points-1)
			var d float64
			for _, c := range cont {
				d += c.Weight * distuv.Normal{Mu: c.Mean, Sigma: math.Sqrt(c.Var)}.Prob(x)
			}
			line[i] = plotter.XY{X: x, Y: d}
			top = math.Max(top, d)
		}
		l, err := plotter.NewLine(line)
		if err != nil {
			return lawPlot{}, err
		}
		l.Color, l.Width = editorBlue, vg.Points(1.5)
		l.FillColor = color.NRGBA{0x56, 0xB4, 0xE9, 0x60}
		p.Add(l)
		alt += fmt.Sprintf(" a density carrying probability %.3g, drawn from %.3g to %.3g;", total, lo, hi)
	}
	if len(atoms) > 0 {
		shown := atoms
		if len(cont) > 0 {
			// A point mass has no density: beside a density its stem reaches the top of the
			// figure and its probability is written beside it.
			shown = make([]plotter.XY, len(atoms))
			labels := plotter.XYLabels{}
			for i, a := range atoms {
				shown[i] = plotter.XY{X: a.X, Y: 1.15 * top}
				labels.XYs = append(labels.XYs, plotter.XY{X: a.X, Y: 1.15 * top})
				labels.Labels = append(labels.Labels, fmt.Sprintf(" P = %.3g", a.Y))
			}
			l, err := plotter.NewLabels(labels)
			if err != nil {
				return lawPlot{}, err
			}
			for i := range l.TextStyle {
				l.TextStyle[i].Font = font.Font{Typeface: "Liberation", Variant: "Sans", Size: vg.Points(9)}
				l.TextStyle[i].Color = editorVermillion
				l.TextStyle[i].YAlign = draw.YTop
			}
			p.Add(l)
		}
		if err := addAtoms(p, shown, editorVermillion, len(cont) == 0); err != nil {
			return lawPlot{}, err
		}
		if len(cont) == 0 {
			p.Y.Label.Text = "probability"
		} else {
			p.Y.Label.Text = "density"
		}
		alt += fmt.Sprintf(" %d point mass(es), the largest %.3g at %.3g;", len(atoms), maxWeight(atoms).Y, maxWeight(atoms).X)
	}
	return render(p, alt)
}

func maxWeight(a []plotter.XY) plotter.XY {
	best := a[0]
	for _, x := range a[1:] {
		if x.Y > best.Y {
			best = x
		}
	}
	return best
}

// distinct returns the distinct values of v with their share, when there are at most
// editorMaxAtoms of them (values within 1e-9 relative count as one).
func distinct(v []float64) ([]plotter.XY, bool) {
	s := slices.Clone(v)
	slices.Sort(s)
	var out []plotter.XY
	for _, x := range s {
		if k := len(out) - 1; k >= 0 && math.Abs(x-out[k].X) <= 1e-9*math.Max(1, math.Abs(x)) {
			out[k].Y++
			continue
		}
		if len(out) == editorMaxAtoms {
			return nil, false
		}
		out = append(out, plotter.XY{X: x, Y: 1})
	}
	for i := range out {
		out[i].Y /= float64(len(s))
	}
	return out, true
}

// addAtoms draws each point mass as a stem from zero up to its height, topped by a dot.
// alone tells that nothing else is drawn, so a single atom needs room on both sides.
func addAtoms(p *gplot.Plot, atoms []plotter.XY, col color.Color, alone bool) error {
	for _, a := range atoms {
		l, err := plotter.NewLine(plotter.XYs{{X: a.X, Y: 0}, a})
		if err != nil {
			return err
		}
		l.Color, l.Width = col, vg.Points(2)
		p.Add(l)
	}
	s, err := plotter.NewScatter(plotter.XYs(atoms))
	if err != nil {
		return err
	}
	s.GlyphStyle = draw.GlyphStyle{Color: col, Radius: vg.Points(3), Shape: draw.CircleGlyph{}}
	p.Add(s)
	p.Y.Min = 0
	if alone && len(atoms) == 1 {
		w := math.Max(0.5*math.Abs(atoms[0].X), 0.5)
		p.X.Min, p.X.Max = atoms[0].X-w, atoms[0].X+w
	}
	return nil
}

func newEditorPlot(x, y string) *gplot.Plot {
	p := gplot.New()
	for _, f := range []*font.Font{&p.X.Label.TextStyle.Font, &p.Y.Label.TextStyle.Font, &p.X.Tick.Label.Font, &p.Y.Tick.Label.Font} {
		f.Typeface, f.Variant, f.Size = "Liberation", "Sans", vg.Points(9)
	}
	p.X.Label.Text, p.Y.Label.Text = x, y
	p.X.Padding, p.Y.Padding = vg.Points(2), vg.Points(2)
	return p
}

func render(p *gplot.Plot, alt string) (lp lawPlot, err error) {
	// gonum/plot panics on some degenerate ranges; that is a figure we cannot draw, not a crash.
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("the figure cannot be drawn: %v", r)
		}
	}()
	c := vgsvg.New(editorPlotW, editorPlotH)
	// gonum/plot centres the end tick labels on the ends of the axis, so half of the last
	// label would fall off the canvas: keep a margin of a few characters on the right.
	p.Draw(draw.Crop(draw.New(c), 0, -vg.Points(10), 0, 0))
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return lawPlot{}, err
	}
	return lawPlot{svg: b.Bytes(), Alt: alt}, nil
}
