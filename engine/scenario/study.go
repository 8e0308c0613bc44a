package scenario

import (
	"math"
	"slices"
	"strings"

	"hdrisk/engine/param"
)

var (
	studyKeys = []string{"view", "sweep", "map", "best", "plan", "check", "kept"}
	keptKeys  = []string{"label", "scenario", "over", "from", "to", "points", "log"}
	sweepKeys = []string{"over", "from", "to", "points", "log", "curves", "curves_at"}
	mapKeys   = []string{"x", "x_from", "x_to", "x_points", "x_log", "y", "y_from", "y_to", "y_points", "y_log"}
	bestKeys  = []string{"over"}
	planKeys  = []string{"target_db", "alpha_max"}
	checkKeys = []string{"n", "trials", "seed", "solver"}
)

// Range of study.plan.target_db, in dB, and the default of study.plan.alpha_max.
const (
	MinTargetDB     = -200.0
	MaxTargetDB     = 100.0
	DefaultAlphaMax = 10.0
)

func readStudy(v *jval) (Study, error) {
	var st Study
	r, err := newReader("study", v)
	if err != nil {
		return st, err
	}
	if err := r.restExcept(studyKeys); err != nil {
		return st, err
	}
	if st.View, err = r.text("view", true); err != nil {
		return st, err
	}
	if sv, ok := r.get("sweep"); ok {
		sw, err := readSweep(sv)
		if err != nil {
			return st, err
		}
		st.Sweep = &sw
	}
	if mv, ok := r.get("map"); ok {
		m, err := readMap(mv)
		if err != nil {
			return st, err
		}
		st.Map = &m
	}
	if bv, ok := r.get("best"); ok {
		br, err := newReader("study.best", bv)
		if err != nil {
			return st, err
		}
		if err := br.restExcept(bestKeys); err != nil {
			return st, err
		}
		var b Best
		if b.Over, err = br.text("over", true); err != nil {
			return st, err
		}
		st.Best = &b
	}
	if pv, ok := r.get("plan"); ok {
		pr, err := newReader("study.plan", pv)
		if err != nil {
			return st, err
		}
		if err := pr.restExcept(planKeys); err != nil {
			return st, err
		}
		p := Plan{AlphaMax: DefaultAlphaMax}
		if p.TargetDB, _, err = pr.float("target_db", true); err != nil {
			return st, err
		}
		if x, ok, err := pr.float("alpha_max", false); err != nil {
			return st, err
		} else if ok {
			p.AlphaMax = x
		}
		st.Plan = &p
	}
	if cv, ok := r.get("check"); ok {
		cr, err := newReader("study.check", cv)
		if err != nil {
			return st, err
		}
		if err := cr.restExcept(checkKeys); err != nil {
			return st, err
		}
		var c Check
		n, err := cr.integer("n", 2, MaxCheckN)
		if err != nil {
			return st, err
		}
		t, err := cr.integer("trials", 1, MaxTrials)
		if err != nil {
			return st, err
		}
		seed, err := cr.integer("seed", 0, MaxSeed)
		if err != nil {
			return st, err
		}
		c.N, c.Trials, c.Seed = int(n), int(t), uint64(seed)
		if c.Solver, err = cr.text("solver", false); err != nil {
			return st, err
		}
		st.Check = &c
	}
	if kv, ok := r.get("kept"); ok {
		if st.Kept, err = readKept(kv); err != nil {
			return st, err
		}
	}
	return st, nil
}

// readKept reads study.kept: a list of at most MaxKept curves, each a label, a scenario
// document with no study and the keys of a sweep.
func readKept(v *jval) ([]Kept, error) {
	if v.kind != jArray {
		return nil, fieldErr("study.kept", "must be a list of kept curves, not %v", v.kind)
	}
	if len(v.arr) > MaxKept {
		return nil, fieldErr("study.kept", "holds %d curves; the limit is %d", len(v.arr), MaxKept)
	}
	var kept []Kept
	for i, e := range v.arr {
		path := sprintf("study.kept[%d]", i)
		r, err := newReader(path, e)
		if err != nil {
			return nil, err
		}
		if err := r.restExcept(keptKeys); err != nil {
			return nil, err
		}
		var k Kept
		if k.Label, err = r.text("label", false); err != nil {
			return nil, err
		}
		sv, err := r.need("scenario")
		if err != nil {
			return nil, err
		}
		if k.Scenario, err = fromTree(sv); err != nil {
			return nil, under(path+".scenario", err)
		}
		if k.Scenario.Study != nil {
			return nil, fieldErr(path+".scenario.study", "a kept curve's scenario holds no study")
		}
		if err := r.axis("over", "", MaxSweepPoints, &k.Sweep.Over, &k.Sweep.From, &k.Sweep.To, &k.Sweep.Points, &k.Sweep.Log); err != nil {
			return nil, err
		}
		kept = append(kept, k)
	}
	return kept, nil
}

