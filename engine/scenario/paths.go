package scenario

import (
	"maps"
	"math"
	"slices"
	"strings"

	"hdrisk/engine/param"
)

// PathInfo describes one number of the current scenario that can be read, set and swept.
type PathInfo struct {
	Name             string // the shortest name that resolves to it ("alpha", "l1", "design.min")
	Path             string // the full JSON path ("design.alpha", "penalty.l1")
	Label, Unit      string
	Min, Max         float64
	MinOpen, MaxOpen bool       // the bound itself is excluded
	Log              bool       // best swept on a logarithmic axis
	Object           string     // "design", "signal", "noise" or "penalty"
	Role             param.Role // what the number does; the penalty's strengths are param.Strength
}

// target is a resolved path.
type target struct {
	full   string // "penalty.l1"
	object string // "design", "signal", "penalty", "noise"
	p      param.Param
	scalar bool
}

// eachTarget calls fn with every number of s in the order the page offers them (the
// design, the signal, the noise, the penalty) until fn returns false. It allocates
// nothing: sweeps resolve a path at every point.
func (s Scenario) eachTarget(fn func(t target) bool) {
	kind := func(object string, f *family, name string) bool {
		k, ok := f.find(name)
		if !ok {
			return true
		}
		for i, p := range k.Params {
			if !fn(target{full: k.full[i], object: object, p: p, scalar: !p.List}) {
				return false
			}
		}
		return true
	}
	_ = fn(target{full: "design.alpha", object: "design", p: AlphaParam, scalar: true}) &&
		kind("design", designs(), s.Design.Shape) &&
		kind("signal", signals(), s.Signal.Law) &&
		fn(target{full: "noise.variance", object: "noise", p: NoiseParam, scalar: true}) &&
		fn(target{full: "noise.snr_db", object: "noise", p: SNRParam, scalar: true}) &&
		kind("penalty", penalties(), s.Penalty.Kind) &&
		s.glmTargets(fn, kind)
}

// targets lists every number of s, in the order of eachTarget.
func (s Scenario) targets() []target {
	var t []target
	s.eachTarget(func(x target) bool {
		t = append(t, x)
		return true
	})
	return t
}

// shortNames maps the names that need no object: "noise" and "snr_db" stand for the two
// ways of stating the noise; "variance" alone means the signal's.
func shortName(t target) string {
	switch t.full {
	case "noise.variance":
		return "noise"
	case "noise.snr_db":
		return "snr_db"
	}
	return t.p.Name
}

// resolve finds the number that name stands for in s: a full path ("penalty.l1") or a
// short name ("l1"). A short name must match one number of the current kinds.
func (s Scenario) resolve(name string) (target, error) {
	var found target
	n := 0
	dotted := strings.Contains(name, ".")
	s.eachTarget(func(t target) bool {
		if (dotted && t.full == name) || (!dotted && shortName(t) == name) {
			if n == 0 {
				found = t
			}
			n++
		}
		return true
	})
	switch {
	case n == 1:
		return found, nil
	case n > 1:
		var names []string
		s.eachTarget(func(t target) bool {
			if shortName(t) == name {
				names = append(names, t.full)
			}
			return true
		})
		return target{}, fieldErr(name, "ambiguous: say %s", strings.Join(names, " or "))
	case name == "design.scale":
		return target{}, fieldErr(name, "is a word (rows, columns, as-given), not a number")
	}
	return target{}, fieldErr(clip(name, 60), "not a number of this scenario (%s)", s.pathList())
}

func (s Scenario) pathList() string {
	var n []string
	for _, p := range s.Paths() {
		n = append(n, p.Name)
	}
	return "it has " + strings.Join(n, ", ")
}

// Paths lists the numbers of s that Get, With and the sweeps accept, in the order design,
// signal, noise, penalty. Lists (empirical values, mixture weights) are not among them.
func (s Scenario) Paths() []PathInfo {
	all := s.targets()
	var out []PathInfo
	for _, t := range all {
		if !t.scalar {
			continue
		}
		name := shortName(t)
		if r, err := s.resolve(name); err != nil || r.full != t.full {
			name = t.full
		}
		out = append(out, PathInfo{Name: name, Path: t.full, Label: t.p.Title(), Unit: t.p.Unit,
			Min: t.p.Min, Max: t.p.Max, MinOpen: t.p.MinOpen, MaxOpen: t.p.MaxOpen, Log: t.p.Log,
			Object: t.object, Role: t.p.Role})
	}
	return out
}

