package ui

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"

	"hdrisk/engine/design"
	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/param"
	"hdrisk/engine/penalty"
	"hdrisk/engine/scenario"
	"hdrisk/engine/signal"
)

// Param is one editable number (or list of numbers) of a scenario, under its contract-1 name.
// The embedded param.Param is the engine's description (name, unit, help, domain, list
// length, optional default), so a parameter added to a registry appears here with its unit,
// range and explanation; the page adds its own Label and the starting Default text, which
// stand in front of the registry's fields of the same names.
type Param struct {
	param.Param
	Label   string // what the input is called on the page
	Default string // the starting text of the input
}

// Kind is one choice of a group's menu (a design shape, a signal law, a penalty kind, a form
// of the noise).
type Kind struct {
	Name   string // contract-1 value, e.g. "elastic-net"
	Label  string
	Help   string // one line from the registry
	Params []Param
}

// Group is one object of the scenario file: "design", "signal", "noise" or "penalty".
type Group struct {
	Name    string  // JSON object name
	Title   string  // heading on the page
	Object  string  // JSON object of the group's numbers when it is not Name ("noise" for the noise law)
	KindKey string  // JSON key naming the kind ("shape", "law", "kind"); empty if none is written
	Menu    string  // label of the group's menu; empty if the group has none
	Kinds   []Kind  // menu; empty if the group has no kinds
	Common  []Param // parameters every kind of the group has
}

// The page's own words for the registries' kinds and parameters, and the starting text of
// each input. The registries carry names, units, ranges and one-line explanations; a kind or
// parameter missing here is shown under its registry name with a value from its range, so
// adding a law to the engine needs no edit here. Keys are "group.kind" for kinds,
// "group.kind.param" or "group.param" for parameters (the longer key wins).
var (
	kindLabels = map[string]string{
		"design.gaussian":             "Gaussian entries",
		"design.orthogonal":           "Orthogonal rows",
		"design.uniform-sv":           "Uniform singular values",
		"design.uniform-ev":           "Uniform eigenvalues of FᵀF",
		"design.geometric-sv":         "Geometric singular values",
		"design.empirical-sv":         "Listed singular values",
		"signal.gauss":                "Gaussian",
		"signal.bernoulli-gauss":      "Sparse Gaussian",
		"signal.bernoulli-rademacher": "Sparse ±amplitude",
		"signal.laplace":              "Laplace",
		"signal.uniform":              "Uniform",
		"signal.student-t":            "Student t",
		"signal.gauss-mixture":        "Gaussian mixture",
		"signal.empirical":            "Listed sample values",
		"noise.variance":              "Variance",
		"noise.snr_db":                "Signal-to-noise ratio",
		"penalty.l1":                  "L1 (LASSO)",
		"penalty.ridge":               "Ridge",
		"penalty.elastic-net":         "Elastic net",
		"penalty.nonneg-l1":           "Nonnegative L1",
		"penalty.box":                 "Box constraint",
		"penalty.huber":               "Huber",
		"penalty.power":               "Power |x|^q",
	}
	paramLabels = map[string]string{
		"design.alpha":               "Sampling ratio m/n",
		"design.uniform-sv.min":      "Smallest singular value",
		"design.uniform-sv.max":      "Largest singular value",
		"design.uniform-ev.min":      "Smallest eigenvalue",
		"design.uniform-ev.max":      "Largest eigenvalue",
		"design.condition":           "Condition number",
		"design.empirical-sv.values": "Singular values",
		"signal.density":             "Share of nonzero entries",
		"signal.variance":            "Variance of a nonzero entry",
		"signal.gauss.variance":      "Variance",
		"signal.amplitude":           "Amplitude",
		"signal.scale":               "Scale",
		"signal.halfwidth":           "Half-width",
		"signal.dof":                 "Degrees of freedom",
		"signal.weights":             "Weights",
		"signal.means":               "Means",
		"signal.variances":           "Variances",
		"signal.empirical.values":    "Sample values",
		"noise.variance":             "Noise variance",
		"noise.snr_db":               "SNR",
		"penalty.l1":                 "L1 weight",
		"penalty.l2":                 "L2 weight",
		"penalty.huber.l1":           "Weight",
		"penalty.bound":              "Bound on |x|",
		"penalty.width":              "Width of the quadratic part",
		"penalty.weight":             "Weight",
		"penalty.q":                  "Exponent q",
	}
	paramDefaults = map[string]string{
		"design.alpha":               "0.4",
		"design.uniform-sv.min":      "0.5",
		"design.uniform-sv.max":      "1.5",
		"design.uniform-ev.min":      "0.25",
		"design.uniform-ev.max":      "2.25",
		"design.condition":           "10",
		"design.empirical-sv.values": "1, 0.8, 0.6, 0.4",
		"signal.density":             "0.05",
		"signal.variance":            "1",
		"signal.amplitude":           "1",
		"signal.scale":               "1",
		"signal.halfwidth":           "1",
		"signal.dof":                 "5",
		"signal.weights":             "0.9, 0.1",
		"signal.means":               "0, 0",
		"signal.variances":           "0, 1",
		"signal.empirical.values":    "0, 0, 0, 1, -1",
		"noise.variance":             "0.01",
		"noise.snr_db":               "20",
		"penalty.l1":                 "0.05",
		"penalty.l2":                 "0",
		"penalty.ridge.l2":           "0.1",
		"penalty.bound":              "1",
		"penalty.width":              "0.1",
		"penalty.weight":             "0.05",
		"penalty.q":                  "1.5",
	}
	// startKinds are the choices the page opens with: an invented sparse example.
	startKinds = map[string]string{"design": "orthogonal", "signal": "bernoulli-gauss", "noise": "variance", "penalty": "elastic-net"}
)