// under moves a *FieldError of a nested document under the path it was found at.
func under(path string, err error) error {
	fe, ok := err.(*FieldError)
	if !ok {
		return err
	}
	if fe.Field == "" {
		return fieldErr(path, "%s", fe.Reason)
	}
	return fieldErr(path+"."+fe.Field, "%s", fe.Reason)
}

func readSweep(v *jval) (Sweep, error) {
	var sw Sweep
	r, err := newReader("study.sweep", v)
	if err != nil {
		return sw, err
	}
	if err := r.restExcept(sweepKeys); err != nil {
		return sw, err
	}
	if err := r.axis("over", "", MaxSweepPoints, &sw.Over, &sw.From, &sw.To, &sw.Points, &sw.Log); err != nil {
		return sw, err
	}
	if sw.Curves, err = r.text("curves", false); err != nil {
		return sw, err
	}
	if cv, ok := r.get("curves_at"); ok {
		if sw.CurvesAt, err = readList(cv, r.at("curves_at"), MaxCurves); err != nil {
			return sw, err
		}
	}
	return sw, nil
}

func readMap(v *jval) (Map, error) {
	var m Map
	r, err := newReader("study.map", v)
	if err != nil {
		return m, err
	}
	if err := r.restExcept(mapKeys); err != nil {
		return m, err
	}
	if err := r.axis("x", "x_", MaxMapPoints, &m.X, &m.XFrom, &m.XTo, &m.XPoints, &m.XLog); err != nil {
		return m, err
	}
	err = r.axis("y", "y_", MaxMapPoints, &m.Y, &m.YFrom, &m.YTo, &m.YPoints, &m.YLog)
	return m, err
}

// axis reads one swept value: its path under the key over, then from, to, points (2 to
// maxPoints) and the optional log, each key led by prefix ("x_from" for a map's x axis).
func (r *reader) axis(over, prefix string, maxPoints int64, path *string, from, to *float64, points *int, log *bool) error {
	var err error
	if *path, err = r.text(over, true); err != nil {
		return err
	}
	if *from, _, err = r.float(prefix+"from", true); err != nil {
		return err
	}
	if *to, _, err = r.float(prefix+"to", true); err != nil {
		return err
	}
	n, err := r.integer(prefix+"points", 2, maxPoints)
	if err != nil {
		return err
	}
	*points = int(n)
	*log, err = r.boolean(prefix + "log")
	return err
}

func (s Scenario) validateStudy() error {
	st := s.Study
	if !slices.Contains(views, st.View) {
		return fieldErr("study.view", "must be one of %s, not %q", strings.Join(views, ", "), clip(st.View, 40))
	}
	if sw := st.Sweep; sw != nil {
		if _, err := s.checkAxis("study.sweep.over", sw.Over, "study.sweep.from", sw.From, "study.sweep.to", sw.To,
			"study.sweep.points", sw.Points, MaxSweepPoints, sw.Log); err != nil {
			return err
		}
		if err := s.checkCurves(sw); err != nil {
			return err
		}
	}
	if m := st.Map; m != nil {
		x, err := s.checkAxis("study.map.x", m.X, "study.map.x_from", m.XFrom, "study.map.x_to", m.XTo,
			"study.map.x_points", m.XPoints, MaxMapPoints, m.XLog)
		if err != nil {
			return err
		}
		y, err := s.checkAxis("study.map.y", m.Y, "study.map.y_from", m.YFrom, "study.map.y_to", m.YTo,
			"study.map.y_points", m.YPoints, MaxMapPoints, m.YLog)
		if err != nil {
			return err
		}
		if x.full == y.full {
			return fieldErr("study.map.y", "names the same value as study.map.x (%s)", x.full)
		}
	}
	if b := st.Best; b != nil {
		if t, err := s.resolve(b.Over); err != nil || t.object != "penalty" || t.p.Role != param.Strength {
			return fieldErr("study.best.over", "penalty %s has no %s (its strengths: %s)", s.Penalty.Kind, clip(b.Over, 40), strings.Join(s.strengths(), ", "))
		}
	}
	if p := st.Plan; p != nil {
		if math.IsNaN(p.TargetDB) || p.TargetDB < MinTargetDB || p.TargetDB > MaxTargetDB {
			return fieldErr("study.plan.target_db", "must be in [%s, %s] dB, not %s", num(MinTargetDB), num(MaxTargetDB), num(p.TargetDB))
		}
		if err := AlphaParam.Check("study.plan.alpha_max", p.AlphaMax); err != nil {
			return err
		}
	}
	if c := st.Check; c != nil {
		switch {
		case c.N < 2 || c.N > MaxCheckN:
			return fieldErr("study.check.n", "must be between 2 and %d, not %d", MaxCheckN, c.N)
		case c.Trials < 1 || c.Trials > MaxTrials:
			return fieldErr("study.check.trials", "must be between 1 and %d, not %d", MaxTrials, c.Trials)
		case c.Seed > MaxSeed:
			return fieldErr("study.check.seed", "must be between 0 and %d, not %d", uint64(MaxSeed), c.Seed)
		case c.Solver != "" && !slices.Contains(solvers, c.Solver):
			return fieldErr("study.check.solver", "must be one of %s, not %q", strings.Join(solvers, ", "), clip(c.Solver, 40))
		}
	}
	if len(st.Kept) > MaxKept {
		return fieldErr("study.kept", "holds %d curves; the limit is %d", len(st.Kept), MaxKept)
	}
	for i, k := range st.Kept {
		path := sprintf("study.kept[%d]", i)
		if err := checkText(path+".label", k.Label, MaxTitle, false); err != nil {
			return err
		}
		if k.Scenario.Study != nil {
			return fieldErr(path+".scenario.study", "a kept curve's scenario holds no study")
		}
		if err := k.Scenario.Validate(); err != nil {
			return under(path+".scenario", err)
		}
		sw := k.Sweep
		if _, err := k.Scenario.checkAxis(path+".over", sw.Over, path+".from", sw.From, path+".to", sw.To,
			path+".points", sw.Points, MaxSweepPoints, sw.Log); err != nil {
			return err
		}
	}
	return nil
}

