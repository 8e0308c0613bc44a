package plot

import (
	"math"
	"strconv"

	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
)

// The figures of the studies: the page's curve and map views and the command line's
// `sweep --figure` and `map --figure` build them here from the same numbers, so that a
// figure saved from the page and one written by the command line agree.

// Curve is one computed curve of a sweep.
type Curve struct {
	Label  string // legend text; "" for the one curve of a figure that needs no legend
	Points []study.Point
	Dashed bool
}

// BestMark is the best weight of the swept field, drawn as a labelled vertical line.
type BestMark struct {
	Over  string
	Value float64
}

// SweepFigure is the curve figure of a sweep.
type SweepFigure struct {
	Scenario scenario.Scenario // the scenario swept: it names the axis
	Axis     study.Axis
	Quantity string // an observable's name (study.Observables); "" for nmse_db
	YLog     bool   // honoured only for a quantity LogAllowed allows
	Curves   []Curve
	Best     *BestMark         // nil: none
	Bayes    *study.BayesPoint // the Bayes-optimal error, drawn as a labelled horizontal line; nil: none
	Width    float64           // points; 0 takes DefaultWidth
	Height   float64
}

// Quantities are the observables a sweep's figure can show: every fixed point's, then those
// of a generalized linear model (cosine, test error, ...; NaN, so not drawn, at a point
// without them).
func Quantities() []study.Observable {
	return append(study.Observables(), study.GLMObservables()...)
}

// Observable returns the observable named q among Quantities ("" and unknown names give
// NMSE in dB).
func Observable(q string) study.Observable {
	for _, o := range Quantities() {
		if o.Name == q {
			return o
		}
	}
	for _, o := range study.Observables() {
		if o.Name == "nmse_db" {
			return o
		}
	}
	return study.Observables()[0]
}

// LogAllowed reports whether the observable named q is never negative, so that it can be
// drawn on a logarithmic axis (a value in dB or a signed statistic cannot).
func LogAllowed(q string) bool {
	switch q {
	case "mse", "nmse", "susceptibility", "nonzero_fraction", "tpp", "fdp", "train_error",
		"norm_ratio", "test_error", "train_misfit", "train_loss":
		return true
	}
	return false
}

// HigherBetter reports whether a larger value of the observable named q is the better
// estimate (the cosine of xhat and x0), so that a map marks its highest cell, not its lowest.
func HigherBetter(q string) bool { return q == "cosine" }

// FieldLabel returns the short name of a field of s for an axis: its name ("m/n" for
// alpha), with its unit when it has one.
func FieldLabel(s scenario.Scenario, name string) string {
	for _, p := range s.Paths() {
		if p.Name == name || p.Path == name {
			n := p.Name
			if n == "alpha" {
				n = "m/n"
			}
			if p.Unit != "" {
				n += " (" + p.Unit + ")"
			}
			return n
		}
	}
	if name == "alpha" {
		return "m/n"
	}
	return name
}

// Values returns the x values of points, the values of q (NaN where a point has none) and
// the x of the points without a converged value.
func Values(pts []study.Point, q study.Observable) (x, y, missing []float64) {
	for _, p := range pts {
		x = append(x, p.X)
		if p.OK() {
			y = append(y, q.Of(p.Result))
		} else {
			y = append(y, math.NaN())
			missing = append(missing, p.X)
		}
	}
	return x, y, missing
}

// Line returns the line figure. Special cases are: no curve with points gives ok false.
func (sf SweepFigure) Line() (l Line, ok bool) {
	q := Observable(sf.Quantity)
	var ss []Series
	for _, c := range sf.Curves {
		if len(c.Points) == 0 {
			continue
		}
		x, y, miss := Values(c.Points, q)
		ss = append(ss, Series{Name: c.Label, X: x, Y: y, Missing: miss, Dashed: c.Dashed})
	}
	if len(ss) == 0 {
		return Line{}, false
	}
	xl := FieldLabel(sf.Scenario, sf.Axis.Over)
	l = Line{Title: q.Label + " against " + xl, XLabel: xl, YLabel: q.Label, XLog: sf.Axis.Log,
		YLog: sf.YLog && LogAllowed(q.Name), Series: ss, Width: sf.Width, Height: sf.Height}
	if sf.Axis.Over == "alpha" {
		l.XTicks = []float64{1} // as many measurements as unknowns
	}
	if sf.Best != nil {
		l.VLines = append(l.VLines, Mark{At: sf.Best.Value, Label: "best " + sf.Best.Over + " = " + strconv.FormatFloat(sf.Best.Value, 'g', 4, 64)})
	}
	if sf.Bayes != nil {
		v := math.NaN()
		switch q.Name {
		case "mse":
			v = sf.Bayes.MSE
		case "nmse":
			v = sf.Bayes.NMSE
		case "nmse_db":
			v = sf.Bayes.NMSEdB
		}
		if !math.IsNaN(v) {
			l.HLines = append(l.HLines, Mark{At: v, Label: "Bayes-optimal"})
		}
	}
	return l, true
}

