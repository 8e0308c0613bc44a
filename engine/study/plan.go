package study

import (
	"context"
	"fmt"
	"math"

	"hdrisk/engine/scenario"
)

// PlanSpec states the error to reach and where to look for the sampling ratio.
type PlanSpec struct {
	// Target is the NMSE to reach, in dB (10 log10 NMSE); with MSE set it is the MSE itself.
	Target float64
	MSE    bool
	// AlphaMin and AlphaMax bound the search (defaults: 0.01 and 10, AlphaMin clipped to
	// AlphaMax/10 when AlphaMax is small).
	AlphaMin, AlphaMax float64
	// PerDecade is the density of the scan for the first crossing (default 8).
	PerDecade int
	// Tol is the relative width of the final bracket on alpha (default 1e-8).
	Tol float64
	// Best says how each alpha is regularized (its Over, bounds and tolerances).
	Best BestSpec
}

// PlanResult is the smallest sampling ratio that reaches the target.
type PlanResult struct {
	Alpha     float64    // the smallest alpha found to reach the target (when Reached)
	Best      BestResult // the best regularization at Alpha (or, when not Reached, where the error is lowest)
	Reached   bool
	Reason    string  // why the answer is what it is, in words
	TargetMSE float64 // the target as an MSE
	Solves    int     // fixed points computed
}

// Plan finds the smallest alpha in [AlphaMin, AlphaMax] at which the best-regularized MSE
// (Best with spec.Best at that alpha) is at or below the target. A scan on a logarithmic
// grid finds the first grid value that reaches it; the crossing is then located by the
// Illinois variant of regula falsi on log MSE against log alpha (Dowell & Jarratt 1971,
// BIT 11), which keeps the bracket and converges superlinearly on the smooth error curve.
//
// Special cases are: a target already reached at AlphaMin gives Alpha = AlphaMin, Reached,
// and a Reason that says the crossing lies lower; a target reached nowhere up to AlphaMax
// gives Reached = false, a Reason that names the lowest error found and where, and Best at
// that alpha. A crossing between two scan points that is followed by another is found only
// at the scan's resolution (the error need not fall monotonically with alpha, for instance
// in the columns scale, where more rows share the same total power). Errors: a target
// that is not finite (or an MSE target <= 0), bounds outside (0, scenario.MaxAlpha], and
// the errors of Best.
func Plan(ctx context.Context, s scenario.Scenario, spec PlanSpec) (PlanResult, error) {
	c, err := s.Check()
	if err != nil {
		return PlanResult{}, err
	}
	return PlanChecked(ctx, c, spec)
}

// PlanChecked is Plan over a scenario checked already.
func PlanChecked(ctx context.Context, c scenario.Checked, spec PlanSpec) (PlanResult, error) {
	alpha, err := c.Bind("design.alpha")
	if err != nil {
		return PlanResult{}, err
	}
	pl := planner{c: c, alpha: alpha, spec: spec}
	if err := pl.init(); err != nil {
		return PlanResult{}, err
	}
	return pl.run(ctx)
}

type planner struct {
	c      scenario.Checked
	alpha  scenario.Binding
	spec   PlanSpec
	target float64 // MSE
	solves int
}

func (pl *planner) init() error {
	sp := &pl.spec
	if math.IsNaN(sp.Target) || math.IsInf(sp.Target, 0) {
		return specErr("target", "must be a finite number, not %v", sp.Target)
	}
	if sp.AlphaMax == 0 {
		sp.AlphaMax = 10
	}
	if sp.AlphaMin == 0 {
		sp.AlphaMin = math.Min(0.01, sp.AlphaMax/10)
	}
	if !(sp.AlphaMax > 0 && sp.AlphaMax <= scenario.MaxAlpha) {
		return specErr("alpha-max", "must be in (0, %v], not %v", float64(scenario.MaxAlpha), sp.AlphaMax)
	}
	if !(sp.AlphaMin > 0 && sp.AlphaMin < sp.AlphaMax) {
		return specErr("alpha-min", "must be in (0, alpha-max = %v), not %v", sp.AlphaMax, sp.AlphaMin)
	}
	if sp.PerDecade <= 0 {
		sp.PerDecade = 8
	}
	if sp.Tol <= 0 {
		sp.Tol = 1e-8
	}
	rho2 := pl.c.Problem().Signal.Second()
	if sp.MSE {
		if !(sp.Target > 0) {
			return specErr("target", "an MSE target must be > 0, not %v", sp.Target)
		}
		pl.target = sp.Target
	} else {
		pl.target = rho2 * math.Pow(10, sp.Target/10)
	}
	return nil
}

