package study

import (
	"context"
	"fmt"
	"math"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/param"
	"hdrisk/engine/scenario"
)

// Ratio is the BestSpec.Over that moves every strength of the penalty together, keeping
// their ratios as the scenario states them (for the elastic net, l1 and l2 along a fixed
// mix); Value is then the first strength.
const Ratio = "l1+l2"

// BestSpec says which regularization Best varies and where it looks.
type BestSpec struct {
	// Over is the weight to vary: a strength of the penalty ("l1", "l2", "weight", ...),
	// Ratio, or any other field with positive values ("width", ...). Empty: the penalty's
	// first strength (see DefaultOver).
	Over string
	// Lo and Hi bound the search (default 1e-8 and 1e4, clipped to the field's range). With
	// Ratio they bound the first strength.
	Lo, Hi float64
	// PerDecade is the density of the bracketing grid, in points per factor of 10 (default 4).
	PerDecade int
	// Tol is the width, in natural log of the weight, at which the search stops (default 1e-7).
	Tol float64
	// Solver tunes each fixed point (default tolerance 1e-12, tighter than fixedpoint's own,
	// so that the minimum is located to Tol).
	Solver fixedpoint.Options
}

// Bounds reported in BestResult.AtBound.
const (
	Lower = "lower"
	Upper = "upper"
)

// BestResult is the regularization with the lowest MSE.
type BestResult struct {
	Over     string            // the field that was varied
	Value    float64           // its best value (with Ratio: of the first strength)
	MSE      float64           // the MSE there
	AtBound  string            // "" when the minimum is interior to [Lo, Hi], else Lower or Upper
	Note     string            // why a bound was reported short of Lo or Hi, in words
	Lo, Hi   float64           // the search range used
	Result   fixedpoint.Result // the fixed point at Value
	Scenario scenario.Scenario // the scenario with the best weights in place
	Solves   int               // fixed points computed
}

// Strengths lists the penalty's strengths in s (its parameters with the role
// param.Strength), in the registry's order.
func Strengths(s scenario.Scenario) []scenario.PathInfo { return strengths(s.Paths()) }

func strengths(paths []scenario.PathInfo) []scenario.PathInfo {
	var out []scenario.PathInfo
	for _, p := range paths {
		if p.Object == "penalty" && p.Role == param.Strength {
			out = append(out, p)
		}
	}
	return out
}

// DefaultOver returns the weight Best varies when none is named: the first strength of
// the penalty of s (l1 before l2); "" when it has none.
func DefaultOver(s scenario.Scenario) string { return defaultOver(s.Paths()) }

func defaultOver(paths []scenario.PathInfo) string {
	if st := strengths(paths); len(st) > 0 {
		return st[0].Name
	}
	return ""
}

// Best finds the weight that minimizes the MSE, in log space: the MSE on a grid of
// PerDecade points per decade brackets the minimum; golden-section search (Kiefer 1953;
// Press, Teukolsky, Vetterling & Flannery, Numerical Recipes, 3rd ed., section 10.2) then
// narrows the bracket to Tol. Only converged fixed points take part; an MSE below 1e-12 rho2
// counts as 0, so that exact recovery is a plateau rather than noise. The MSE at the best
// point is accurate to the solver's tolerance; Value is located to about the square root of
// that relative to the curvature of the MSE in log weight, so a weight that barely moves the
// MSE has a loosely defined best value.
//
// Special cases are: the smallest MSE on the first grid point (or on a plateau starting
// there) gives AtBound = Lower with Value = Lo; on the last grid point, or where the best
// estimate is zero, AtBound = Upper with Value = Hi. When the grid point beside the lowest
// error did not converge, the minimum is not shown to be interior: that side is reported as
// the bound, at the lowest point, with a Note. An error is returned when no point of the
// grid converges, for an unknown field, and for bounds that are not 0 < Lo < Hi.
func Best(ctx context.Context, s scenario.Scenario, spec BestSpec) (BestResult, error) {
	c, err := s.Check()
	if err != nil {
		return BestResult{}, err
	}
	return BestChecked(ctx, c, spec)
}

