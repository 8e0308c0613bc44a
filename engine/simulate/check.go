package simulate

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

// Solver names a convex solver.
type Solver int

const (
	// SolverCD is coordinate descent (l1, ridge and elastic net only), stopping on the duality gap.
	SolverCD Solver = iota
	// SolverProx is accelerated proximal gradient (any penalty), stopping on the KKT residual.
	SolverProx
	// SolverVAMP is VAMP on the design's SVD (any penalty), stopping on the KKT residual; it also
	// reports its per-iteration error beside the state evolution.
	SolverVAMP
)

func (s Solver) String() string {
	switch s {
	case SolverCD:
		return "cd"
	case SolverProx:
		return "prox"
	case SolverVAMP:
		return "vamp"
	}
	return fmt.Sprintf("Solver(%d)", int(s))
}

// ParseSolver reads "cd", "prox" or "vamp".
func ParseSolver(s string) (Solver, error) {
	for _, v := range []Solver{SolverCD, SolverProx, SolverVAMP} {
		if v.String() == s {
			return v, nil
		}
	}
	return 0, paramErr("solver", "%q is not one of cd, prox, vamp", s)
}

// Problem is the scenario to check: the laws of the prediction, and whether the design is drawn
// entry by entry (the gaussian shape) rather than as U S V^T.
type Problem struct {
	fixedpoint.Problem
	GaussianEntries bool
}

// Options set a finite-size check. The zero value of each field but N and Trials picks a
// default.
type Options struct {
	N        int    // unknowns per instance, 1..MaxN (m = round(alpha n))
	Trials   int    // independent instances, 1..MaxTrials
	Seed     uint64 // trial t draws from PCG(Seed, t)
	Solver   Solver
	Tol      float64 // solver tolerance; 0 means DefaultTol
	MaxIter  int     // solver iteration cap; 0 means DefaultMaxIter
	Factors  Factors // how U and V are drawn (see DesignDraw.GaussianEntries for Gaussian designs)
	Rounds   int     // rounds of fast factors; 0 means DefaultRounds
	Spectrum Spectrum
	// First is the index of the first trial: trial t of this run draws from PCG(Seed, First+t),
	// so that trials split over several runs give the numbers of one run.
	First int
	// Matrix, when set, is the user's own design, held fixed in every trial (docs/method.md
	// section 8): see CheckMatrix's rules in Check.
	Matrix *Matrix
}

// Stat is a mean over trials with its standard error (0 with one trial).
type Stat struct{ Mean, StdErr float64 }

// Trial is one instance drawn and solved.
type Trial struct {
	MSE        float64 // (1/n)||xhat - x0||^2
	NonZero    float64 // fraction of nonzero entries of xhat
	TPP        float64 // #{xhat != 0, x0 != 0} / #{x0 != 0}; 0 when x0 has no nonzero entry
	FDP        float64 // #{xhat != 0, x0 = 0} / #{xhat != 0}; 0 when xhat is zero
	Iterations int
	Converged  bool
	Residual   float64 // the solver's stopping criterion at the end
	Seconds    float64 // drawing and solving
	criterion  string
}

// TracePoint is VAMP's error after one iteration, averaged over trials, beside the state
// evolution's prediction from the same start.
type TracePoint struct {
	Iteration int
	MeanError float64
	StdErr    float64
	Predicted float64
}

// Report is the outcome of a finite-size check.
type Report struct {
	N, M, Trials int
	First        int // the index of the first trial (Options.First)
	Seed         uint64
	Solver       string // the solver that ran
	SolverNote   string // why it is not the one asked for; "" when it is
	Factors      string // "entries" for a Gaussian design drawn entry by entry
	Spectrum     string
	Criterion    string  // the solver's stopping rule (CriterionGap or CriterionKKT)
	Tol          float64 // its tolerance
	MaxIter      int
	MeanMSE      float64
	StdErr       float64
	PerTrial     []Trial
	NonZero      Stat
	TPP, FDP     Stat
	Predicted    fixedpoint.Result
	// NotConverged counts the trials whose solver reached its iteration limit before its
	// criterion met Tol; their estimates are included in the means, and the report says so.
	NotConverged int
	Trace        []TracePoint // VAMP only
	Seconds      float64
	// Comparison is set for a check with a fixed matrix: the trials with the matrix beside
	// trials with random rotations of its spectrum.
	Comparison *Comparison
}

