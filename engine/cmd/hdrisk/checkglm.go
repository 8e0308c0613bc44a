package main

import (
	"context"
	"fmt"
	"io"
	"time"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/simulate"
)

// checkGLMResult is the output of check for a generalized linear model (a scenario with a
// readout or loss group, docs/method.md section 10): finite instances solved by the primal-dual
// method with the loss's prox, beside the prediction.
type checkGLMResult struct {
	GLM             bool   `json:"glm"`
	MeanMSE         number `json:"mean_mse"`
	StdErr          number `json:"stderr"`
	PredictedMSE    number `json:"predicted_mse"`
	MeanCosine      number `json:"mean_cosine"`
	CosineStdErr    number `json:"cosine_stderr"`
	PredictedCosine number `json:"predicted_cosine"`
	// The test error on fresh rows and labels (simulate.TestErrorGLM), for a readout with
	// labels only.
	MeanTestError       *number  `json:"mean_test_error,omitempty"`
	TestErrorStdErr     *number  `json:"test_error_stderr,omitempty"`
	PredictedTestError  *number  `json:"predicted_test_error,omitempty"`
	PredictionConverged bool     `json:"prediction_converged"`
	Trials              int      `json:"trials"`
	N                   int      `json:"n"`
	M                   int      `json:"m"`
	Seed                uint64   `json:"seed"`
	Solver              string   `json:"solver"`
	Converged           bool     `json:"converged"`
	NotConverged        int      `json:"not_converged"`
	Warnings            []string `json:"warnings"`
	Seconds             number   `json:"seconds"`
}

// runCheckGLM draws trials instances of g with n unknowns (trial t from PCG(seed, t)),
// solves each with simulate.TrialGLM and compares the mean error and cosine (and, for a readout
// with labels, the test error on fresh rows) with SolveGLM's.
func runCheckGLM(ctx context.Context, g fixedpoint.GLM, d simulate.DesignDraw, n, trials int, seed uint64,
	so simulate.SolverOptions, stdout, stderr io.Writer, progress bool) error {
	if n < 2 || trials < 1 {
		return usagef("--n must be at least 2 and --trials at least 1")
	}
	pred, err := fixedpoint.SolveGLM(g, fixedpoint.Options{})
	if err != nil {
		return err
	}
	start := time.Now()
	out := checkGLMResult{GLM: true, Trials: trials, N: n, M: simulate.Rows(g.Design.Alpha(), n), Seed: seed,
		Solver: "primal-dual", PredictedMSE: number(pred.MSE), PredictedCosine: number(pred.Cosine),
		PredictionConverged: pred.Converged, Warnings: []string{}}
	var report func(done, total int)
	if progress {
		report = func(done, total int) { fmt.Fprintf(stderr, "hdrisk check: trial %d of %d done\n", done, total) }
	}
	tr, err := simulate.TrialsGLM(ctx, d, g, n, 0, trials, seed, so, report)
	if err != nil {
		return err
	}
	var mse, cos, te []float64
	for _, t := range tr {
		if !t.Converged {
			out.NotConverged++
		}
		mse, cos, te = append(mse, t.MSE), append(cos, t.Cosine), append(te, t.TestError)
	}
	m := simulate.Mean(mse)
	out.MeanMSE, out.StdErr = number(m.Mean), number(m.StdErr)
	c := simulate.Mean(cos)
	out.MeanCosine, out.CosineStdErr = number(c.Mean), number(c.StdErr)
	if pred.Labels {
		e := simulate.Mean(te)
		p, mn, sn := number(pred.TestError), number(e.Mean), number(e.StdErr)
		out.MeanTestError, out.TestErrorStdErr, out.PredictedTestError = &mn, &sn, &p
	}
	out.Converged = out.NotConverged == 0
	if !out.Converged {
		out.Warnings = append(out.Warnings, fmt.Sprintf("%d of %d instances did not reach the solver's tolerance; raise --max-iter", out.NotConverged, trials))
	}
	if !pred.Converged {
		out.Warnings = append(out.Warnings, "the prediction did not converge: "+pred.Note)
	}
	out.Seconds = number(time.Since(start).Seconds())
	return writeJSON(stdout, out)
}