// best returns the best-regularized point at alpha.
func (pl *planner) best(ctx context.Context, alpha float64) (BestResult, error) {
	ca, err := pl.alpha.At(alpha)
	if err != nil {
		return BestResult{}, err
	}
	b, err := BestChecked(ctx, ca, pl.spec.Best)
	pl.solves += b.Solves
	if err != nil {
		return BestResult{}, fmt.Errorf("at alpha = %v: %w", alpha, err)
	}
	return b, nil
}

func (pl *planner) describe() string {
	if pl.spec.MSE {
		return fmt.Sprintf("MSE %.6g", pl.target)
	}
	return fmt.Sprintf("%.6g dB", pl.spec.Target)
}

func (pl *planner) run(ctx context.Context) (PlanResult, error) {
	sp := pl.spec
	lo, hi := math.Log(sp.AlphaMin), math.Log(sp.AlphaMax)
	n := int(math.Ceil((hi-lo)/math.Ln10*float64(sp.PerDecade))) + 1
	res := PlanResult{TargetMSE: pl.target}
	var lowest BestResult
	prevU, prevF := 0.0, 0.0
	for k := 0; k < n; k++ {
		u := lo + (hi-lo)*float64(k)/float64(n-1)
		alpha := math.Exp(u)
		if k == n-1 {
			alpha = sp.AlphaMax
		}
		b, err := pl.best(ctx, alpha)
		if err != nil {
			return PlanResult{}, err
		}
		if k == 0 || b.MSE < lowest.MSE {
			lowest = b
		}
		f := pl.gap(b.MSE)
		if f <= 0 {
			res.Reached = true
			if k == 0 {
				res.Alpha, res.Best = sp.AlphaMin, b
				res.Reason = fmt.Sprintf("the target %s is already reached at alpha-min = %v, the smallest alpha searched; the smallest alpha that reaches it lies lower", pl.describe(), sp.AlphaMin)
			} else {
				res.Alpha, res.Best, err = pl.cross(ctx, prevU, prevF, u, f, b)
				if err != nil {
					return PlanResult{}, err
				}
				res.Reason = fmt.Sprintf("the best-regularized error falls to %s at alpha = %.10g", pl.describe(), res.Alpha)
			}
			res.Solves = pl.solves
			return res, nil
		}
		prevU, prevF = u, f
	}
	res.Best, res.Alpha = lowest, 0
	res.Reason = fmt.Sprintf("no alpha up to alpha-max = %v reaches %s: the lowest best-regularized error found is %.4g dB (MSE %.6g), at alpha = %.6g",
		sp.AlphaMax, pl.describe(), lowest.Result.NMSEdB, lowest.MSE, lowest.Scenario.Design.Alpha)
	res.Solves = pl.solves
	return res, nil
}

// gap is log(MSE / target): positive above the target. An MSE of exactly zero (exact
// recovery) is below every target.
func (pl *planner) gap(mse float64) float64 {
	if mse <= 0 {
		return math.Inf(-1)
	}
	return math.Log(mse / pl.target)
}

// cross locates the crossing between log alpha a (above the target, gap fa > 0) and c
// (reached, fc <= 0) by the Illinois method, and returns the smallest alpha found to reach the
// target, with its best regularization.
func (pl *planner) cross(ctx context.Context, a, fa, c, fc float64, bc BestResult) (float64, BestResult, error) {
	side := 0
	for c-a > pl.spec.Tol {
		var u float64
		if math.IsInf(fc, -1) {
			u = (a + c) / 2
		} else {
			u = (a*fc - c*fa) / (fc - fa)
		}
		// Keep each probe inside the bracket by at least a small fraction of it, so that a
		// flat end cannot stall the method.
		w := 1e-3 * (c - a)
		u = math.Min(math.Max(u, a+w), c-w)
		b, err := pl.best(ctx, math.Exp(u))
		if err != nil {
			return 0, BestResult{}, err
		}
		f := pl.gap(b.MSE)
		if f <= 0 {
			c, fc, bc = u, f, b
			if side == -1 {
				fa /= 2
			}
			side = -1
		} else {
			a, fa = u, f
			if side == 1 && !math.IsInf(fc, -1) {
				fc /= 2
			}
			side = 1
		}
	}
	return bc.Scenario.Design.Alpha, bc, nil
}
