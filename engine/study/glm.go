package study

import (
	"math"

	"hdrisk/engine/fixedpoint"
)

// solveGLM solves one point of a generalized linear model (docs/method.md section 10). A point
// without a unique finite minimizer fails with the reason, so that no study draws, minimizes
// or writes an error figure for it.
func solveGLM(g fixedpoint.GLM, o fixedpoint.Options) Point {
	o.Start = nil
	r, err := fixedpoint.SolveGLM(g, o)
	if err != nil {
		return Point{Failed: err.Error()}
	}
	return Point{Result: r}
}

// solveGLM is the walker's point of a generalized linear model: warm-started from the last
// point that converged to a nonzero estimate with a nonzero error, as the linear points are,
// and after two such points in a row first from the next state on the line through them
// (GLMState.Extrapolate). Both starts carry the last point's Newton Jacobian.
// fixedpoint.SolveGLMFrom tries the starts in turn and falls back to the cold starts, so the
// point and the verdict on existence are a cold solve's.
func (w *walker) solveGLM(g fixedpoint.GLM) Point {
	o := w.opt
	o.Start = nil
	var starts []fixedpoint.GLMState
	if a, b := w.glmWarm, w.glmPrev; a != nil {
		if w.extrapolate && b != nil && a.SigZ > 0 && b.SigZ > 0 {
			starts = append(starts, a.Extrapolate(*b))
		}
		starts = append(starts, *a)
	}
	r, st, err := fixedpoint.SolveGLMFrom(g, o, starts...)
	if err != nil {
		w.glmPrev = nil
		return Point{Failed: err.Error()}
	}
	if r.Converged && !r.EstimateZero && r.NMSE > warmFloor {
		w.glmPrev, w.glmWarm = w.glmWarm, &st
	} else {
		w.glmPrev = nil
	}
	return Point{Result: r}
}

// GLMObservables lists the observables that only a generalized linear model reports, in the
// order of the CSV columns that follow Observables when a study holds such points; for a
// point without them (or without labels, for test_error and train_misfit) they are NaN.
func GLMObservables() []Observable {
	of := func(f func(fixedpoint.Result) float64, labels bool) func(fixedpoint.Result) float64 {
		return func(r fixedpoint.Result) float64 {
			if !r.GLM || (labels && !r.Labels) {
				return math.NaN()
			}
			return f(r)
		}
	}
	return []Observable{
		{"cosine", "cosine of xhat and x0", of(func(g fixedpoint.Result) float64 { return g.Cosine }, false)},
		{"norm_ratio", "|xhat| / |x0|", of(func(g fixedpoint.Result) float64 { return g.NormRatio }, false)},
		{"test_error", "test error (fresh labels)", of(func(g fixedpoint.Result) float64 { return g.TestError }, true)},
		{"train_misfit", "training labels misfit", of(func(g fixedpoint.Result) float64 { return g.TrainMisfit }, true)},
		{"train_loss", "training loss", of(func(g fixedpoint.Result) float64 { return g.TrainLoss }, false)},
	}
}

func anyGLM(pts []Point) bool {
	for _, p := range pts {
		if p.Result.GLM {
			return true
		}
	}
	return false
}
