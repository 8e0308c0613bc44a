package ui

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
)

// Views is the page's one copy of what its views are set to: the selected view, the texts
// of every study input (the curve's axis, the map's two axes, the planner's target, range
// and tuned weight) and the kept curves, as settings. It lives in the Model beside the
// scenario and goes with it: Model.Check writes it into the scenario's study, so that the
// address, the link, the saved file and the autosave carry it; Model.Load sets all of it
// from an opened scenario (a part the scenario lacks goes back to its proposal). The views
// read it at every render and write their edits back through the Model's setters; none
// keeps a setting of its own.
type Views struct {
	Tab      string      // the selected view (viewTabs)
	Study    string      // the study view last selected or opened: study.view
	Curve    axisText    // the curve's swept number and range
	Curves   string      // the number that sets each curve ("" for one curve): study.sweep.curves
	CurvesAt string      // its values as typed, separated by commas: study.sweep.curves_at
	Map      [2]axisText // the map's x and y axes
	Target   string      // the planner's target, in dB (or an MSE, with Unit mse)
	Unit     string      // "db" or "mse"
	AlphaMax string      // the planner's largest m/n
	Over     string      // the weight the planner tunes ("l1", "l2", study.Ratio, another field)
	Kept     []KeptCurve // curves kept beside the current one, by their settings

	// Notes say which settings were replaced because they stopped fitting the scenario
	// (a ridge penalty has no l1), until the next such replacement.
	Notes []string

	// travel holds the parts of the study that go into the scenario: those opened with it
	// and those the user ran or edited. A proposal nobody looked at does not travel.
	travel map[string]bool
}

// KeptCurve is a curve kept for comparison: the scenario and axis it sweeps. Its points
// are recomputed when it is opened.
type KeptCurve struct {
	ID       int // set by the Model: a new ID is a curve to compute
	Label    string
	Scenario scenario.Scenario
	Axis     study.Axis
}

// studyViews are the views a study can name (study.view).
var studyViews = []string{"curve", "map", "plan", "check"}

// The parts of a study that travel (Views.travel keys).
const (
	partSweep = "sweep"
	partMap   = "map"
	partPlan  = "plan"
	partBest  = "best"
)

// newViews returns the settings of a page that has opened nothing yet: the axes are
// proposed by the first Check.
func newViews() Views {
	return Views{Tab: viewTabs[0].Name, Target: full(planTargetDB), Unit: "db", AlphaMax: full(planAlphaMax),
		travel: map[string]bool{}}
}

// viewsOf returns the settings a scenario's study states; what it leaves out is proposed
// afresh by the next Check (Load keeps the selected view when the study names none).
func viewsOf(st *scenario.Study) Views {
	v := newViews()
	if st == nil {
		return v
	}
	if st.View != "" {
		v.Tab, v.Study = st.View, st.View
	}
	if w := st.Sweep; w != nil {
		v.Curve = axisText{Over: w.Over, From: full(w.From), To: full(w.To), Points: strconv.Itoa(w.Points), Log: w.Log}
		v.Curves, v.CurvesAt = w.Curves, valuesText(w.CurvesAt)
		v.travel[partSweep] = true
	}
	if m := st.Map; m != nil {
		v.Map[0] = axisText{Over: m.X, From: full(m.XFrom), To: full(m.XTo), Points: strconv.Itoa(m.XPoints), Log: m.XLog}
		v.Map[1] = axisText{Over: m.Y, From: full(m.YFrom), To: full(m.YTo), Points: strconv.Itoa(m.YPoints), Log: m.YLog}
		v.travel[partMap] = true
	}
	if p := st.Plan; p != nil {
		v.Target = full(p.TargetDB)
		if p.AlphaMax > 0 {
			v.AlphaMax = full(p.AlphaMax)
		}
		v.travel[partPlan] = true
	}
	if b := st.Best; b != nil {
		v.Over = b.Over
		v.travel[partBest] = true
	}
	for _, k := range st.Kept {
		w := k.Sweep
		v.Kept = append(v.Kept, KeptCurve{Label: k.Label, Scenario: k.Scenario,
			Axis: study.Axis{Over: w.Over, From: w.From, To: w.To, Points: w.Points, Log: w.Log}})
	}
	return v
}

