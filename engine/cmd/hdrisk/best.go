package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"

	"hdrisk/engine/study"
)

// bestOutput is the output of best: over, value and mse are contract 3.
type bestOutput struct {
	Over       string            `json:"over"`
	Value      number            `json:"value"`
	MSE        number            `json:"mse"`
	NMSE       number            `json:"nmse"`
	NMSEdB     number            `json:"nmse_db"`
	AtBound    string            `json:"at_bound"` // "", "lower" or "upper"
	Note       string            `json:"note,omitempty"`
	Lo         number            `json:"lo"`
	Hi         number            `json:"hi"`
	Converged  bool              `json:"converged"`
	Iterations int               `json:"iterations"`
	Penalty    map[string]number `json:"penalty"` // every weight of the penalty at the best point
	Bayes      *bayesOutput      `json:"bayes,omitempty"`
	Solves     int               `json:"fixed_points"`
}

// bayesOutput is the Bayes-optimal reference: what no estimator beats.
type bayesOutput struct {
	MSE    number `json:"mse"` // the optimal fixed point: the minimum mean-square error
	NMSEdB number `json:"nmse_db"`
	Start  string `json:"optimal_start"` // the start that reached it: uninformed or informed
	// Where the starts end apart (a first-order transition) both fixed points are given,
	// with the free-energy gap between them (informed minus uninformed, nats per entry; null
	// where it is infinite) and a note saying which one is optimal and that the other exists.
	UninformedMSE number `json:"uninformed_mse"` // what the algorithm reaches
	InformedMSE   number `json:"informed_mse"`
	Differ        bool   `json:"differ"`
	Gap           number `json:"gap"`
	Note          string `json:"note,omitempty"`
	Converged     bool   `json:"converged"`
}

// bayesJSON is the command line's account of the Bayes reference.
func bayesJSON(r study.BayesResult) *bayesOutput {
	out := &bayesOutput{MSE: number(r.Optimal.MSE), NMSEdB: number(r.Optimal.NMSEdB), Start: r.OptimalStart,
		UninformedMSE: number(r.Uninformed.MSE), InformedMSE: number(r.Informed.MSE), Differ: r.Differ,
		Gap: number(r.Gap), Converged: r.Uninformed.Converged && r.Informed.Converged}
	if r.Differ {
		other := r.Informed
		if r.OptimalStart == study.StartInformed {
			other = r.Uninformed
		}
		out.Note = fmt.Sprintf("the state evolution has two stable fixed points: the optimal one (lower free energy) is reached from the %s start; the other, NMSE %.4g dB, also exists", r.OptimalStart, other.NMSEdB)
	}
	return out
}

// runBest finds the regularization weight with the lowest MSE and prints it as JSON.
func runBest(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("best", flag.ContinueOnError)
	over := fs.String("over", "", "the weight to vary: a strength of the penalty (default: its first, l1 before l2; hdrisk kinds lists them), l1+l2 (every strength at their ratio) or another positive field")
	lo := fs.Float64("lo", 0, "lower end of the search (0: 1e-8)")
	hi := fs.Float64("hi", 0, "upper end of the search (0: 1e4)")
	bayes := fs.Bool("bayes", false, "add the Bayes-optimal error (Gaussian-mixture signals)")
	s, err := scenarioArg(fs, args, stdin)
	if err != nil {
		return err
	}
	if st := s.Study; st != nil && st.Best != nil {
		orDefault(flagsSet(fs), "over", over, st.Best.Over)
	}
	spec := study.BestSpec{Over: *over, Lo: *lo, Hi: *hi}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	b, err := study.Best(ctx, s, spec)
	if err != nil {
		return err
	}
	out := bestOutput{Over: b.Over, Value: number(b.Value), MSE: number(b.MSE),
		NMSE: number(b.Result.NMSE), NMSEdB: number(b.Result.NMSEdB), AtBound: b.AtBound, Note: b.Note,
		Lo: number(b.Lo), Hi: number(b.Hi),
		Converged: b.Result.Converged, Iterations: b.Result.Iterations, Solves: b.Solves,
		Penalty: map[string]number{}}
	for k, v := range b.Scenario.Penalty.Params {
		out.Penalty[k] = number(v)
	}
	if *bayes {
		p, err := s.Problem()
		if err != nil {
			return err
		}
		r, err := study.Bayes(p)
		if err != nil {
			return err
		}
		out.Bayes = bayesJSON(r)
	}
	return writeJSON(stdout, out)
}
