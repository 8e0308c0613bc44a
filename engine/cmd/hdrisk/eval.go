package main

import (
	"errors"
	"flag"
	"io"

	"hdrisk/engine/fixedpoint"
)

// evalResult is the output of eval. Field names are contract 3; a number that is not
// finite is written as null.
type evalResult struct {
	MSE             number `json:"mse"`
	NMSE            number `json:"nmse"`
	NMSEdB          number `json:"nmse_db"`
	Susceptibility  number `json:"susceptibility"`
	NonzeroFraction number `json:"nonzero_fraction"`
	TPP             number `json:"tpp"`
	FDP             number `json:"fdp"`
	TrainError      number `json:"train_error"`
	G1              number `json:"g1"`
	T1              number `json:"t1"`
	G2              number `json:"g2"`
	Residual        number `json:"residual"`
	Converged       bool   `json:"converged"`
	Iterations      int    `json:"iterations"`
	EstimateZero    bool   `json:"estimate_zero"`
	Exists          bool   `json:"exists"`
	// Floor marks an error below the solver's floor (-120 dB), Note the limit or special case
	// that applies in plain words (left out when there is none).
	Floor bool   `json:"floor"`
	Note  string `json:"note,omitempty"`
	glmFields
}

// runEval solves the fixed point of one scenario and prints its observables.
func runEval(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("eval", flag.ContinueOnError)
	solver := solverFlags(fs)
	s, err := scenarioArg(fs, args, stdin)
	if err != nil {
		return err
	}
	opts, err := solver()
	if err != nil {
		return err
	}
	c, err := s.Check()
	if err != nil {
		return err
	}
	var r fixedpoint.Result
	if g, ok := c.GLM(); ok {
		r, err = fixedpoint.SolveGLM(g, opts)
	} else {
		r, err = fixedpoint.Solve(c.Problem(), opts)
	}
	var nm *fixedpoint.NoMinimizerError
	if errors.As(err, &nm) {
		return writeJSON(stdout, absentResult{Exists: false, Reason: nm.Reason})
	}
	if err != nil {
		return err
	}
	return writeJSON(stdout, evalResult{Exists: true, glmFields: glmOutput(r),
		MSE: number(r.MSE), NMSE: number(r.NMSE), NMSEdB: number(r.NMSEdB),
		Susceptibility: number(r.Susceptibility), NonzeroFraction: number(r.NonZero),
		TPP: number(r.TPP), FDP: number(r.FDP), TrainError: number(r.TrainError),
		G1: number(r.G1), T1: number(r.T1), G2: number(r.G2), Residual: number(r.Residual),
		Converged: r.Converged, Iterations: r.Iterations, EstimateZero: r.EstimateZero,
		Floor: r.Floor, Note: r.Note,
	})
}
