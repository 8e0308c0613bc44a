package scenario

import (
	"fmt"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"

	"hdrisk/engine/param"
)

// The identity of the format (contract 1).
const (
	Kind    = "hdrisk.scenario"
	Version = 1
)

// Limits of the format. They are part of the contract: the page, the command line and the
// share links all refuse what exceeds them, with a message that states the limit.
const (
	MaxBytes    = 4 << 20 // size of a scenario document, in bytes
	MaxTitle    = 200     // characters (Unicode code points) of the title
	MaxNotes    = 4000    // characters of the notes
	MaxAlpha    = 100     // largest sampling ratio m/n
	MaxNoiseVar = 1e6     // largest noise variance
	MinSNRdB    = -100.0  // range of noise.snr_db, in dB
	MaxSNRdB    = 200.0
)

// Scales of the design (docs/method.md section 1).
const (
	ScaleRows    = "rows"
	ScaleColumns = "columns"
	ScaleAsGiven = "as-given"
)

// Scenario is one question put to the engine: a design, a signal law, a noise level and a
// penalty, with an optional record of what was last studied. It is a plain value; With
// returns a modified copy and never touches the original.
type Scenario struct {
	Kind    string // always Kind
	Version int    // always Version
	Title   string // free text, at most MaxTitle characters, no control characters
	Notes   string // free text, at most MaxNotes characters; newlines and tabs allowed
	Design  Design
	Signal  Signal
	Noise   Noise
	Penalty Penalty
	Readout *Choice // nil: the linear readout, y = F x0 + w (docs/method.md section 10)
	Loss    *Choice // nil: the square loss
	Study   *Study  // nil when absent
}

// Design is the law of the singular values of the measurement matrix. Params holds the
// shape's numeric parameters by their JSON names ("min", "condition") and Lists its lists
// ("values"); both are nil when the shape has none.
type Design struct {
	Shape  string
	Alpha  float64 // m/n, in (0, MaxAlpha]
	Scale  string  // ScaleRows, ScaleColumns or ScaleAsGiven
	Params map[string]float64
	Lists  map[string][]float64
}

// Signal is the law of the entries of x0, with its parameters by their JSON names.
type Signal struct {
	Law    string
	Params map[string]float64
	Lists  map[string][]float64
}

// Penalty is the separable convex penalty, with its parameters by their JSON names.
type Penalty struct {
	Kind   string
	Params map[string]float64
}

// Noise is the variance Delta of the measurement noise, stated either directly or as a
// signal-to-noise ratio. The SNR is E||F x0||^2 / E||w||^2 = rho2 E_nu[lambda] / (alpha Delta)
// (per measurement; with rows scale it is rho2 / Delta).
type Noise struct {
	Variance float64 // Delta >= 0; used when SNR is false, and 0 otherwise
	SNRdB    float64 // 10 log10 SNR; used when SNR is true, and 0 otherwise
	SNR      bool    // the noise is stated as SNRdB
	Law      *Choice // nil: Gaussian; Variance is then the typical entry's (docs/method.md section 10)
}

// Study records what the page or a command was last asked: the view and its settings.
type Study struct {
	View  string // "curve", "map", "plan" or "check"
	Sweep *Sweep
	Map   *Map
	Best  *Best
	Plan  *Plan
	Check *Check
	Kept  []Kept // at most MaxKept
}

// Kept is a curve kept beside the study's own for comparison, by its settings: the
// scenario it sweeps (with no study of its own) and its axis. Its points do not travel:
// whoever opens the study computes them again.
type Kept struct {
	Label    string // at most MaxTitle characters
	Scenario Scenario
	Sweep    Sweep
}

// Sweep is a curve over one scalar path (see Paths), or, with Curves, one such curve for
// each value in CurvesAt of a second scalar path ("how many measurements with 1, 2, 3 or 4
// bits": Over alpha, Curves bits, CurvesAt 1, 2, 3, 4). Both are optional keys of the file
// (curves, curves_at): a sweep without them is one curve, as before.
type Sweep struct {
	Over     string
	From, To float64
	Points   int
	Log      bool
	Curves   string    // the second path; "" for one curve
	CurvesAt []float64 // its values, 1 to MaxCurves, when Curves is set
}

