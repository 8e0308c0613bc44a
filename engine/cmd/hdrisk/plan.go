package main

import (
	"context"
	"flag"
	"io"
	"os"
	"os/signal"

	"hdrisk/engine/study"
)

// planOutput is the output of plan: alpha is contract 3 (null when no alpha up to the limit
// reaches the target).
type planOutput struct {
	Alpha     *number     `json:"alpha"`
	Reached   bool        `json:"reached"`
	Reason    string      `json:"reason"`
	TargetMSE number      `json:"target_mse"`
	AlphaMax  number      `json:"alpha_max"`
	Best      bestAtAlpha `json:"best"` // at alpha, or where the error is lowest when not reached
	Solves    int         `json:"fixed_points"`
}

type bestAtAlpha struct {
	Alpha   number            `json:"alpha"`
	Over    string            `json:"over"`
	Value   number            `json:"value"`
	MSE     number            `json:"mse"`
	NMSEdB  number            `json:"nmse_db"`
	AtBound string            `json:"at_bound"`
	Penalty map[string]number `json:"penalty"`
}

// runPlan finds the smallest sampling ratio whose best-regularized error reaches a target
// and prints it as JSON. Settings not given come from the scenario's study.plan.
func runPlan(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("plan", flag.ContinueOnError)
	targetDB := fs.Float64("target-db", 0, "target NMSE in dB (10 log10 NMSE)")
	targetMSE := fs.Float64("target-mse", 0, "target MSE (instead of --target-db)")
	alphaMax := fs.Float64("alpha-max", 10, "largest alpha to consider")
	alphaMin := fs.Float64("alpha-min", 0, "smallest alpha to consider (0: 0.01, or alpha-max/10 if smaller)")
	over := fs.String("over", "", "the weight tuned at each alpha (as in best)")
	s, err := scenarioArg(fs, args, stdin)
	if err != nil {
		return err
	}
	set := flagsSet(fs)
	if set["target-db"] && set["target-mse"] {
		return usagef("give --target-db or --target-mse, not both")
	}
	if st := s.Study; st != nil && st.Plan != nil && !set["target-mse"] {
		orDefault(set, "target-db", targetDB, st.Plan.TargetDB)
		orDefault(set, "alpha-max", alphaMax, st.Plan.AlphaMax)
		set["target-db"] = true
	}
	if !set["target-db"] && !set["target-mse"] {
		return usagef("give --target-db or --target-mse (the scenario has no study.plan)")
	}
	if st := s.Study; st != nil && st.Best != nil {
		orDefault(set, "over", over, st.Best.Over)
	}
	spec := study.PlanSpec{Target: *targetDB, AlphaMin: *alphaMin, AlphaMax: *alphaMax, Best: study.BestSpec{Over: *over}}
	if set["target-mse"] {
		spec.Target, spec.MSE = *targetMSE, true
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	r, err := study.Plan(ctx, s, spec)
	if err != nil {
		return err
	}
	b := r.Best
	out := planOutput{Reached: r.Reached, Reason: r.Reason, TargetMSE: number(r.TargetMSE),
		AlphaMax: number(*alphaMax), Solves: r.Solves,
		Best: bestAtAlpha{Alpha: number(b.Scenario.Design.Alpha), Over: b.Over, Value: number(b.Value),
			MSE: number(b.MSE), NMSEdB: number(b.Result.NMSEdB), AtBound: b.AtBound, Penalty: map[string]number{}}}
	if r.Reached {
		a := number(r.Alpha)
		out.Alpha = &a
	}
	for k, v := range b.Scenario.Penalty.Params {
		out.Best.Penalty[k] = number(v)
	}
	return writeJSON(stdout, out)
}
