package study

import (
	"context"
	"math"

	"hdrisk/engine/param"
	"hdrisk/engine/scenario"
)

// TunedPoint is one point of a best-tuned curve: the fixed point at the best weight for
// this value of the axis, and that weight.
type TunedPoint struct {
	Point
	Weight  float64 // the best value of the tuned weight here (with Ratio: the best l1); NaN when Failed
	AtBound string  // as BestResult.AtBound: the best weight lies at an end of the search range
}

// tunedWindow is how far, as a factor either way, the search for the best weight at one
// point of a tuned curve looks around the best weight of the point before: the best weight
// moves smoothly along an axis, and a narrow bracket costs a third of the full one.
const tunedWindow = 100

// Tuned is the error against the axis of spec with the regularization re-tuned at every
// point (the curve a user plans with: at each m/n, say, the error of the best l1 there).
// Each point runs Best on the scenario with the axis value in place; after the first, its
// search starts in a window of a factor tunedWindow around the best weight before, and
// falls back to the full range of best when the minimum lands on an edge of the window.
//
// Special cases are: a point whose problem cannot be set or whose search finds no
// converged fixed point is returned with Failed set (and Weight NaN) and the curve goes on;
// tuning the field the axis varies is an error, as are the errors of the spec's checks
// (unknown field, range). On cancellation Tuned returns the points done and ctx.Err().
func Tuned(ctx context.Context, s scenario.Scenario, spec SweepSpec, best BestSpec, progress Progress) ([]TunedPoint, error) {
	c, err := s.Check()
	if err != nil {
		return nil, err
	}
	return TunedChecked(ctx, c, spec, best, progress)
}

// TunedChecked is Tuned over a scenario checked already; the axis is bound once.
func TunedChecked(ctx context.Context, c scenario.Checked, spec SweepSpec, best BestSpec, progress Progress) ([]TunedPoint, error) {
	bx, xs, err := spec.bind(c, scenario.MaxSweepPoints, "")
	if err != nil {
		return nil, err
	}
	if best.Over == "" {
		best.Over = defaultOver(c.Paths())
	}
	ax := bx.Info()
	if best.Over == ax.Name || best.Over == ax.Path || (best.Over == Ratio && ax.Object == "penalty" && ax.Role == param.Strength) {
		return nil, specErr("best", "the sweep varies %s itself, so it cannot be re-tuned along the sweep", spec.Over)
	}
	if _, err := newBestRun(c, best); err != nil {
		return nil, err
	}
	out := make([]TunedPoint, 0, len(xs))
	prev := math.NaN()
	for _, x := range xs {
		if err := ctx.Err(); err != nil {
			return out, err
		}
		tp := TunedPoint{Point: Point{X: x}, Weight: math.NaN()}
		sx, err := bx.At(x)
		if err != nil {
			tp.Failed = err.Error()
		} else {
			b, err := tunedAt(ctx, sx, best, prev)
			if err != nil {
				if ctx.Err() != nil {
					return out, ctx.Err()
				}
				tp.Failed = err.Error()
			} else {
				tp.Result, tp.Weight, tp.AtBound = b.Result, b.Value, b.AtBound
				if b.AtBound == "" {
					prev = b.Value
				}
			}
		}
		out = append(out, tp)
		if progress != nil {
			progress(len(out), len(xs))
		}
	}
	return out, nil
}

// tunedAt runs Best at one point, first in the window around prev (when prev is a number).
func tunedAt(ctx context.Context, s scenario.Checked, best BestSpec, prev float64) (BestResult, error) {
	if !math.IsNaN(prev) && best.Lo == 0 && best.Hi == 0 {
		near := best
		near.Lo, near.Hi = prev/tunedWindow, prev*tunedWindow
		if full, err := newBestRun(s, best); err == nil {
			near.Lo = math.Max(near.Lo, full.spec.Lo)
			near.Hi = math.Min(near.Hi, full.spec.Hi)
		}
		if near.Lo < near.Hi {
			b, err := BestChecked(ctx, s, near)
			if err == nil && b.AtBound == "" {
				return b, nil
			}
		}
	}
	return BestChecked(ctx, s, best)
}