// Groups lists the editable parts of a scenario in page order, built from the engine's
// registries (design.Shapes, signal.Laws, penalty.Kinds) and the scenario's limits the
// first time it is called, so that kinds registered by init functions are included.
var Groups = sync.OnceValue(buildGroups)

func lookup(m map[string]string, group, kind, param string) (string, bool) {
	if v, ok := m[group+"."+kind+"."+param]; ok && kind != "" {
		return v, true
	}
	v, ok := m[group+"."+param]
	return v, ok
}

func newParam(group, kind string, rp param.Param) Param {
	p := Param{Param: rp}
	if l, ok := lookup(paramLabels, group, kind, p.Name); ok {
		p.Label = l
	} else {
		p.Label = p.Name
	}
	if d, ok := lookup(paramDefaults, group, kind, p.Name); ok {
		p.Default = d
	} else {
		p.Default = fallbackDefault(p)
	}
	return p
}

// fallbackDefault is the starting text of a parameter the page has no value for: the
// registry's default, else a number inside its domain.
func fallbackDefault(p Param) string {
	var v float64
	switch {
	case p.Optional:
		v = p.Param.Default
	case p.Min <= 1 && 1 <= p.Max && !(p.Max == 1 && p.MaxOpen) && !(p.Min == 1 && p.MinOpen):
		v = 1
	case !math.IsInf(p.Min, 0) && !math.IsInf(p.Max, 0):
		v = (p.Min + p.Max) / 2
	case !math.IsInf(p.Min, 0):
		v = p.Min + 1
	default:
		v = p.Max - 1
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

func kindLabel(group, name string) string {
	if l, ok := kindLabels[group+"."+name]; ok {
		return l
	}
	return name
}

func buildGroups() []Group {
	d := Group{Name: "design", Title: "Measurement design", KindKey: "shape", Menu: "Shape of the spectrum",
		Common: []Param{newParam("design", "", scenario.AlphaParam)}}
	for _, s := range design.Shapes() {
		d.Kinds = append(d.Kinds, newKind("design", s.Name, s.Help, s.Params))
	}
	x := Group{Name: "signal", Title: "Signal entries", KindKey: "law", Menu: "Distribution"}
	for _, l := range signal.Laws() {
		x.Kinds = append(x.Kinds, newKind("signal", l.Name, l.Help, l.Params))
	}
	n := Group{Name: "noise", Title: "Measurement noise", Menu: "Stated as", Kinds: []Kind{
		newKind("noise", "variance", "the variance of each noise entry", []param.Param{scenario.NoiseParam}),
		newKind("noise", "snr_db", "the power of F x0 over the power of the noise", []param.Param{scenario.SNRParam}),
	}}
	pen := Group{Name: "penalty", Title: "Penalty", KindKey: "kind", Menu: "Kind"}
	for _, k := range penalty.Kinds() {
		pen.Kinds = append(pen.Kinds, newKind("penalty", k.Name, k.Help, k.Params))
	}
	return append([]Group{d, x, n, noiseLawGroup(), pen}, glmGroups()...)
}

func newKind(group, name, help string, ps []param.Param) Kind {
	k := Kind{Name: name, Label: kindLabel(group, name), Help: help}
	for _, p := range ps {
		k.Params = append(k.Params, newParam(group, name, p))
	}
	return k
}

// Scales are the choices of design.scale (contract 1, docs/method.md section 1).
var Scales = []Kind{
	{Name: scenario.ScaleRows, Label: "Unit-norm rows (E λ = m/n)", Help: "each row of F has unit norm on average: more measurements carry more information"},
	{Name: scenario.ScaleColumns, Label: "Unit-norm columns (E λ = 1)", Help: "each column of F has unit norm on average: the usual convention of compressed sensing"},
	{Name: scenario.ScaleAsGiven, Label: "As given", Help: "the singular values are used exactly as stated"},
}

// Model is the page's state: the scenario being edited (the chosen kind of each group and
// the text of every input) and the settings of every view (Views). Texts are kept per kind
// and parameter, so switching a menu back and forth keeps what was typed. Study holds the
// finite-size check's settings, which its view writes there; the rest of the study is made
// from Views. Check checks it all once per change and hands every caller the same result.
type Model struct {
	Title string
	Notes string
	Scale string
	Study *scenario.Study
	// Matrix is the user's own matrix once the data tab made it the design (datamatrix.go).
	Matrix *UserMatrix
	kinds  map[string]string // group -> kind name
	texts  map[string]string // "group/kind/param" -> text
	views  Views

	rev     int // counts changes of the scenario made through the methods
	vrev    int // counts changes of the views' settings
	keptSeq int // the last KeptCurve ID given
	opened  int // counts the scenarios opened (Load)
	probKey struct {
		checked *Checked // the check the text belongs to
		text    string
	}
	checked *Checked
	key     checkKey // what checked was made from
	base    *Checked // the scenario checked without its study
	baseKey checkKey // what base was made from (vrev 0)
}

// checkKey is what a Check depends on: the count of changes made through the methods, and
// the fields callers may set directly.
type checkKey struct {
	rev, vrev           int
	title, notes, scale string
	study               *scenario.Study
}

// NewModel returns the starting scenario. It is an invented example, not data from any
// study.
func NewModel() *Model {
	m := &Model{Title: "Invented example: sparse signal, orthogonal design", Scale: scenario.ScaleRows,
		kinds: map[string]string{}, texts: map[string]string{}, views: newViews()}
	for _, g := range Groups() {
		if len(g.Kinds) > 0 {
			m.kinds[g.Name] = g.Kinds[0].Name
			if _, ok := g.kind(startKinds[g.Name]); ok {
				m.kinds[g.Name] = startKinds[g.Name]
			}
		}
	}
	return m
}

// FindGroup returns the group named name.
func FindGroup(name string) (Group, bool) {
	for _, g := range Groups() {
		if g.Name == name {
			return g, true
		}
	}
	return Group{}, false
}

func (g Group) kind(name string) (Kind, bool) {
	for _, k := range g.Kinds {
		if k.Name == name {
			return k, true
		}
	}
	return Kind{}, false
}

// Kind returns the kind chosen in group g ("" for a group without kinds).
func (m *Model) Kind(g string) string { return m.kinds[g] }

// KindHelp returns the registry's one-line explanation of the kind chosen in group g.
func (m *Model) KindHelp(g string) string {
	grp, _ := FindGroup(g)
	k, _ := grp.kind(m.kinds[g])
	return k.Help
}

// SetKind chooses kind in group g. Special cases are: an unknown group or kind is an error
// and changes nothing.
func (m *Model) SetKind(g, kind string) error {
	grp, ok := FindGroup(g)
	if !ok {
		return fmt.Errorf("%s: unknown part of the scenario", g)
	}
	if _, ok := grp.kind(kind); !ok {
		key := grp.KindKey
		if key == "" {
			key = "form"
		}
		return fmt.Errorf("%s.%s: unknown choice %q", g, key, kind)
	}
	m.kinds[g] = kind
	pairLabels(m.kinds, g)
	m.rev++
	return nil
}

// SetScale chooses design.scale. Special cases are: an unknown scale is an error.
func (m *Model) SetScale(s string) error {
	for _, k := range Scales {
		if k.Name == s {
			m.Scale = s
			return nil
		}
	}
	return fmt.Errorf("design.scale: unknown choice %q", s)
}

// Field is one input as the page shows it.
type Field struct {
	ID    string // element id, unique on the page
	Path  string // contract-1 path, e.g. "penalty.l1"
	Text  string
	Param // label, unit, domain and explanation
	key   string
}

// Fields returns the inputs of group g for its chosen kind: the common ones first.
func (m *Model) Fields(g string) []Field {
	if noiseless(m.kinds, g) {
		return nil
	}
	grp, _ := FindGroup(g)
	var out []Field
	add := func(kind string, p Param) {
		key := g + "/" + kind + "/" + p.Name
		text, ok := m.texts[key]
		if !ok {
			text = p.Default
		}
		id := "in-" + g + "-" + p.Name
		if kind != "" && grp.KindKey != "" {
			id = "in-" + g + "-" + kind + "-" + p.Name
		}
		obj := g
		if grp.Object != "" {
			obj = grp.Object
		}
		out = append(out, Field{ID: id, Path: obj + "." + p.Name, Text: text, Param: p, key: key})
	}
	for _, p := range grp.Common {
		add("", p)
	}
	if k, ok := grp.kind(m.kinds[g]); ok {
		for _, p := range k.Params {
			add(k.Name, p)
		}
	}
	return out
}

// SetText stores the text typed into the input with the given element id.
// Special cases are: an id that is not an input of the current choices is an error.
func (m *Model) SetText(id, text string) error {
	for _, g := range Groups() {
		for _, f := range m.Fields(g.Name) {
			if f.ID == id {
				m.texts[f.key] = text
				m.rev++
				return nil
			}
		}
	}
	return fmt.Errorf("no input %q in the current scenario", id)
}

// Opened counts the scenarios opened so far (Load): a view that keeps the texts of its
// inputs reads them again from the page state when it changes.
func (m *Model) Opened() int { return m.opened }

// Load replaces the model's contents with the scenario s (for a link, a file or an
// example). Special cases are: a kind the page does not offer is an error and changes nothing.
func (m *Model) Load(s scenario.Scenario) error {
	noise := "variance"
	if s.Noise.SNR {
		noise = "snr_db"
	}
	kinds := glmKinds(s)
	for g, k := range map[string]string{"design": s.Design.Shape, "signal": s.Signal.Law, "noise": noise, "penalty": s.Penalty.Kind} {
		kinds[g] = k
	}
	for g, k := range kinds {
		grp, _ := FindGroup(g)
		if _, ok := grp.kind(k); !ok {
			return fmt.Errorf("%s: the page offers no %q", g, k)
		}
	}
	if err := m.SetScale(s.Design.Scale); err != nil {
		return err
	}
	m.kinds = kinds
	m.Title, m.Notes, m.Study = s.Title, s.Notes, s.Study
	tab := m.views.Tab
	m.views = viewsOf(s.Study)
	m.SetKept(m.views.Kept)
	m.opened++
	if s.Study == nil || s.Study.View == "" {
		m.views.Tab = tab // a scenario that names no view leaves the page on the one it shows
	}
	m.vrev++
	m.rev++
	num := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	list := func(vs []float64) string {
		w := make([]string, len(vs))
		for i, v := range vs {
			w[i] = num(v)
		}
		return strings.Join(w, ", ")
	}
	params := map[string]map[string]float64{"design": s.Design.Params, "signal": s.Signal.Params, "penalty": s.Penalty.Params,
		"noise": {"variance": s.Noise.Variance, "snr_db": s.Noise.SNRdB}}
	for g, p := range glmParams(s) {
		params[g] = p
	}
	lists := map[string]map[string][]float64{"design": s.Design.Lists, "signal": s.Signal.Lists}
	params["design"] = mergeAlpha(s.Design.Params, s.Design.Alpha)
	for _, g := range Groups() {
		for _, f := range m.Fields(g.Name) {
			if f.List {
				if v, ok := lists[g.Name][f.Name]; ok {
					m.texts[f.key] = list(v)
				}
			} else if v, ok := params[g.Name][f.Name]; ok {
				m.texts[f.key] = num(v)
			}
		}
	}
	return nil
}

func mergeAlpha(p map[string]float64, alpha float64) map[string]float64 {
	out := map[string]float64{"alpha": alpha}
	for k, v := range p {
		out[k] = v
	}
	return out
}

// maxList is the longest list the editor reads; the engine states its own, usually smaller,
// cap per parameter.
const maxList = 100000

// Checked is the outcome of checking the inputs: the scenario they make, or why not.
type Checked struct {
	Scenario scenario.Scenario  // valid only when Err is nil
	JSON     []byte             // contract-1 file of Scenario
	Problem  fixedpoint.Problem // its laws, built by the engine
	// Engine is the scenario as the engine checked it, once: studies take it
	// (study.SweepChecked, ...) and links are written from it without checking again.
	Engine scenario.Checked
	// Invalid maps the id of every input that cannot be accepted to a message naming its
	// field and the reason, e.g. "penalty.l1: -1 is out of range: must be ≥ 0".
	Invalid map[string]string
	Err     error // nil when the scenario is valid; else its first problem
}

// Check reads every input, checks each against its domain, then lets the engine check the
// scenario as a whole (rules across fields, such as min <= max or weights summing to 1),
// once: until the model changes, every call returns the same result. The views' settings
// are fitted to the scenario (see fitViews) and written into its study.
// Special cases are: several inputs may be invalid at once and each is reported; a problem
// the engine cannot pin on one input is reported in Err only.
func (m *Model) Check() Checked {
	k := checkKey{rev: m.rev, vrev: m.vrev, title: m.Title, notes: m.Notes, scale: m.Scale, study: m.Study}
	if m.checked != nil && m.key == k {
		return *m.checked
	}
	bk := k
	bk.vrev, bk.study = 0, nil
	if m.base == nil || m.baseKey != bk {
		b := m.check()
		m.base, m.baseKey = &b, bk
	}
	c := m.withStudy(*m.base)
	m.checked, m.key = &c, k
	return c
}

// withStudy adds the study the views make to a checked scenario: an edit of a view's
// setting checks the study alone, not the laws again.
func (m *Model) withStudy(c Checked) Checked {
	if c.Err != nil {
		return c
	}
	s := c.Scenario
	m.fitViews(s)
	s.Study = m.studyOfViews()
	// A part that does not fit (a range outside the domain of its number) is left out
	// rather than making the edited scenario invalid.
	for tries := 0; s.Study != nil && tries < 6; tries++ {
		err := s.ValidateStudy()
		if err == nil || !dropStudyPart(s.Study, err) {
			break
		}
		if emptyStudy(s.Study) {
			s.Study = nil
		}
	}
	eng, err := c.Engine.WithStudy(s.Study)
	if err != nil {
		s.Study = nil
		eng, _ = c.Engine.WithStudy(nil)
	}
	c.Scenario, c.Engine, c.JSON = s, eng, eng.Encode()
	return c
}

func (m *Model) check() Checked {
	c := Checked{Invalid: map[string]string{}}
	s := scenario.Scenario{Kind: scenario.Kind, Version: scenario.Version, Title: m.Title, Notes: m.Notes, Study: m.Study,
		Design:  scenario.Design{Shape: m.kinds["design"], Scale: m.Scale},
		Signal:  scenario.Signal{Law: m.kinds["signal"]},
		Penalty: scenario.Penalty{Kind: m.kinds["penalty"]}}
	setGLMChoices(&s, m.kinds)
	var first error
	for _, g := range Groups() {
		for _, f := range m.Fields(g.Name) {
			num, list, err := parseField(f)
			if err != nil {
				c.Invalid[f.ID] = err.Error()
				if first == nil {
					first = err
				}
				continue
			}
			setValue(&s, g.Name, f.Name, num, list, f.List)
		}
	}
	if first != nil {
		c.Err = first
		return c
	}
	sc, err := s.Check()
	if err != nil {
		var fe *scenario.FieldError
		if errors.As(err, &fe) {
			if id, ok := m.inputFor(fe.Field); ok {
				c.Invalid[id] = err.Error()
			}
		}
		c.Err = err
		return c
	}
	c.Scenario, c.Problem, c.Engine = s, sc.Problem(), sc
	return c
}

// inputFor returns the id of the input that holds the JSON path field ("signal.values[3]"
// is the input of "signal.values").
func (m *Model) inputFor(field string) (string, bool) {
	switch field {
	case "title":
		return TitleInputID, true
	case "notes":
		return NotesInputID, true
	}
	if i := strings.IndexByte(field, '['); i >= 0 {
		field = field[:i]
	}
	for _, g := range Groups() {
		for _, f := range m.Fields(g.Name) {
			if f.Path == field {
				return f.ID, true
			}
		}
	}
	return "", false
}

func setValue(s *scenario.Scenario, group, name string, num float64, list []float64, isList bool) {
	switch group {
	case "design":
		if name == "alpha" {
			s.Design.Alpha = num
			return
		}
		if isList {
			if s.Design.Lists == nil {
				s.Design.Lists = map[string][]float64{}
			}
			s.Design.Lists[name] = list
			return
		}
		if s.Design.Params == nil {
			s.Design.Params = map[string]float64{}
		}
		s.Design.Params[name] = num
	case "signal":
		if isList {
			if s.Signal.Lists == nil {
				s.Signal.Lists = map[string][]float64{}
			}
			s.Signal.Lists[name] = list
			return
		}
		if s.Signal.Params == nil {
			s.Signal.Params = map[string]float64{}
		}
		s.Signal.Params[name] = num
	case "noise":
		if name == "snr_db" {
			s.Noise = scenario.Noise{SNRdB: num, SNR: true, Law: s.Noise.Law}
		} else {
			s.Noise = scenario.Noise{Variance: num, Law: s.Noise.Law}
		}
	case "penalty":
		if s.Penalty.Params == nil {
			s.Penalty.Params = map[string]float64{}
		}
		s.Penalty.Params[name] = num
	default:
		setGLMValue(s, group, name, num)
	}
}

// JSON returns the scenario file (contract 1, version 1) for the current inputs.
// Special cases are: invalid inputs give the first problem, naming the field, e.g.
// "penalty.l1: not a number: "abc"".
func (m *Model) JSON() ([]byte, error) {
	c := m.Check()
	return c.JSON, c.Err
}

func parseField(f Field) (float64, []float64, error) {
	if !f.List {
		v, err := parseNumber(f.Path, f.Text, f.Param)
		return v, nil, err
	}
	words := listWords(f.Text)
	if len(words) == 0 {
		return 0, nil, fmt.Errorf("%s: the list is empty; type numbers separated by commas", f.Path)
	}
	limit := maxList
	if f.MaxLen > 0 && f.MaxLen < limit {
		limit = f.MaxLen
	}
	if len(words) > limit {
		return 0, nil, fmt.Errorf("%s: %d numbers, more than the %d accepted", f.Path, len(words), limit)
	}
	vs := make([]float64, len(words))
	for i, w := range words {
		v, err := parseNumber(fmt.Sprintf("%s[%d]", f.Path, i), w, f.Param)
		if err != nil {
			return 0, nil, err
		}
		vs[i] = v
	}
	return 0, vs, nil
}

// listWords splits the text of a list into its entries: numbers are separated by commas,
// semicolons or white space.
func listWords(text string) []string {
	return strings.FieldsFunc(text, func(r rune) bool { return r == ',' || r == ';' || r == ' ' || r == '\t' || r == '\n' || r == '\r' })
}

func parseNumber(path, text string, p Param) (float64, error) {
	t := strings.TrimSpace(text)
	if t == "" {
		return 0, fmt.Errorf("%s: empty; type a number", path)
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil {
		return 0, fmt.Errorf("%s: not a number: %q", path, t)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%s: not a finite number: %q", path, t)
	}
	if !p.Contains(v) {
		return 0, fmt.Errorf("%s: %s is out of range: must be %s", path, t, p.ScalarRange())
	}
	return v, nil
}