// BestChecked is Best over a scenario checked already.
func BestChecked(ctx context.Context, c scenario.Checked, spec BestSpec) (BestResult, error) {
	b, err := newBestRun(c, spec)
	if err != nil {
		return BestResult{}, err
	}
	return b.run(ctx)
}

type bestRun struct {
	c      scenario.Checked
	spec   BestSpec
	first  scenario.Binding // the field varied (with Ratio, the first strength)
	others []string         // with Ratio: the other strengths, set to ratios[i] times the first
	ratios []float64
	rho2   float64
	w      walker
	solves int
}

func newBestRun(c scenario.Checked, spec BestSpec) (*bestRun, error) {
	paths := c.Paths()
	kind := c.Scenario().Penalty.Kind
	if spec.Over == "" {
		spec.Over = defaultOver(paths)
		if spec.Over == "" {
			return nil, specErr("over", "the %s penalty has no strength; name the field to vary (%s)", kind, fieldList(paths))
		}
	}
	b := &bestRun{c: c, spec: spec}
	field := spec.Over
	if spec.Over == Ratio {
		st := strengths(paths)
		if len(st) < 2 {
			return nil, specErr("over", "%s needs a penalty with two strengths or more (the %s penalty)", Ratio, kind)
		}
		v := make([]float64, len(st))
		for i, p := range st {
			v[i], _ = c.Get(p.Path)
			if !(v[i] > 0) {
				return nil, specErr("over", "%s keeps the ratios of the strengths fixed, so each must be > 0 (%s %v)", Ratio, p.Name, v[i])
			}
			if i > 0 {
				b.others = append(b.others, p.Path)
				b.ratios = append(b.ratios, v[i]/v[0])
			}
		}
		field = st[0].Path
	}
	info, ok := pathInfo(paths, field)
	if !ok {
		return nil, specErr("over", "%q is not a field of this scenario (%s)", field, fieldList(paths))
	}
	first, err := c.Bind(info.Path)
	if err != nil {
		return nil, err
	}
	b.first = first
	if b.spec.Lo == 0 {
		b.spec.Lo = math.Max(1e-8, info.Min)
	}
	if b.spec.Hi == 0 {
		b.spec.Hi = math.Min(1e4, info.Max)
	}
	if !(b.spec.Lo > 0) || !(b.spec.Hi > b.spec.Lo) || math.IsInf(b.spec.Hi, 0) {
		return nil, specErr("lo", "need 0 < lo < hi < Inf, not lo %v, hi %v", b.spec.Lo, b.spec.Hi)
	}
	for _, v := range []float64{b.spec.Lo, b.spec.Hi} {
		if _, err := b.at(v); err != nil {
			return nil, err
		}
	}
	if b.spec.PerDecade <= 0 {
		b.spec.PerDecade = 4
	}
	if b.spec.Tol <= 0 {
		b.spec.Tol = 1e-7
	}
	if b.spec.Solver.Tol <= 0 {
		b.spec.Solver.Tol = 1e-12
	}
	b.rho2 = c.Problem().Signal.Second()
	b.w = walker{opt: b.spec.Solver}
	return b, nil
}

func pathInfo(paths []scenario.PathInfo, name string) (scenario.PathInfo, bool) {
	for _, p := range paths {
		if p.Name == name || p.Path == name {
			return p, true
		}
	}
	return scenario.PathInfo{}, false
}

// at returns the scenario with the weight set to v (with Ratio, every strength at its
// ratio to v).
func (b *bestRun) at(v float64) (scenario.Checked, error) {
	c, err := b.first.At(v)
	for i, path := range b.others {
		if err != nil {
			break
		}
		var o scenario.Binding
		if o, err = c.Bind(path); err == nil {
			c, err = o.At(v * b.ratios[i])
		}
	}
	return c, err
}