// Map is a grid over two scalar paths.
type Map struct {
	X          string
	XFrom, XTo float64
	XPoints    int
	XLog       bool
	Y          string
	YFrom, YTo float64
	YPoints    int
	YLog       bool
}

// Best asks for the regularization with the lowest MSE.
type Best struct {
	Over string // a strength of the penalty ("l1", "l2", "weight", ...)
}

// Plan asks for the smallest alpha that reaches TargetDB at its best regularization.
type Plan struct {
	TargetDB float64 // NMSE target in dB, in [-200, 100]
	AlphaMax float64 // upper end of the search, in (0, MaxAlpha]
}

// Check asks for finite-size trials.
type Check struct {
	N      int
	Trials int
	Seed   uint64 // at most 2^53 - 1, so that it survives a JavaScript number
	Solver string // "", "cd", "prox" or "vamp"; "" lets the command choose
}

// Limits of the study settings.
const (
	MaxSweepPoints = 10000
	MaxMapPoints   = 1000
	MaxCheckN      = 100000
	MaxTrials      = 100000
	MaxSeed        = 1<<53 - 1
	// MaxKept is the number of kept curves a study holds: the page draws at most eight
	// curves on one figure, the current one and seven kept.
	MaxKept = 7
	// MaxCurves is the number of values of study.sweep.curves_at: the curves of one figure.
	MaxCurves = 8
)

var (
	views   = []string{"curve", "map", "plan", "check"}
	solvers = []string{"cd", "prox", "vamp"}
	scales  = []string{ScaleRows, ScaleColumns, ScaleAsGiven}
)

func sprintf(format string, args ...any) string { return fmt.Sprintf(format, args...) }