// Warnings returns one plain sentence per trial whose solver did not converge.
func (r Report) Warnings() []string {
	var w []string
	for i, t := range r.PerTrial {
		if !t.Converged {
			w = append(w, fmt.Sprintf("trial %d: solver %s reached its iteration limit (%d) with %s = %.3g > tol %.3g; its estimate is not a solution",
				r.First+i, r.Solver, r.MaxIter, r.Criterion, t.Residual, r.Tol))
		}
	}
	return w
}

// Check draws o.Trials instances of p with o.N unknowns, solves each, and reports the mean
// error with its standard error beside the prediction of fixedpoint.Solve (docs/method.md section 8).
// progress, when not nil, is called after each trial with the number done and the total. A
// cancelled ctx stops the work and returns ctx.Err().
//
// Special cases are: sizes past the caps (MaxN, MaxM, MaxDenseEntries, MaxHaarN, MaxSVDN, MaxTrials) are
// refused with a *ParamError naming the cap; SolverCD with a penalty other than l1, ridge or
// elastic net is refused; a prediction that fails is returned as its error.
func Check(ctx context.Context, p Problem, o Options, progress func(done, total int)) (Report, error) {
	start := time.Now()
	if p.Design == nil || p.Signal == nil || p.Penalty == nil {
		return Report{}, paramErr("problem", "missing design, signal or penalty")
	}
	if o.First < 0 || o.First > MaxTrials {
		return Report{}, paramErr("first", "%d is outside 0..%d", o.First, MaxTrials)
	}
	if o.Matrix != nil {
		if err := matrixShape(p.Design, o.Matrix); err != nil {
			return Report{}, err
		}
		o.N = o.Matrix.Cols
	}
	if o.Trials < 1 || o.Trials > MaxTrials {
		return Report{}, paramErr("trials", "%d is outside 1..%d (the cap)", o.Trials, MaxTrials)
	}
	draw := DesignDraw{Law: p.Design, GaussianEntries: p.GaussianEntries, Factors: o.Factors, Rounds: o.Rounds, Spectrum: o.Spectrum}
	run := o.Solver
	if run == SolverCD && cdMatrixFree(draw, o.N) {
		run = SolverProx
	}
	if err := checkSize(draw, o.N, run == SolverCD && o.Matrix == nil, o.Solver == SolverVAMP); err != nil {
		return Report{}, err
	}
	var l1, l2 float64
	switch o.Solver {
	case SolverCD:
		var ok bool
		if l1, l2, ok = elasticNetWeights(p.Penalty); !ok {
			return Report{}, paramErr("solver", "cd solves l1, ridge and elastic-net penalties only, not %q; use prox or vamp", p.Penalty.Name())
		}
	case SolverProx, SolverVAMP:
	default:
		return Report{}, paramErr("solver", "%v is not one of cd, prox, vamp", o.Solver)
	}
	so := SolverOptions{Tol: o.Tol, MaxIter: o.MaxIter}.withDefaults()
	pred, err := fixedpoint.Solve(p.Problem, fixedpoint.Options{})
	if err != nil {
		return Report{}, fmt.Errorf("simulate: prediction: %w", err)
	}
	rep := Report{N: o.N, M: Rows(p.Design.Alpha(), o.N), Trials: o.Trials, First: o.First, Seed: o.Seed,
		Solver: run.String(), Factors: o.Factors.String(), Spectrum: o.Spectrum.String(),
		Tol: so.Tol, MaxIter: so.MaxIter, Predicted: pred}
	if run != o.Solver {
		rep.SolverNote = cdNote
	}
	if draw.Entries(o.N) {
		rep.Factors = "entries"
	}
	if o.Matrix != nil {
		rep.Solver, rep.SolverNote = o.Solver.String(), ""
		return checkMatrix(ctx, p, o, run, draw, rep, l1, l2, so, pred, progress, start)
	}
	var traces [][]float64
	for t := 0; t < o.Trials; t++ {
		if err := ctx.Err(); err != nil {
			return Report{}, err
		}
		t0 := time.Now()
		rng := rand.New(rand.NewPCG(o.Seed, uint64(o.First+t)))
		inst, err := Draw(rng, draw, p.Signal, p.Noise, o.N)
		if err != nil {
			return Report{}, err
		}
		tr, trace, err := solveTrial(ctx, inst, p, run, l1, l2, so, pred)
		if err != nil {
			return Report{}, err
		}
		tr.Seconds = time.Since(t0).Seconds()
		rep.add(tr)
		if trace != nil {
			traces = append(traces, trace)
		}
		if progress != nil {
			progress(t+1, o.Trials)
		}
	}
	rep.summarize()
	if o.Solver == SolverVAMP {
		rep.Trace = vampTrace(p.Problem, startGamma2(pred), traces)
	}
	rep.Seconds = time.Since(start).Seconds()
	return rep, nil
}