// eval solves at weight v and returns the MSE to minimize: +Inf where there is no
// converged fixed point, 0 below the exact-recovery floor.
func (b *bestRun) eval(v float64) (float64, Point) {
	b.solves++
	p := b.w.solve(b.at(v))
	p.X = v
	if !p.OK() {
		return math.Inf(1), p
	}
	f := p.Result.MSE
	if f < 1e-12*b.rho2 {
		f = 0
	}
	return f, p
}

func (b *bestRun) run(ctx context.Context) (BestResult, error) {
	lo, hi := math.Log(b.spec.Lo), math.Log(b.spec.Hi)
	n := int(math.Ceil((hi-lo)/math.Ln10*float64(b.spec.PerDecade))) + 1
	us := make([]float64, n)
	fs := make([]float64, n)
	pts := make([]Point, n)
	best := -1
	for k := range us {
		if err := ctx.Err(); err != nil {
			return BestResult{}, err
		}
		us[k] = lo + (hi-lo)*float64(k)/float64(n-1)
		v := math.Exp(us[k])
		switch k {
		case 0:
			v = b.spec.Lo
		case n - 1:
			v = b.spec.Hi
		}
		fs[k], pts[k] = b.eval(v)
		if !math.IsInf(fs[k], 1) && (best < 0 || fs[k] < fs[best]) {
			best = k
		}
	}
	if best < 0 {
		return BestResult{}, specErr("over", "no point between %v and %v converged (%s at %v)", b.spec.Lo, b.spec.Hi, pts[0].Status(), pts[0].X)
	}
	switch {
	case best == 0:
		return b.result(pts[0], Lower, ""), nil
	case best == n-1 || pts[best].Result.EstimateZero:
		return b.result(pts[n-1], Upper, ""), nil
	case !pts[best-1].OK():
		return b.result(pts[best], Lower, fmt.Sprintf("the fixed point does not converge at %s = %.6g (%s), next to the lowest error found; the minimum may lie lower", b.spec.Over, pts[best-1].X, pts[best-1].Status())), nil
	case !pts[best+1].OK():
		return b.result(pts[best], Upper, fmt.Sprintf("the fixed point does not converge at %s = %.6g (%s), next to the lowest error found; the minimum may lie higher", b.spec.Over, pts[best+1].X, pts[best+1].Status())), nil
	}
	p, err := b.golden(ctx, us[best-1], us[best], us[best+1], fs[best], pts[best])
	if err != nil {
		return BestResult{}, err
	}
	return b.result(p, "", ""), nil
}

// golden narrows the bracket a < x < c, with f(x) = fx below f(a) and f(c), to width Tol by
// golden-section search (Numerical Recipes, 3rd ed., section 10.2). It returns the best
// point seen.
func (b *bestRun) golden(ctx context.Context, a, x, c, fx float64, px Point) (Point, error) {
	const r = 0.3819660112501051 // 2 - golden ratio: the fraction of the larger interval probed
	for c-a > b.spec.Tol {
		if err := ctx.Err(); err != nil {
			return Point{}, err
		}
		var u float64
		if x-a > c-x {
			u = x - r*(x-a)
		} else {
			u = x + r*(c-x)
		}
		fu, pu := b.eval(math.Exp(u))
		if fu < fx {
			if u < x {
				c = x
			} else {
				a = x
			}
			x, fx, px = u, fu, pu
		} else if u < x {
			a = u
		} else {
			c = u
		}
	}
	return px, nil
}

func (b *bestRun) result(p Point, bound, note string) BestResult {
	c, _ := b.at(p.X)
	return BestResult{Over: b.spec.Over, Value: p.X, MSE: p.Result.MSE, AtBound: bound, Note: note,
		Lo: b.spec.Lo, Hi: b.spec.Hi, Result: p.Result, Scenario: c.Scenario(), Solves: b.solves}
}