// TunedCurve turns the points of a best-tuned curve into a Curve named after the weight.
func TunedCurve(over string, pts []study.TunedPoint) Curve {
	c := Curve{Label: "best-tuned " + over, Dashed: true}
	for _, p := range pts {
		c.Points = append(c.Points, p.Point)
	}
	return c
}

// MapFigure is the heat figure of a map.
type MapFigure struct {
	Scenario scenario.Scenario
	X, Y     study.Axis
	Quantity string
	Cells    []study.Point // Cells[j*X.Points + i] at (X[i], Y[j])
	Width    float64
	Height   float64
}

// WeightAxis returns 0 or 1 for the axis that varies the penalty's l1 or l2, -1 if none.
func (mf MapFigure) WeightAxis() int {
	for k, a := range []study.Axis{mf.X, mf.Y} {
		if a.Over == "l1" || a.Over == "l2" {
			if _, ok := mf.Scenario.Penalty.Params[a.Over]; ok {
				return k
			}
		}
	}
	return -1
}

// Ridge returns the best regularization along the weight axis: for every value of the
// other axis, the weight with the lowest MSE among the converged cells (no point where
// none converged). Special cases are: no weight axis, or cells not filling the grid, give nil.
func (mf MapFigure) Ridge() (x, y []float64) {
	k := mf.WeightAxis()
	nx, ny := mf.X.Points, mf.Y.Points
	if k < 0 || len(mf.Cells) == 0 || len(mf.Cells) != nx*ny {
		return nil, nil
	}
	at := func(i, j int) study.Point { return mf.Cells[j*nx+i] }
	outer, inner := ny, nx
	if k == 1 {
		outer, inner = nx, ny
	}
	for o := 0; o < outer; o++ {
		best, bm := -1, math.Inf(1)
		for n := 0; n < inner; n++ {
			i, j := n, o
			if k == 1 {
				i, j = o, n
			}
			if p := at(i, j); p.OK() && p.Result.MSE < bm {
				best, bm = n, p.Result.MSE
			}
		}
		if best < 0 {
			continue
		}
		i, j := best, o
		if k == 1 {
			i, j = o, best
		}
		p := at(i, j)
		x, y = append(x, p.X), append(y, p.Y)
	}
	return x, y
}

// Grid returns the axes' values and the quantity at every cell (NaN where there is none).
func (mf MapFigure) Grid() (xs, ys, z []float64) {
	nx, ny := mf.X.Points, mf.Y.Points
	q := Observable(mf.Quantity)
	xs, ys, z = make([]float64, nx), make([]float64, ny), make([]float64, nx*ny)
	for k, p := range mf.Cells {
		if k >= nx*ny {
			break
		}
		i, j := k%nx, k/nx
		xs[i], ys[j] = p.X, p.Y
		z[k] = math.NaN()
		if p.OK() {
			z[k] = q.Of(p.Result)
		}
	}
	return xs, ys, z
}