// strengths lists the names of the penalty's strengths (the parameters with the role
// param.Strength), in registry order.
func (s Scenario) strengths() []string {
	var n []string
	s.eachTarget(func(t target) bool {
		if t.object == "penalty" && t.p.Role == param.Strength {
			n = append(n, t.p.Name)
		}
		return true
	})
	return n
}

// checkAxis validates one swept value: the path exists in s, the ends lie in its range,
// differ, and are positive on a log axis.
func (s Scenario) checkAxis(overField, over, fromField string, from float64, toField string, to float64,
	pointsField string, points, maxPoints int, log bool) (target, error) {
	t, err := s.resolve(over)
	if err != nil {
		return t, fieldErr(overField, "%s", err.(*FieldError).Reason)
	}
	if !t.scalar {
		return t, fieldErr(overField, "%s is a list, not a number that can be swept", t.full)
	}
	if err := t.p.Check(fromField, from); err != nil {
		return t, err
	}
	if err := t.p.Check(toField, to); err != nil {
		return t, err
	}
	if from == to {
		return t, fieldErr(toField, "equals %s; a sweep needs two different ends", fromField)
	}
	if log && (from <= 0 || to <= 0) {
		return t, fieldErr(fromField, "a log axis needs both ends above 0")
	}
	if points < 2 || points > maxPoints {
		return t, fieldErr(pointsField, "must be between 2 and %d, not %d", maxPoints, points)
	}
	return t, nil
}

// checkCurves validates the optional curves of a sweep: a scalar path other than the swept
// one, with 1 to MaxCurves values, each in its domain; values without a path are refused.
func (s Scenario) checkCurves(sw *Sweep) error {
	if sw.Curves == "" {
		if sw.CurvesAt != nil {
			return fieldErr("study.sweep.curves_at", "gives values without study.sweep.curves, the field they set")
		}
		return nil
	}
	t, err := s.resolve(sw.Curves)
	if err != nil {
		return fieldErr("study.sweep.curves", "%s", err.(*FieldError).Reason)
	}
	if !t.scalar {
		return fieldErr("study.sweep.curves", "%s is a list, not a number that can set a curve", t.full)
	}
	if o, err := s.resolve(sw.Over); err == nil && o.full == t.full {
		return fieldErr("study.sweep.curves", "names the swept value (%s); the curves need another", t.full)
	}
	if len(sw.CurvesAt) < 1 || len(sw.CurvesAt) > MaxCurves {
		return fieldErr("study.sweep.curves_at", "must hold 1 to %d values, not %d", MaxCurves, len(sw.CurvesAt))
	}
	bare := s
	bare.Study = nil
	for i, v := range sw.CurvesAt {
		f := sprintf("study.sweep.curves_at[%d]", i)
		if err := t.p.Check(f, v); err != nil {
			return err
		}
		// The scenario with the value set is checked whole, so that a value its kind refuses
		// (a bit depth between whole numbers) is refused here as the file decoder would.
		if _, err := bare.With(t.full, v); err != nil {
			reason := err.Error()
			if fe, ok := err.(*FieldError); ok {
				reason = fe.Reason
			}
			return fieldErr(f, "%s", reason)
		}
		if slices.Contains(sw.CurvesAt[:i], v) {
			return fieldErr(f, "repeats %s", num(v))
		}
	}
	return nil
}
