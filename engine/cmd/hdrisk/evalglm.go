package main

import "hdrisk/engine/fixedpoint"

// glmFields are the observables that eval adds for a generalized linear model (a readout,
// loss or noise law other than today's): absent from the output otherwise.
type glmFields struct {
	Cosine      *number `json:"cosine,omitempty"`
	NormRatio   *number `json:"norm_ratio,omitempty"`
	TestError   *number `json:"test_error,omitempty"`
	TrainMisfit *number `json:"train_misfit,omitempty"`
	TrainLoss   *number `json:"train_loss,omitempty"`
}

// absentResult is eval's output when the estimate has no unique finite minimizer: no error
// figure, only the reason.
type absentResult struct {
	Exists bool   `json:"exists"`
	Reason string `json:"exists_reason"`
}

func glmOutput(r fixedpoint.Result) glmFields {
	if !r.GLM {
		return glmFields{}
	}
	g := r
	p := func(x float64) *number { n := number(x); return &n }
	f := glmFields{Cosine: p(g.Cosine), NormRatio: p(g.NormRatio), TrainLoss: p(g.TrainLoss)}
	if g.Labels {
		f.TestError, f.TrainMisfit = p(g.TestError), p(g.TrainMisfit)
	}
	return f
}