// add records one finished trial.
func (r *Report) add(tr Trial) {
	r.PerTrial = append(r.PerTrial, tr)
	r.Criterion = tr.criterion
	if !tr.Converged {
		r.NotConverged++
	}
}

// summarize sets the means over PerTrial.
func (r *Report) summarize() {
	k := len(r.PerTrial)
	mse, nz, tpp, fdp := make([]float64, k), make([]float64, k), make([]float64, k), make([]float64, k)
	for i, tr := range r.PerTrial {
		mse[i], nz[i], tpp[i], fdp[i] = tr.MSE, tr.NonZero, tr.TPP, tr.FDP
	}
	ms := stat(mse)
	r.MeanMSE, r.StdErr = ms.Mean, ms.StdErr
	r.NonZero, r.TPP, r.FDP = stat(nz), stat(tpp), stat(fdp)
}

// solveTrial solves one instance with the chosen solver and scores it; the trace is VAMP's
// per-iteration error (nil for the other solvers).
func solveTrial(ctx context.Context, inst *Instance, p Problem, solver Solver, l1, l2 float64, so SolverOptions, pred fixedpoint.Result) (Trial, []float64, error) {
	var sol Solution
	var trace []float64
	var err error
	switch solver {
	case SolverCD:
		var a *Matrix
		if a, err = inst.dense(); err != nil {
			return Trial{}, nil, err
		}
		sol, err = CoordinateDescent(ctx, a, inst.Y, l1, l2, nil, so)
	case SolverProx:
		var op Operator = inst.Dense
		lip := inst.Lipschitz
		if inst.SVD != nil {
			op = inst.SVD
			for _, s := range inst.SVD.S {
				lip = math.Max(lip, s*s)
			}
		}
		sol, err = ProxGradient(ctx, op, inst.Y, p.Penalty, lip, nil, so)
	case SolverVAMP:
		var f *SVD
		if f, err = inst.svd(); err != nil {
			return Trial{}, nil, err
		}
		var vr VAMPResult
		vr, err = VAMP(ctx, f, inst.Y, p.Penalty, VAMPOptions{SolverOptions: so, Gamma2: startGamma2(pred), Truth: inst.X0})
		sol, trace = vr.Solution, vr.Errors
	}
	if err != nil {
		return Trial{}, nil, err
	}
	if err := ctx.Err(); err != nil {
		return Trial{}, nil, err
	}
	tr := score(inst.X0, sol.X)
	tr.Iterations, tr.Converged, tr.Residual, tr.criterion = sol.Iterations, sol.Converged, sol.Residual, sol.Criterion
	return tr, trace, nil
}

// cdNote says why prox ran where cd was asked.
const cdNote = "cd was asked; prox ran instead, on the fast factors without forming F: forming F densely for coordinate descent costs more than solving matrix-free, on a design this well conditioned"

// maxFreeCondition is the largest condition number of F^T F (on its nonzero eigenvalues) at
// which cd's problem is solved matrix-free by prox: accelerated proximal gradient needs about
// sqrt(condition) iterations of two fast products each, where coordinate descent must first
// form F at the cost of m fast products (measured: prox is 2 to 13 times faster at n = 500 to
// 4000 on an orthogonal design; engine/simulate's benchmarks).
const maxFreeCondition = 1e4

// cdMatrixFree reports whether cd's problem on an instance of d with n unknowns is better
// solved matrix-free: the instance is drawn with fast factors, not held in full, and its
// spectrum (the law's quantiles) is well conditioned.
func cdMatrixFree(d DesignDraw, n int) bool {
	if d.Factors != FactorsFast || d.Entries(n) {
		return false
	}
	sv := d.Law.SingularValues(Rows(d.Law.Alpha(), n), n)
	hi, lo := 0.0, math.Inf(1)
	for _, v := range sv {
		if v > 0 {
			hi, lo = math.Max(hi, v), math.Min(lo, v)
		}
	}
	return hi > 0 && sq(hi/lo) <= maxFreeCondition
}

// startGamma2 starts VAMP at the fixed point's precision of the linear step, where the state
// evolution starts too; 1 when the prediction has none.
func startGamma2(r fixedpoint.Result) float64 {
	if r.G2 > 0 && !math.IsInf(r.G2, 0) {
		return r.G2
	}
	return 1
}

