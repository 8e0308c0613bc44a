package simulate

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

func problem(t testing.TB, d design.Law, derr error, pen penalty.Penalty, perr error, gaussian bool) Problem {
	t.Helper()
	if derr != nil || perr != nil {
		t.Fatal(derr, perr)
	}
	sig, err := signal.BernoulliGauss(0.1, 1)
	if err != nil {
		t.Fatal(err)
	}
	return Problem{Problem: fixedpoint.Problem{Design: d, Signal: sig, Penalty: pen, Noise: 0.01}, GaussianEntries: gaussian}
}

type checkCase struct {
	name string
	p    Problem
	o    Options
}

func checkCases(t testing.TB) []checkCase {
	gl, ge := design.Gaussian(0.5, design.Rows)
	ol, oe := design.Orthogonal(0.5, design.Rows)
	ul, ue := design.UniformSV(0.6, 0.5, 1.5, design.Rows)
	lasso, le := penalty.L1(0.05)
	enet, ee := penalty.ElasticNet(0.05, 0.1)
	return []checkCase{
		{"gaussian-lasso-cd", problem(t, gl, ge, lasso, le, true), Options{N: 500, Trials: 10, Seed: 1}},
		{"orthogonal-lasso-cd-fast", problem(t, ol, oe, lasso, le, false), Options{N: 500, Trials: 10, Seed: 2}},
		{"orthogonal-enet-prox-haar", problem(t, ol, oe, enet, ee, false), Options{N: 500, Trials: 6, Seed: 3, Solver: SolverProx, Factors: FactorsQR}},
		{"uniformsv-enet-vamp-fast", problem(t, ul, ue, enet, ee, false), Options{N: 500, Trials: 10, Seed: 4, Solver: SolverVAMP}},
		{"gaussian-enet-vamp", problem(t, gl, ge, enet, ee, true), Options{N: 500, Trials: 4, Seed: 5, Solver: SolverVAMP}},
	}
}

// within reports |got - want| <= 3 se + rel |want| + abs.
func within(got, se, want, rel, abs float64) bool {
	return math.Abs(got-want) <= 3*se+rel*math.Abs(want)+abs
}

// The mean error over trials at n = 500 lies within 3 standard errors plus 5% of the asymptotic
// prediction (common practice: asymptotic predictions match simulations at a few hundred
// unknowns to within a few percent), and so do the support-recovery rates.
func TestCheckAgainstPrediction(t *testing.T) {
	for _, c := range checkCases(t) {
		rep, err := Check(context.Background(), c.p, c.o, nil)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		pr := rep.Predicted
		t.Logf("%s: mse %.5f +- %.5f, predicted %.5f; nonzero %.4f+-%.4f (%.4f) tpp %.4f+-%.4f (%.4f) fdp %.4f+-%.4f (%.4f); %.2fs",
			c.name, rep.MeanMSE, rep.StdErr, pr.MSE, rep.NonZero.Mean, rep.NonZero.StdErr, pr.NonZero,
			rep.TPP.Mean, rep.TPP.StdErr, pr.TPP, rep.FDP.Mean, rep.FDP.StdErr, pr.FDP, rep.Seconds)
		if rep.NotConverged != 0 {
			t.Errorf("%s: %d trials did not converge: %v", c.name, rep.NotConverged, rep.Warnings())
		}
		if !within(rep.MeanMSE, rep.StdErr, pr.MSE, 0.05, 0) {
			t.Errorf("%s: mean MSE %.5f +- %.5f, predicted %.5f", c.name, rep.MeanMSE, rep.StdErr, pr.MSE)
		}
		if !within(rep.NonZero.Mean, rep.NonZero.StdErr, pr.NonZero, 0.05, 0.005) {
			t.Errorf("%s: nonzero fraction %.4f +- %.4f, predicted %.4f", c.name, rep.NonZero.Mean, rep.NonZero.StdErr, pr.NonZero)
		}
		if !within(rep.TPP.Mean, rep.TPP.StdErr, pr.TPP, 0.05, 0.01) {
			t.Errorf("%s: TPP %.4f +- %.4f, predicted %.4f", c.name, rep.TPP.Mean, rep.TPP.StdErr, pr.TPP)
		}
		if !within(rep.FDP.Mean, rep.FDP.StdErr, pr.FDP, 0.05, 0.01) {
			t.Errorf("%s: FDP %.4f +- %.4f, predicted %.4f", c.name, rep.FDP.Mean, rep.FDP.StdErr, pr.FDP)
		}
	}
}

