package plot

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/study"

	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/recorder"
)

// sized gives gonum's recording canvas the size the figure is drawn at.
type sized struct {
	*recorder.Canvas
	w, h vg.Length
}

func (s sized) Size() (vg.Length, vg.Length) { return s.w, s.h }

// placedText is a text the figure drew, with its box in figure points (origin bottom-left).
type placedText struct {
	s   string
	box Box
}

// affine is a 2-D transform: (x, y) -> (a x + b y + c, d x + e y + f).
type affine struct{ a, b, c, d, e, f float64 }

func (m affine) apply(x, y float64) (float64, float64) {
	return m.a*x + m.b*y + m.c, m.d*x + m.e*y + m.f
}

func (m affine) then(n affine) affine { // m applied after n: m(n(p))
	return affine{
		a: m.a*n.a + m.b*n.d, b: m.a*n.b + m.b*n.e, c: m.a*n.c + m.b*n.f + m.c,
		d: m.d*n.a + m.e*n.d, e: m.d*n.b + m.e*n.e, f: m.d*n.c + m.e*n.f + m.f,
	}
}

// texts replays what f draws on a recording canvas and returns every text with its box,
// measured with the font metrics the figure is laid out with, through the canvas
// transforms in force when it was drawn (rotated axis labels included).
func texts(t *testing.T, f *Figure) []placedText {
	t.Helper()
	rc := &recorder.Canvas{}
	if err := f.render(sized{rc, f.w, f.h}); err != nil {
		t.Fatal(err)
	}
	m := affine{a: 1, e: 1}
	var stack []affine
	var out []placedText
	for _, a := range rc.Actions {
		switch a := a.(type) {
		case *recorder.Push:
			stack = append(stack, m)
		case *recorder.Pop:
			m, stack = stack[len(stack)-1], stack[:len(stack)-1]
		case *recorder.Translate:
			m = m.then(affine{a: 1, e: 1, c: float64(a.Point.X), f: float64(a.Point.Y)})
		case *recorder.Rotate:
			s, c := math.Sincos(a.Angle)
			m = m.then(affine{a: c, b: -s, d: s, e: c})
		case *recorder.Scale:
			m = m.then(affine{a: a.X, e: a.Y})
		case *recorder.FillString:
			fnt := a.Font
			fnt.Size = a.Size
			face := font.DefaultCache.Lookup(fnt, a.Size)
			ext := face.Extents()
			x0, y0 := float64(a.Point.X), float64(a.Point.Y-ext.Descent)
			x1, y1 := float64(a.Point.X+face.Width(a.String)), float64(a.Point.Y+ext.Ascent)
			b := Box{MinX: math.Inf(1), MinY: math.Inf(1), MaxX: math.Inf(-1), MaxY: math.Inf(-1)}
			for _, p := range [4][2]float64{{x0, y0}, {x1, y0}, {x0, y1}, {x1, y1}} {
				x, y := m.apply(p[0], p[1])
				b.MinX, b.MaxX = math.Min(b.MinX, x), math.Max(b.MaxX, x)
				b.MinY, b.MaxY = math.Min(b.MinY, y), math.Max(b.MaxY, y)
			}
			out = append(out, placedText{s: a.String, box: b})
		}
	}
	return out
}

// toPoints converts a data point to figure points (origin bottom-left) through the frame.
func toPoints(f *Figure, x, y float64) (float64, float64) {
	w, h := f.Size()
	px, py := f.Frame().Where(x, y, w, h)
	return px, h - py
}

// sweepCase is a line figure of the kind the curve view draws.
type sweepCase struct {
	name         string
	line         Line
	xTick, yTick float64 // values that must be labelled
}