func score(x0, xhat []float64) Trial {
	var t Trial
	var e float64
	var nz, active, tp int
	for i, v := range xhat {
		e += sq(v - x0[i])
		if v != 0 {
			nz++
			if x0[i] != 0 {
				tp++
			}
		}
		if x0[i] != 0 {
			active++
		}
	}
	n := float64(len(x0))
	t.MSE = e / n
	t.NonZero = float64(nz) / n
	if active > 0 {
		t.TPP = float64(tp) / float64(active)
	}
	if nz > 0 {
		t.FDP = float64(nz-tp) / float64(nz)
	}
	return t
}

// Mean returns the mean of x with its standard error (the sample standard deviation over
// sqrt(len(x)); 0 for one value): the statistic of every mean a check reports, for callers
// that merge the trials of several checks.
func Mean(x []float64) Stat { return stat(x) }

func stat(x []float64) Stat {
	n := float64(len(x))
	m := 0.0
	for _, v := range x {
		m += v
	}
	m /= n
	if len(x) < 2 {
		return Stat{Mean: m}
	}
	ss := 0.0
	for _, v := range x {
		ss += sq(v - m)
	}
	return Stat{Mean: m, StdErr: math.Sqrt(ss / (n - 1) / n)}
}

// vampTrace averages VAMP's per-iteration errors over trials, up to the fewest iterations any
// trial ran (at most 200), and sets the state evolution beside them.
func vampTrace(p fixedpoint.Problem, g2 float64, traces [][]float64) []TracePoint {
	if len(traces) == 0 {
		return nil
	}
	k := 200
	for _, tr := range traces {
		k = min(k, len(tr))
	}
	pred := StateEvolution(p, g2, k)
	out := make([]TracePoint, k)
	col := make([]float64, len(traces))
	for i := range out {
		for j, tr := range traces {
			col[j] = tr[i]
		}
		s := stat(col)
		out[i] = TracePoint{Iteration: i + 1, MeanError: s.Mean, StdErr: s.StdErr, Predicted: pred[i]}
	}
	return out
}

// StateEvolution returns the error of VAMP's denoiser output predicted for iterations 1..k when
// VAMP starts from r2 = 0 at precision g2 (Rangan, Schniter & Fletcher 2019, section V): the
// linear step at (g2, t2) gives E2 = Delta S3 + g2^2 t2 S2, a2 = g2 S1 and the denoiser's input
// (g1, t1) = (T/S1, (E2 - a2^2 t2)/(1 - a2)^2); the denoiser gives (E1, A1) from the scalar
// channel, then g2 = g1 (1 - A1)/A1 and t2 = (E1 - A1^2 t1)/(1 - A1)^2. The start r2 = 0 has
// error variance t2 = E[x0^2].
//
// Special cases are: the recursion stops early (the slice is shorter) when A1 leaves (0, 1) or a
// variance is not finite.
func StateEvolution(p fixedpoint.Problem, g2 float64, k int) []float64 {
	t2 := p.Signal.Second()
	var out []float64
	for len(out) < k {
		tr := p.Design.At(g2)
		a2 := g2 * tr.S1
		e2 := p.Noise*tr.S3 + g2*g2*t2*tr.S2
		g1 := tr.T / tr.S1
		t1 := (e2 - a2*a2*t2) / (tr.T * tr.T)
		if !(t1 >= 0) || math.IsInf(t1, 0) || !(g1 > 0) {
			break
		}
		mom := signal.Expect(p.Signal, p.Penalty, g1, t1)
		out = append(out, mom.MSE)
		if !(mom.A > 0) || !(mom.A < 1) {
			break
		}
		g2 = g1 * (1 - mom.A) / mom.A
		t2 = (mom.MSE - mom.A*mom.A*t1) / sq(1-mom.A)
	}
	return out
}

// elasticNetWeights returns l1 and l2 of an l1, ridge or elastic-net penalty, the ones
// coordinate descent solves, from the strengths the penalty states.
func elasticNetWeights(p penalty.Penalty) (l1, l2 float64, ok bool) {
	switch p.Name() {
	case "l1", "ridge", "elastic-net":
	default:
		return 0, 0, false
	}
	for _, st := range p.Strengths() {
		switch st.Name {
		case "l1":
			l1 = st.Value
		case "l2":
			l2 = st.Value
		}
	}
	return l1, l2, true
}