// Fast structured factors give the errors of Haar factors within error bars (common practice:
// randomized orthogonal transforms behave like Haar matrices for these estimators).
func TestFastFactorsMatchHaar(t *testing.T) {
	ol, oe := design.GeometricSV(0.5, 10, design.Rows)
	lasso, le := penalty.L1(0.05)
	p := problem(t, ol, oe, lasso, le, false)
	var reps [2]Report
	for i, f := range []Factors{FactorsFast, FactorsQR} {
		rep, err := Check(context.Background(), p, Options{N: 400, Trials: 8, Seed: 11, Factors: f}, nil)
		if err != nil {
			t.Fatal(err)
		}
		reps[i] = rep
	}
	a, b := reps[0], reps[1]
	se := math.Hypot(a.StdErr, b.StdErr)
	t.Logf("fast %.5f +- %.5f, haar %.5f +- %.5f, predicted %.5f", a.MeanMSE, a.StdErr, b.MeanMSE, b.StdErr, a.Predicted.MSE)
	if math.Abs(a.MeanMSE-b.MeanMSE) > 3*se+0.03*b.MeanMSE {
		t.Errorf("fast factors %.5f +- %.5f, Haar %.5f +- %.5f", a.MeanMSE, a.StdErr, b.MeanMSE, b.StdErr)
	}
	if a.Factors != "fast" || b.Factors != "haar-qr" {
		t.Errorf("factors reported %q and %q", a.Factors, b.Factors)
	}
}

// VAMP's per-iteration error follows its state evolution (Rangan, Schniter & Fletcher 2019,
// "Vector approximate message passing", IEEE Trans. Inf. Theory, Theorem 1), here at n = 2000
// with fast factors, within 3 standard errors plus 5% at every recorded iteration.
func TestVAMPTraceFollowsStateEvolution(t *testing.T) {
	ol, oe := design.UniformEV(0.7, 0.2, 2, design.Rows)
	lasso, le := penalty.L1(0.1)
	p := problem(t, ol, oe, lasso, le, false)
	rep, err := Check(context.Background(), p, Options{N: 2000, Trials: 4, Seed: 5, Solver: SolverVAMP}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Trace) < 3 {
		t.Fatalf("trace of %d points", len(rep.Trace))
	}
	for _, tp := range rep.Trace {
		if !within(tp.MeanError, tp.StdErr, tp.Predicted, 0.05, 0) {
			t.Errorf("iteration %d: error %.5f +- %.5f, state evolution %.5f", tp.Iteration, tp.MeanError, tp.StdErr, tp.Predicted)
		}
	}
	t.Logf("%d iterations traced; first %+v, last %+v", len(rep.Trace), rep.Trace[0], rep.Trace[len(rep.Trace)-1])
	last := rep.Trace[len(rep.Trace)-1]
	if math.Abs(last.Predicted-rep.Predicted.MSE) > 1e-3*rep.Predicted.MSE {
		t.Errorf("state evolution ends at %.6f, fixed point %.6f", last.Predicted, rep.Predicted.MSE)
	}
}

func lassoProblem(t testing.TB) Problem {
	ol, oe := design.Orthogonal(0.5, design.Rows)
	lasso, le := penalty.L1(0.05)
	return problem(t, ol, oe, lasso, le, false)
}

func TestCheckRefusesPastCaps(t *testing.T) {
	p := lassoProblem(t)
	g, _ := design.Gaussian(0.5, design.Rows)
	pg := p
	pg.Design, pg.GaussianEntries = g, true
	huber, _ := penalty.Huber(0.1, 1)
	ph := p
	ph.Penalty = huber
	cases := []struct {
		name string
		p    Problem
		o    Options
		want string
	}{
		{"n", p, Options{N: MaxN + 1, Trials: 1, Solver: SolverVAMP}, "cap of 1000000 unknowns"},
		{"trials", p, Options{N: 100, Trials: MaxTrials + 1}, "10000"},
		{"zero trials", p, Options{N: 100, Trials: 0}, "trials"},
		{"cd dense", p, Options{N: 20000, Trials: 1, Factors: FactorsQR}, "cap of 25000000"},
		{"gaussian entries", pg, Options{N: 10000, Trials: 1, Solver: SolverProx, Factors: FactorsQR}, "cap of 25000000"},
		{"gaussian svd", pg, Options{N: 3000, Trials: 1, Solver: SolverVAMP}, "cap of 2000"},
		{"haar", p, Options{N: 5000, Trials: 1, Solver: SolverProx, Factors: FactorsHouseholder}, "cap of 4000"},
		{"cd huber", ph, Options{N: 100, Trials: 1}, "cd solves l1, ridge and elastic-net"},
	}
	for _, c := range cases {
		_, err := Check(context.Background(), c.p, c.o, nil)
		var pe *ParamError
		if !errors.As(err, &pe) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want a *ParamError containing %q", c.name, err, c.want)
		}
	}
}