func sweepCases() []sweepCase {
	// Five kept curves of NMSE (dB) from about -40 to +5 dB with a double-descent peak
	// at m/n = 1, and the same over l1 across four decades: shapes like the curve view's
	// sweeps, made up so that the test needs no solver.
	var overAlpha, overL1 []Series
	for k := 0; k < 5; k++ {
		var ax, ay, lx, ly []float64
		for i := 0; i <= 80; i++ {
			a := 0.1 + 1.9*float64(i)/80
			ax = append(ax, a)
			ay = append(ay, -40+6*float64(k)+45*float64(5-k)/5*math.Exp(-25*(a-1)*(a-1)))
			l := math.Pow(10, -4+4*float64(i)/80)
			lx = append(lx, l)
			ly = append(ly, -40+5*float64(k)+(40+5)*math.Pow(math.Log10(l)/4+1, 2)*float64(k+1)/5-8*math.Log10(l+1e-3))
		}
		name := fmt.Sprintf("Gaussian design, l1 = %s", label(math.Pow(10, float64(k)-4)))
		overAlpha = append(overAlpha, Series{Name: name, X: ax, Y: ay})
		overL1 = append(overL1, Series{Name: fmt.Sprintf("m/n = %.1f", 0.4+0.4*float64(k)), X: lx, Y: ly})
	}
	var out []sweepCase
	for _, sz := range [][2]float64{{0, 0}, {270, 190}, {360, 240}, {720, 450}} {
		tag := fmt.Sprintf(" %gx%g", sz[0], sz[1])
		out = append(out,
			sweepCase{"m/n" + tag, Line{Title: "NMSE (dB) against m/n", XLabel: "m/n", YLabel: "NMSE (dB)", Series: overAlpha,
				XTicks: []float64{1}, HLines: []Mark{{At: -22.5, Label: "Bayes-optimal"}}, Width: sz[0], Height: sz[1]}, 1, 0},
			sweepCase{"l1" + tag, Line{Title: "NMSE (dB) against l1", XLabel: "l1", YLabel: "NMSE (dB)", XLog: true, Series: overL1,
				VLines: []Mark{{At: 0.0123, Label: "best l1 = 0.0123"}}, HLines: []Mark{{At: -30, Label: "Bayes-optimal"}}, Width: sz[0], Height: sz[1]}, 1, 0},
			sweepCase{"m/n one curve" + tag, Line{Title: "NMSE (dB) against m/n", XLabel: "m/n", YLabel: "NMSE (dB)", Series: overAlpha[:1],
				XTicks: []float64{1}, Width: sz[0], Height: sz[1]}, 1, 0},
		)
	}
	return out
}

// Figure layout from the figure's own geometry: the legend covers no plotted segment, the
// axes label m/n = 1 and 0 dB, no text leaves the canvas and no two texts overlap.
func TestLineLayoutGolden(t *testing.T) {
	for _, tc := range sweepCases() {
		t.Run(tc.name, func(t *testing.T) {
			f, err := tc.line.Build()
			if err != nil {
				t.Fatal(err)
			}
			w, h := f.Size()
			canvas := Box{MaxX: w, MaxY: h}
			lay := f.Layout()
			ts := texts(t, f)
			if len(ts) < 10 {
				t.Fatalf("only %d texts drawn", len(ts))
			}
			for _, x := range ts {
				if !x.box.Inside(canvas) {
					t.Errorf("text %q at %+v leaves the %gx%g canvas", x.s, x.box, w, h)
				}
			}
			for i := range ts {
				for j := i + 1; j < len(ts); j++ {
					if ts[i].box.Overlaps(ts[j].box) {
						t.Errorf("texts %q %+v and %q %+v overlap", ts[i].s, ts[i].box, ts[j].s, ts[j].box)
					}
				}
			}
			// The legend's texts are drawn inside the box the figure reports.
			for _, s := range tc.line.Series {
				found := false
				for _, x := range ts {
					if x.s == s.Name && x.box.Inside(lay.Legend) {
						found = true
					}
				}
				if !found {
					t.Errorf("legend entry %q not drawn inside the legend box %+v", s.Name, lay.Legend)
				}
			}
			// No plotted segment, from the series through the frame, crosses the legend box.
			for _, s := range tc.line.Series {
				for i := 1; i < len(s.X); i++ {
					x0, y0 := toPoints(f, s.X[i-1], s.Y[i-1])
					x1, y1 := toPoints(f, s.X[i], s.Y[i])
					if clips(lay.Legend.MinX, lay.Legend.MinY, lay.Legend.MaxX, lay.Legend.MaxY, x0, y0, x1, y1) {
						t.Fatalf("the legend %+v covers the segment of %q from (%g, %g) to (%g, %g)", lay.Legend, s.Name, s.X[i-1], s.Y[i-1], s.X[i], s.Y[i])
					}
				}
			}
			for _, m := range tc.line.VLines {
				x, _ := toPoints(f, m.At, 1)
				if clips(lay.Legend.MinX, lay.Legend.MinY, lay.Legend.MaxX, lay.Legend.MaxY, x, lay.Data.MinY, x, lay.Data.MaxY) {
					t.Errorf("the legend covers the mark at %g", m.At)
				}
			}
			// The tick labels: "1" under the data area at x = 1, "0" left of it at y = 0.
			want := func(text string, isX bool, v float64) {
				for _, x := range ts {
					if x.s != text {
						continue
					}
					cx, cy := (x.box.MinX+x.box.MaxX)/2, (x.box.MinY+x.box.MaxY)/2
					if isX {
						px, _ := toPoints(f, v, 1)
						if math.Abs(cx-px) < 1 && x.box.MaxY < lay.Data.MinY {
							return
						}
					} else {
						_, py := toPoints(f, 1, v)
						if math.Abs(cy-py) < 2 && x.box.MaxX < lay.Data.MinX {
							return
						}
					}
				}
				t.Errorf("no tick label %q at %g on the %s axis", text, v, map[bool]string{true: "x", false: "y"}[isX])
			}
			want(label(tc.xTick), true, tc.xTick)
			want(label(tc.yTick), false, tc.yTick)
		})
	}
}