// Views returns the page's study settings (read only: change them through the setters).
func (m *Model) Views() *Views { return &m.views }

// SetTab selects a view. Special cases are: an unknown name changes nothing.
func (m *Model) SetTab(name string) {
	for _, t := range viewTabs {
		if t.Name == name && m.views.Tab != name {
			m.views.Tab = name
			if slices.Contains(studyViews, name) {
				m.views.Study = name
			}
			m.vrev++
		}
	}
}

// showOnly selects a view without making it the study's view.
func (m *Model) showOnly(name string) {
	if m.views.Tab != name {
		m.views.Tab = name
		m.vrev++
	}
}

// SetCurve sets one input of the curve's axis: "over" (which proposes a range for the
// number chosen), "from", "to", "points" or "log"; or of its curves: "curves" (the number
// that sets each curve, "" for one curve) or "curves_at" (its values, separated by commas).
func (m *Model) SetCurve(name, text string) error {
	switch name {
	case "curves":
		m.views.Curves = text
		m.views.travel[partSweep] = true
		m.vrev++
		return nil
	case "curves_at":
		m.views.CurvesAt = text
		m.views.travel[partSweep] = true
		m.vrev++
		return nil
	}
	if err := m.setAxis(&m.views.Curve, name, text, sweepPoints); err != nil {
		return err
	}
	m.views.travel[partSweep] = true
	return nil
}

// SetMapAxis sets one input of the map's axis k (0: x, 1: y), as SetCurve does.
func (m *Model) SetMapAxis(k int, name, text string) error {
	if k < 0 || k > 1 {
		return fmt.Errorf("no map axis %d", k)
	}
	if err := m.setAxis(&m.views.Map[k], name, text, mapPoints); err != nil {
		return err
	}
	m.views.travel[partMap] = true
	return nil
}

func (m *Model) setAxis(a *axisText, name, text string, points int) error {
	switch name {
	case "over":
		a.Over = text
		if ch := m.Check(); ch.Err == nil {
			if p, ok := pathNamed(ch.Scenario, text); ok {
				v, _ := ch.Scenario.Get(text)
				*a = defaultAxis(p, v, points)
			}
		}
	case "from":
		a.From = text
	case "to":
		a.To = text
	case "points":
		a.Points = text
	case "log":
		a.Log = text == "true"
	default:
		return fmt.Errorf("no setting %q", name)
	}
	m.vrev++
	return nil
}

// SetPlan sets one input of the planner: "target", "unit" (db or mse), "alpha_max" or
// "over" (the weight tuned).
func (m *Model) SetPlan(name, text string) error {
	v := &m.views
	switch name {
	case "target":
		v.Target = text
	case "unit":
		v.Unit = text
	case "alpha_max":
		v.AlphaMax = text
	case "over":
		v.Over = text
		v.travel[partBest] = true
	default:
		return fmt.Errorf("no setting %q", name)
	}
	if name != "over" {
		v.travel[partPlan] = true
	}
	m.vrev++
	return nil
}

// ranStudy records that view ran with the settings it has: they travel from now on, and
// view is the one the study names.
func (m *Model) ranStudy(view string, parts ...string) {
	m.SetTab(view)
	for _, p := range parts {
		m.views.travel[p] = true
	}
	m.vrev++
}

// SetKept replaces the kept curves; those without an ID get a new one.
func (m *Model) SetKept(k []KeptCurve) {
	for i := range k {
		if k[i].ID == 0 {
			m.keptSeq++
			k[i].ID = m.keptSeq
		}
	}
	m.views.Kept = k
	m.vrev++
}

func pathNamed(s scenario.Scenario, name string) (scenario.PathInfo, bool) {
	for _, p := range s.Paths() {
		if p.Name == name {
			return p, true
		}
	}
	return scenario.PathInfo{}, false
}