// Get returns the number at path (a full path or a short name; see Paths).
// Special cases are: "noise" when the noise is stated as snr_db, and "snr_db" when it is
// stated as a variance, are derived through the signal's second moment and the design's
// mean (see Noise); "snr_db" of a noiseless scenario is +Inf and that of a signal without
// power -Inf. Lists and words (design.scale) are errors.
func (s Scenario) Get(path string) (float64, error) {
	t, err := s.resolve(path)
	if err != nil {
		return 0, err
	}
	if !t.scalar {
		return 0, fieldErr(t.full, "is a list, not a number")
	}
	switch t.full {
	case "design.alpha":
		return s.Design.Alpha, nil
	case "noise.variance":
		if !s.Noise.SNR {
			return s.Noise.Variance, nil
		}
		return s.NoiseVariance()
	case "noise.snr_db":
		if s.Noise.SNR {
			return s.Noise.SNRdB, nil
		}
		return s.snrDB()
	}
	switch t.object {
	case "design":
		return s.Design.Params[t.p.Name], nil
	case "signal":
		return s.Signal.Params[t.p.Name], nil
	}
	if isGLMObject(t.object) {
		return s.choiceOf(t.object).Params[t.p.Name], nil
	}
	return s.Penalty.Params[t.p.Name], nil
}

// With returns a copy of s with the number at path set to v, validated as Decode
// validates (the error is a *FieldError naming the field). Setting "noise" states the
// noise as a variance and setting "snr_db" states it as an SNR, whichever form s used.
func (s Scenario) With(path string, v float64) (Scenario, error) {
	t, err := s.resolve(path)
	if err != nil {
		return s, err
	}
	if !t.scalar {
		return s, fieldErr(t.full, "is a list, not a number")
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return s, fieldErr(t.full, "must be a finite number")
	}
	c := s.clone()
	switch t.full {
	case "design.alpha":
		c.Design.Alpha = v
	case "noise.variance":
		c.Noise = Noise{Variance: v, Law: c.Noise.Law}
	case "noise.snr_db":
		c.Noise = Noise{SNRdB: v, SNR: true, Law: c.Noise.Law}
	default:
		switch t.object {
		case "design":
			c.Design.Params[t.p.Name] = v
		case "signal":
			c.Signal.Params[t.p.Name] = v
		case "readout", "loss", "noise":
			c.choiceOf(t.object).Params[t.p.Name] = v
		default:
			c.Penalty.Params[t.p.Name] = v
		}
	}
	if err := c.Validate(); err != nil {
		return s, err
	}
	return c, nil
}

// clone copies s deeply, so that a change to the copy never shows through the original.
func (s Scenario) clone() Scenario {
	c := s
	c.Design.Params = maps.Clone(s.Design.Params)
	c.Design.Lists = cloneLists(s.Design.Lists)
	c.Signal.Params = maps.Clone(s.Signal.Params)
	c.Signal.Lists = cloneLists(s.Signal.Lists)
	c.Penalty.Params = maps.Clone(s.Penalty.Params)
	c.Readout, c.Loss, c.Noise.Law = s.Readout.clone(), s.Loss.clone(), s.Noise.Law.clone()
	if s.Study != nil {
		st := *s.Study
		st.Sweep = clonePtr(st.Sweep)
		st.Map = clonePtr(st.Map)
		st.Best = clonePtr(st.Best)
		st.Plan = clonePtr(st.Plan)
		st.Check = clonePtr(st.Check)
		st.Kept = slices.Clone(st.Kept)
		for i := range st.Kept {
			st.Kept[i].Scenario = st.Kept[i].Scenario.clone()
		}
		c.Study = &st
	}
	return c
}

func cloneLists(m map[string][]float64) map[string][]float64 {
	if m == nil {
		return nil
	}
	c := make(map[string][]float64, len(m))
	for k, v := range m {
		c[k] = append([]float64(nil), v...)
	}
	return c
}

func clonePtr[T any](p *T) *T {
	if p == nil {
		return nil
	}
	c := *p
	return &c
}