// A map's texts (ticks, colour bar, contour levels, the lowest-point label) stay on the
// canvas and clear of each other, and every contour level is written on the map.
func TestHeatLayoutGolden(t *testing.T) {
	n := 60
	x, y := make([]float64, n), make([]float64, n)
	z := make([]float64, n*n)
	for i := range x {
		x[i] = math.Pow(10, -4+4*float64(i)/float64(n-1))
		y[i] = 0.1 + 1.9*float64(i)/float64(n-1)
	}
	for j := range y {
		for i := range x {
			z[j*n+i] = -30 + 10*math.Sin(3*y[j]) + 5*math.Log10(x[i])*math.Cos(2*y[j])
		}
	}
	levels := []float64{-35, -30, -25}
	for _, sz := range [][2]float64{{0, 0}, {280, 200}, {720, 450}} {
		f, err := Heat{Title: "NMSE (dB) over l1 and m/n", XLabel: "l1", YLabel: "m/n", ZLabel: "NMSE (dB)", X: x, Y: y, Z: z,
			XLog: true, MarkLowest: true, YTicks: []float64{1}, Levels: levels, Width: sz[0], Height: sz[1]}.Build()
		if err != nil {
			t.Fatal(err)
		}
		w, h := f.Size()
		ts := texts(t, f)
		for i := range ts {
			if !ts[i].box.Inside(Box{MaxX: w, MaxY: h}) {
				t.Errorf("%gx%g: text %q at %+v leaves the canvas", w, h, ts[i].s, ts[i].box)
			}
			for j := i + 1; j < len(ts); j++ {
				if ts[i].box.Overlaps(ts[j].box) {
					t.Errorf("%gx%g: texts %q and %q overlap", w, h, ts[i].s, ts[j].s)
				}
			}
		}
		seen := map[string]int{}
		for _, x := range ts {
			if x.box.Inside(f.Layout().Data) {
				seen[x.s]++
			}
		}
		for _, lv := range levels {
			if seen[label(lv)] == 0 {
				t.Errorf("%gx%g: contour level %g is not written on the map (texts inside: %v)", w, h, lv, seen)
			}
		}
		if !strings.Contains(fmt.Sprint(seen), "lowest") {
			t.Errorf("%gx%g: the lowest point is not labelled", w, h)
		}
	}
}

// A plan's figure labels its target on the error axis, beside the target's line, and marks
// the m/n found.
func TestPlanFigureLabelsTarget(t *testing.T) {
	var pts []study.Point
	for i := 0; i <= 40; i++ {
		a := 1 * math.Pow(8, float64(i)/40)
		pts = append(pts, study.Point{X: a, Result: fixedpoint.Result{NMSEdB: -5 - 12*math.Log(a), Converged: true}})
	}
	l, ok := PlanFigure{Curve: pts, Over: "l1", Target: -17, Alpha: 2.72}.Line()
	if !ok {
		t.Fatal("no figure")
	}
	f, err := l.Build()
	if err != nil {
		t.Fatal(err)
	}
	ts := texts(t, f)
	var target, answer bool
	for _, x := range ts {
		_, py := toPoints(f, 2, -17)
		if x.s == "-17" && math.Abs((x.box.MinY+x.box.MaxY)/2-py) < 2 && x.box.MaxX < f.Layout().Data.MinX {
			target = true
		}
		if strings.HasPrefix(x.s, "m/n = 2.72") {
			answer = true
		}
	}
	if !target || !answer {
		t.Errorf("target labelled on the axis: %v; answer marked: %v", target, answer)
	}
}