// Weights are the choices of the planner's "Tune" menu for s: name and label. The penalty's
// l1 and l2 weights, both together when it has both, else its other positive numbers.
func Weights(s scenario.Scenario) [][2]string {
	var out [][2]string
	has := func(f string) bool { _, ok := s.Penalty.Params[f]; return ok }
	if has("l1") {
		out = append(out, [2]string{"l1", "L1 weight"})
	}
	if has("l2") {
		out = append(out, [2]string{"l2", "L2 weight"})
	}
	if has("l1") && has("l2") && s.Penalty.Params["l1"] > 0 && s.Penalty.Params["l2"] > 0 {
		out = append(out, [2]string{study.Ratio, "L1 and L2 together, keeping their ratio"})
	}
	if len(out) > 0 {
		return out
	}
	for _, p := range s.Paths() {
		if strings.HasPrefix(p.Path, "penalty.") && p.Log {
			out = append(out, [2]string{p.Name, pathMenuTextOf(s, p)})
		}
	}
	return out
}

func pathMenuTextOf(s scenario.Scenario, p scenario.PathInfo) string {
	group, param, _ := strings.Cut(p.Path, ".")
	if label, ok := lookup(paramLabels, group, s.Penalty.Kind, param); ok && label != p.Name {
		return label + " (" + p.Name + ")"
	}
	return p.Name
}

// fitViews makes the settings fit s: an axis over a number s lacks, or a tuned weight its
// penalty lacks, is replaced by the proposal for s, with a note saying so; an axis never
// set gets its proposal silently.
func (m *Model) fitViews(s scenario.Scenario) {
	v := &m.views
	var notes []string
	fit := func(a *axisText, what, fallback string, points int, avoid string) {
		if a.Over != "" {
			if _, ok := pathNamed(s, a.Over); ok {
				return
			}
		}
		over := fallback
		if over == "" || over == avoid {
			over = "alpha"
		}
		if over == avoid {
			over = "noise"
		}
		p, ok := pathNamed(s, over)
		if !ok {
			return
		}
		val, _ := s.Get(over)
		if a.Over != "" {
			notes = append(notes, fmt.Sprintf("The %s varied %s, which this scenario does not have; it now varies %s.", what, a.Over, over))
		}
		*a = defaultAxis(p, val, points)
	}
	fit(&v.Curve, "curve", study.DefaultOver(s), sweepPoints, "")
	if v.Curves != "" {
		if _, ok := pathNamed(s, v.Curves); !ok {
			notes = append(notes, fmt.Sprintf("The curve was drawn once per value of %s, which this scenario does not have; it is now one curve.", v.Curves))
			v.Curves = ""
		} else if v.Curves == v.Curve.Over {
			notes = append(notes, fmt.Sprintf("The curve now varies %s, which set each curve; it is now one curve.", v.Curves))
			v.Curves = ""
		}
	}
	fit(&v.Map[1], "map's y axis", "alpha", mapPoints, "")
	x := study.DefaultOver(s)
	if x == "" {
		x = "noise"
	}
	fit(&v.Map[0], "map's x axis", x, mapPoints, v.Map[1].Over)
	ws := Weights(s)
	if !slices.ContainsFunc(ws, func(w [2]string) bool { return w[0] == v.Over }) {
		next := ""
		if len(ws) > 0 {
			next = ws[0][0]
		}
		if v.Over != "" && v.Over != next {
			notes = append(notes, fmt.Sprintf("The planner tuned %s, which this penalty does not have; it now tunes %s.", v.Over, next))
		}
		v.Over = next
	}
	if len(notes) > 0 {
		v.Notes = notes
	}
}