func num(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// Validate reports the first problem of s as a *FieldError, or nil. It checks everything
// Decode checks: kind and version, text limits, known shape, law and kind, exactly the
// parameters each needs, ranges, list lengths, and whatever the engine's constructors
// refuse (for example min > max), and the study settings against the scenario's paths.
// Special cases are: a Go value must hold every parameter of its kinds, optional ones
// included (Decode fills their defaults in; Validate does not guess them).
func (s Scenario) Validate() error {
	_, err := s.check()
	return err
}

// check is Validate returning the laws it built on the way.
func (s Scenario) check() (laws, error) {
	if s.Kind != Kind {
		return laws{}, fieldErr("kind", "must be %q, not %q", Kind, clip(s.Kind, 40))
	}
	if s.Version != Version {
		return laws{}, fieldErr("version", "this program reads version %d, not %d", Version, s.Version)
	}
	if err := checkText("title", s.Title, MaxTitle, false); err != nil {
		return laws{}, err
	}
	if err := checkText("notes", s.Notes, MaxNotes, true); err != nil {
		return laws{}, err
	}
	l, err := s.laws()
	if err != nil {
		return laws{}, err
	}
	if s.Study != nil {
		if err := s.validateStudy(); err != nil {
			return laws{}, err
		}
	}
	return l, nil
}

func checkText(field, t string, max int, multiline bool) error {
	if !utf8.ValidString(t) {
		return fieldErr(field, "is not valid UTF-8 text")
	}
	if n := utf8.RuneCountInString(t); n > max {
		return fieldErr(field, "is %d characters long; the limit is %d", n, max)
	}
	for _, r := range t {
		if multiline && (r == '\n' || r == '\t' || r == '\r') {
			continue
		}
		if r < 0x20 || r == 0x7f {
			return fieldErr(field, "holds the control character %U", r)
		}
	}
	return nil
}

// The numbers every scenario has besides the parameters of its kinds, described as the
// registries describe theirs: the page's editor and the command line read them here.
var (
	AlphaParam = param.Param{Name: "alpha", Label: "sampling ratio m/n", Unit: "measurements per unknown",
		Help: "how many measurements m there are for each of the n unknowns",
		Min:  0, Max: MaxAlpha, MinOpen: true, Log: true}
	NoiseParam = param.Param{Name: "variance", Label: "noise variance Delta", Unit: "units of y squared",
		Help: "variance Δ of each entry of the noise w",
		Min:  0, Max: MaxNoiseVar, Log: true, Role: param.Scale}
	SNRParam = param.Param{Name: "snr_db", Label: "signal-to-noise ratio", Unit: "dB",
		Help: "10 log10 of E‖F x0‖² / E‖w‖²; higher is cleaner",
		Min:  MinSNRdB, Max: MaxSNRdB}
)

func (s Scenario) validateDesign() error {
	d := s.Design
	if err := validateParams(designs(), d.Shape, d.Params, d.Lists); err != nil {
		return err
	}
	if err := AlphaParam.Check("design.alpha", d.Alpha); err != nil {
		return err
	}
	if !slices.Contains(scales, d.Scale) {
		return fieldErr("design.scale", "must be one of %s, not %q", strings.Join(scales, ", "), clip(d.Scale, 40))
	}
	return nil
}

// validateParams checks that params and lists hold exactly what kind needs, in range.
func validateParams(f *family, kind string, params map[string]float64, lists map[string][]float64) error {
	k, ok := f.find(kind)
	if !ok {
		return fieldErr(f.Object+"."+f.Key, "unknown %s %q (known: %s)", f.Noun, clip(kind, 40), f.names())
	}
	for _, name := range sortedKeys(params) {
		if p, ok := k.param(name); !ok || p.List {
			return notParam(f, k, name)
		}
	}
	for _, name := range sortedKeys(lists) {
		if p, ok := k.param(name); !ok || !p.List {
			return notParam(f, k, name)
		}
	}
	for _, p := range k.Params {
		path := f.Object + "." + p.Name
		if p.List {
			l, ok := lists[p.Name]
			if !ok {
				return missing(f, k, p.Name)
			}
			if len(l) == 0 {
				return fieldErr(path, "must hold at least one number")
			}
			if len(l) > p.MaxLen {
				return fieldErr(path, "holds %d numbers; the limit is %d", len(l), p.MaxLen)
			}
			for i, x := range l {
				if err := p.Check(sprintf("%s[%d]", path, i), x); err != nil {
					return err
				}
			}
			continue
		}
		x, ok := params[p.Name]
		if !ok {
			return missing(f, k, p.Name)
		}
		if err := p.Check(path, x); err != nil {
			return err
		}
	}
	return nil
}

func notParam(f *family, k kindSpec, name string) error {
	return fieldErr(f.Object+"."+clip(name, 40), "not a parameter of %s %s (it takes %s)", f.Noun, k.Name, paramList(k))
}

func missing(f *family, k kindSpec, name string) error {
	return fieldErr(f.Object+"."+name, "missing: %s %s needs %s", f.Noun, k.Name, paramList(k))
}

func paramList(k kindSpec) string {
	if len(k.Params) == 0 {
		return "no parameters"
	}
	n := make([]string, len(k.Params))
	for i, p := range k.Params {
		n[i] = p.Name
	}
	return strings.Join(n, ", ")
}

func sortedKeys[V any](m map[string]V) []string {
	k := make([]string, 0, len(m))
	for name := range m {
		k = append(k, name)
	}
	slices.Sort(k)
	return k
}

func (s Scenario) validateNoise() error {
	n := s.Noise
	if n.SNR && n.Variance != 0 || !n.SNR && n.SNRdB != 0 {
		return fieldErr("noise", "give variance or snr_db, not both")
	}
	if n.SNR {
		if !SNRParam.Contains(n.SNRdB) {
			return fieldErr("noise.snr_db", "must be in %s dB, not %s", SNRParam.Interval(), num(n.SNRdB))
		}
		return nil
	}
	return NoiseParam.Check("noise.variance", n.Variance)
}