// Heat returns the heat figure, its contour levels chosen (Levels) and the lowest cell
// marked.
func (mf MapFigure) Heat() Heat {
	xs, ys, z := mf.Grid()
	q := Observable(mf.Quantity)
	h := Heat{Title: q.Label, XLabel: FieldLabel(mf.Scenario, mf.X.Over), YLabel: FieldLabel(mf.Scenario, mf.Y.Over),
		ZLabel: q.Label, X: xs, Y: ys, Z: z, XLog: mf.X.Log, YLog: mf.Y.Log, MarkLowest: !HigherBetter(q.Name),
		Width: mf.Width, Height: mf.Height}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range z {
		if !math.IsNaN(v) {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	h.Levels = Levels(lo, hi)
	if mf.X.Over == "alpha" {
		h.XTicks = []float64{1}
	}
	if mf.Y.Over == "alpha" {
		h.YTicks = []float64{1}
	}
	if rx, ry := mf.Ridge(); len(rx) > 0 {
		h.Lines = []Series{{X: rx, Y: ry}}
		w := []study.Axis{mf.X, mf.Y}[mf.WeightAxis()].Over
		h.Title += "; orange: lowest error along " + w
	}
	return h
}

// WantsBest reports whether a sweep of s over the field over draws the best value of that
// field: over is the penalty's l1 or l2 weight.
func WantsBest(s scenario.Scenario, over string) bool {
	_, has := s.Penalty.Params[over]
	return (over == "l1" || over == "l2") && has && study.DefaultOver(s) != ""
}

// WantsBayes reports whether a sweep of s over the field over draws the Bayes-optimal
// error: over is a setting of the penalty, so that the problem, and with it the
// Bayes-optimal error, is the same all along the sweep.
func WantsBayes(s scenario.Scenario, over string) bool {
	for _, p := range s.Paths() {
		if p.Name == over || p.Path == over {
			return len(p.Path) > 8 && p.Path[:8] == "penalty."
		}
	}
	return false
}

// FixedLabel names the curve of the scenario as it stands beside its best-tuned curve: by
// the value of the weight the other one re-tunes.
func FixedLabel(s scenario.Scenario, tuned string) string {
	name := tuned
	if tuned == study.Ratio {
		name = "l1"
	}
	if v, ok := s.Penalty.Params[name]; ok {
		return name + " = " + strconv.FormatFloat(v, 'g', 4, 64)
	}
	return "as set"
}

// PlanFigure is the figure of a plan: the best-tuned error against m/n around the answer,
// the target and the m/n found to reach it.
type PlanFigure struct {
	Scenario scenario.Scenario
	Curve    []study.Point // the best-tuned curve over alpha
	Over     string        // the weight tuned
	Target   float64       // NMSE in dB, or an MSE when MSE is set
	MSE      bool
	Alpha    float64 // the m/n found; NaN or 0 for none
	Width    float64
	Height   float64
}

// Line returns the line figure. Special cases are: a curve without points gives ok false.
func (pf PlanFigure) Line() (Line, bool) {
	q := "nmse_db"
	unit := " dB"
	if pf.MSE {
		q, unit = "mse", ""
	}
	sf := SweepFigure{Scenario: pf.Scenario, Axis: study.Axis{Over: "alpha", Log: true}, Quantity: q, YLog: pf.MSE,
		Curves: []Curve{{Points: pf.Curve}}, Width: pf.Width, Height: pf.Height}
	l, ok := sf.Line()
	if !ok {
		return l, false
	}
	l.Title = Observable(q).Label + " at the best " + pf.Over + " against m/n"
	l.HLines = append(l.HLines, Mark{At: pf.Target, Label: "target " + strconv.FormatFloat(pf.Target, 'g', 4, 64) + unit})
	l.YTicks = append(l.YTicks, pf.Target)
	if pf.Alpha > 0 {
		l.VLines = append(l.VLines, Mark{At: pf.Alpha, Label: "m/n = " + strconv.FormatFloat(pf.Alpha, 'g', 4, 64) + " reaches it"})
	}
	return l, true
}

// ValueLabel names the curve of a curves-per-value sweep at value v of field: "bits = 2",
// "m/n = 0.5", with the field's unit after the value when it has one other than its name.
func ValueLabel(s scenario.Scenario, field string, v float64) string {
	n, unit := field, ""
	for _, p := range s.Paths() {
		if p.Name == field || p.Path == field {
			n, unit = p.Name, p.Unit
			break
		}
	}
	if n == "alpha" {
		n = "m/n"
	}
	t := n + " = " + strconv.FormatFloat(v, 'g', 4, 64)
	if unit != "" && unit != n {
		t += " " + unit
	}
	return t
}

// ValueCurves turns the curves of a curves-per-value sweep into the Curves of one figure,
// each named by its value (ValueLabel), in order, so that the figure has a legend.
func ValueCurves(s scenario.Scenario, cs study.Curves) []Curve {
	out := make([]Curve, 0, len(cs.Curves))
	for _, c := range cs.Curves {
		out = append(out, Curve{Label: ValueLabel(s, cs.Field, c.Value), Points: c.Points})
	}
	return out
}