// studyOfViews is the study the settings make: the parts that travel and read as numbers,
// with the finite-size check's settings (which its view keeps in Model.Study) as they are.
func (m *Model) studyOfViews() *scenario.Study {
	v := &m.views
	st := scenario.Study{View: v.Study}
	if m.Study != nil {
		st.Check = m.Study.Check
		if st.View == "" {
			st.View = m.Study.View
		}
	}
	if v.travel[partSweep] {
		if over, from, to, n, err := v.Curve.parse("sweep", scenario.MaxSweepPoints); err == nil {
			st.Sweep = &scenario.Sweep{Over: over, From: from, To: to, Points: n, Log: v.Curve.Log}
			if at, err := parseValues(v.CurvesAt); err == nil && v.Curves != "" && len(at) > 0 {
				st.Sweep.Curves, st.Sweep.CurvesAt = v.Curves, at
			}
		}
	}
	if v.travel[partMap] {
		x, xf, xt, xn, err1 := v.Map[0].parse("map x", scenario.MaxMapPoints)
		y, yf, yt, yn, err2 := v.Map[1].parse("map y", scenario.MaxMapPoints)
		if err1 == nil && err2 == nil && x != y {
			st.Map = &scenario.Map{X: x, XFrom: xf, XTo: xt, XPoints: xn, XLog: v.Map[0].Log,
				Y: y, YFrom: yf, YTo: yt, YPoints: yn, YLog: v.Map[1].Log}
		}
	}
	if v.travel[partPlan] {
		t, err1 := strconv.ParseFloat(strings.TrimSpace(v.Target), 64)
		a, err2 := strconv.ParseFloat(strings.TrimSpace(v.AlphaMax), 64)
		if err1 == nil && err2 == nil && v.Unit != "mse" && !math.IsNaN(t) {
			st.Plan = &scenario.Plan{TargetDB: t, AlphaMax: a}
		}
	}
	if v.travel[partBest] && (v.Over == "l1" || v.Over == "l2") {
		st.Best = &scenario.Best{Over: v.Over}
	}
	for _, k := range v.Kept {
		ks := k.Scenario
		ks.Study = nil
		a := k.Axis
		st.Kept = append(st.Kept, scenario.Kept{Label: k.Label, Scenario: ks,
			Sweep: scenario.Sweep{Over: a.Over, From: a.From, To: a.To, Points: a.Points, Log: a.Log}})
	}
	if emptyStudy(&st) {
		return nil
	}
	if st.View == "" {
		st.View = viewTabs[0].Name
	}
	return &st
}

// dropStudyPart removes from st the part a study error names ("study.sweep.over" names
// the sweep). It reports whether there was such a part to drop.
func dropStudyPart(st *scenario.Study, err error) bool {
	var fe *scenario.FieldError
	if st == nil || !errors.As(err, &fe) {
		return false
	}
	part, _, _ := strings.Cut(strings.TrimPrefix(fe.Field, "study."), ".")
	if !strings.HasPrefix(fe.Field, "study.") && fe.Field != "study" {
		return false
	}
	switch part {
	case "sweep":
		st.Sweep = nil
	case "map":
		st.Map = nil
	case "plan":
		st.Plan = nil
	case "best":
		st.Best = nil
	case "check":
		st.Check = nil
	default:
		if strings.HasPrefix(part, "kept") {
			st.Kept = nil
			break
		}
		*st = scenario.Study{}
	}
	return true
}

// emptyStudy reports whether st states nothing.
func emptyStudy(st *scenario.Study) bool {
	return st.Sweep == nil && st.Map == nil && st.Plan == nil && st.Best == nil && st.Check == nil && st.View == "" && len(st.Kept) == 0
}

// problemKey identifies the problem of the checked scenario: its file without title, notes
// and study, which change no result. It is "" while the scenario is invalid, and computed
// once per change.
func (m *Model) problemKey() string {
	ch := m.Check()
	if ch.Err != nil {
		return ""
	}
	if m.probKey.checked == m.checked {
		return m.probKey.text
	}
	s := ch.Scenario
	s.Title, s.Notes = "", ""
	data, err := bareJSON(s)
	if err != nil {
		return ""
	}
	m.probKey.checked, m.probKey.text = m.checked, string(data)
	return m.probKey.text
}

// valuesText writes a list of values as the curves' values box shows them.
func valuesText(v []float64) string {
	parts := make([]string, len(v))
	for i, x := range v {
		parts[i] = full(x)
	}
	return strings.Join(parts, ", ")
}

// parseValues reads the curves' values box: numbers separated by commas (or spaces).
// The engine checks them against the number's range.
func parseValues(text string) ([]float64, error) {
	f := strings.FieldsFunc(text, func(r rune) bool { return r == ',' || r == ' ' || r == ';' })
	out := make([]float64, 0, len(f))
	for _, t := range f {
		v, err := strconv.ParseFloat(t, 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("curve values: %q is not a number", t)
		}
		out = append(out, v)
	}
	return out, nil
}
