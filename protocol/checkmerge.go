package protocol

import (
	"fmt"
	"slices"
	"time"

	"hdrisk/engine/simulate"
)

// MergeChecks joins the results of one check whose trials were shared between workers (each
// part a job with its own First) into the result of one job: the trials in order, and every
// mean, standard error and verdict recomputed from them as simulate.Check computes them, so
// that the numbers do not depend on how many workers ran the check. Seconds is the sum of the
// parts' times in the workers. A warning that several parts give alike (the prediction's,
// which every part computes) is kept once.
// Special cases are: no parts, parts whose trials do not follow one another from the first
// part's First, and parts of different checks (size, seed, solver) are errors.
func MergeChecks(parts []CheckResult) (CheckResult, error) {
	if len(parts) == 0 {
		return CheckResult{}, fmt.Errorf("check: no parts to merge")
	}
	ps := slices.Clone(parts)
	slices.SortFunc(ps, func(a, b CheckResult) int { return a.First - b.First })
	out := ps[0]
	out.PerTrial, out.Warnings, out.NotConverged, out.Seconds = nil, []string{}, 0, 0
	for _, st := range []**CheckStat{&out.Cosine, &out.NormRatio, &out.TestError} {
		if *st != nil {
			c := **st
			*st = &c
		}
	}
	var cmp *CheckComparison
	if ps[0].Comparison != nil {
		c := *ps[0].Comparison
		c.RotatedPerTrial, c.RotatedNotConverged = nil, 0
		cmp = &c
	}
	next := ps[0].First
	for _, p := range ps {
		if p.First != next || p.N != out.N || p.M != out.M || p.Seed != out.Seed || p.Solver != out.Solver || (p.Comparison != nil) != (cmp != nil) ||
			p.GLM != out.GLM || (p.TestError != nil) != (out.TestError != nil) {
			return CheckResult{}, fmt.Errorf("check: the parts are not one check split by trials (trials from %d, expected %d)", p.First, next)
		}
		next += p.Trials
		out.PerTrial = append(out.PerTrial, p.PerTrial...)
		for _, w := range p.Warnings {
			if !slices.Contains(out.Warnings, w) {
				out.Warnings = append(out.Warnings, w)
			}
		}
		out.NotConverged += p.NotConverged
		out.Seconds += p.Seconds
		if p.Curve != nil {
			out.Curve = p.Curve
		}
		if cmp != nil {
			cmp.RotatedPerTrial = append(cmp.RotatedPerTrial, p.Comparison.RotatedPerTrial...)
			cmp.RotatedNotConverged += p.Comparison.RotatedNotConverged
		}
	}
	out.Trials = len(out.PerTrial)
	out.Converged = out.NotConverged == 0
	col := func(ts []CheckTrial, f func(CheckTrial) Num) simulate.Stat {
		x := make([]float64, len(ts))
		for i, t := range ts {
			x[i] = float64(f(t))
		}
		return simulate.Mean(x)
	}
	mse := col(out.PerTrial, func(t CheckTrial) Num { return t.MSE })
	out.MeanMSE, out.StdErr = Num(mse.Mean), Num(mse.StdErr)
	for _, s := range []struct {
		st *CheckStat
		f  func(CheckTrial) Num
	}{{&out.Nonzero, func(t CheckTrial) Num { return t.Nonzero }}, {&out.TPP, func(t CheckTrial) Num { return t.TPP }}, {&out.FDP, func(t CheckTrial) Num { return t.FDP }},
		{out.Cosine, func(t CheckTrial) Num { return t.Cosine }}, {out.NormRatio, func(t CheckTrial) Num { return t.NormRatio }},
		{out.TestError, func(t CheckTrial) Num { return t.TestError }}} {
		if s.st == nil {
			continue
		}
		v := col(out.PerTrial, s.f)
		s.st.Mean, s.st.StdErr = Num(v.Mean), Num(v.StdErr)
	}
	if cmp != nil {
		rot := col(cmp.RotatedPerTrial, func(t CheckTrial) Num { return t.MSE })
		cmp.MatrixMeanMSE, cmp.MatrixStdErr = out.MeanMSE, out.StdErr
		cmp.RotatedMeanMSE, cmp.RotatedStdErr = Num(rot.Mean), Num(rot.StdErr)
		z := simulate.Verdict(mse, rot)
		cmp.Z, cmp.Agrees = Num(z), z >= -simulate.AgreeZ && z <= simulate.AgreeZ
		out.Comparison = cmp
	}
	return out, nil
}

// SplitTrials shares trials between at most workers parts of nearly equal size, as
// (first, count) pairs that follow one another from first.
func SplitTrials(first, trials, workers int) [][2]int {
	k := max(1, min(workers, trials))
	var out [][2]int
	for i := range k {
		lo, hi := first+i*trials/k, first+(i+1)*trials/k
		out = append(out, [2]int{lo, hi - lo})
	}
	return out
}

// Time limits of one job in the page's worker pool, which protect the page from a worker
// that never answers: a job that sends no reply (progress or result) for JobStallLimit, or
// runs for JobRunLimit in all, is stopped, its worker replaced and the job reported failed.
// The longest single step the page runs without progress is the eigenvalue reduction of a
// 4000 x 4000 Gram matrix (the readers' cap), some minutes in a worker.
const (
	JobStallLimit = 5 * time.Minute
	JobRunLimit   = 30 * time.Minute
)