// A solver stopped by its iteration cap says so: the trial is not converged, the report counts
// it and its warning names the limit and the criterion.
func TestCheckReportsIterationLimit(t *testing.T) {
	p := lassoProblem(t)
	for _, s := range []Solver{SolverCD, SolverProx, SolverVAMP} {
		rep, err := Check(context.Background(), p, Options{N: 200, Trials: 2, Seed: 1, Solver: s, MaxIter: 2, Tol: 1e-14}, nil)
		if err != nil {
			t.Fatal(err)
		}
		w := rep.Warnings()
		if rep.NotConverged != 2 || len(w) != 2 || !strings.Contains(w[0], "iteration limit (2)") || !strings.Contains(w[0], rep.Criterion) {
			t.Errorf("%v: not converged %d, warnings %q", s, rep.NotConverged, w)
		}
	}
}

func TestCheckReproducible(t *testing.T) {
	p := lassoProblem(t)
	o := Options{N: 300, Trials: 3, Seed: 42, Solver: SolverProx}
	calls := 0
	a, err := Check(context.Background(), p, o, func(done, total int) {
		calls++
		if done != calls || total != 3 {
			t.Errorf("progress(%d, %d) at call %d", done, total, calls)
		}
	})
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Check(context.Background(), p, o, nil)
	o.Seed = 43
	c, _ := Check(context.Background(), p, o, nil)
	for i := range a.PerTrial {
		if a.PerTrial[i].MSE != b.PerTrial[i].MSE {
			t.Errorf("trial %d: %v then %v with the same seed", i, a.PerTrial[i].MSE, b.PerTrial[i].MSE)
		}
		if a.PerTrial[i].MSE == c.PerTrial[i].MSE {
			t.Errorf("trial %d: the same error %v with another seed", i, a.PerTrial[i].MSE)
		}
	}
	if calls != 3 {
		t.Errorf("%d progress calls", calls)
	}
}

func TestCheckCancel(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	_, err := Check(ctx, lassoProblem(t), Options{N: 300, Trials: 50, Seed: 1}, func(done, _ int) {
		if done == 2 {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) {
		t.Errorf("error %v, want context.Canceled", err)
	}
}

func TestElasticNetWeights(t *testing.T) {
	for _, c := range []struct {
		l1, l2 float64
	}{{0.3, 0}, {0, 2.5}, {1e-3, 1e-9}, {7, 3e4}} {
		p, _ := penalty.ElasticNet(c.l1, c.l2)
		l1, l2, ok := elasticNetWeights(p)
		if !ok || math.Abs(l1-c.l1) > 1e-14*c.l1 || math.Abs(l2-c.l2) > 1e-13*c.l2 {
			t.Errorf("(%g, %g): got (%g, %g, %v)", c.l1, c.l2, l1, l2, ok)
		}
	}
	box, _ := penalty.Box(1, 0.1)
	if _, _, ok := elasticNetWeights(box); ok {
		t.Error("box penalty taken for an elastic net")
	}
}

// A Gaussian design is drawn entry by entry while it fits in memory, and as U S V^T with fast
// factors past MaxDenseEntries; the report says which.
func TestGaussianEntriesReported(t *testing.T) {
	g, _ := design.Gaussian(0.5, design.Rows)
	d := DesignDraw{Law: g, GaussianEntries: true}
	if !d.Entries(1000) || d.Entries(10000) {
		t.Errorf("entries at n = 1000: %v, at n = 10000: %v", d.Entries(1000), d.Entries(10000))
	}
	d.Factors = FactorsQR
	if !d.Entries(10000) {
		t.Error("Haar factors requested: a Gaussian design must be drawn entry by entry")
	}
	lasso, le := penalty.L1(0.05)
	rep, err := Check(context.Background(), problem(t, g, nil, lasso, le, true), Options{N: 200, Trials: 1, Solver: SolverProx}, nil)
	if err != nil || rep.Factors != "entries" {
		t.Errorf("report factors %q, error %v", rep.Factors, err)
	}
}

// cd asked with fast factors on a well-conditioned design runs prox on the factors (the same
// problem, matrix-free) and says so; on an ill-conditioned one it forms F and runs cd.
func TestCheckChoosesMatrixFree(t *testing.T) {
	ol, oe := design.Orthogonal(0.5, design.Rows)
	ul, ue := design.UniformSV(0.5, 1e-3, 1, design.Rows)
	lasso, le := penalty.L1(0.05)
	for _, c := range []struct {
		name, want string
		p          Problem
	}{{"orthogonal", "prox", problem(t, ol, oe, lasso, le, false)}, {"ill-conditioned", "cd", problem(t, ul, ue, lasso, le, false)}} {
		rep, err := Check(context.Background(), c.p, Options{N: 300, Trials: 2}, nil)
		if err != nil {
			t.Fatal(err)
		}
		if rep.Solver != c.want || (rep.SolverNote != "") != (c.want != "cd") || rep.NotConverged > 0 {
			t.Errorf("%s: solver %s (note %q), %d not converged; want %s", c.name, rep.Solver, rep.SolverNote, rep.NotConverged, c.want)
		}
	}
}
