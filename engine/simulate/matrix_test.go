package simulate

import (
	"context"
	"encoding/json"
	"flag"
	"math"
	"math/rand/v2"
	"os"
	"slices"
	"testing"

	"hdrisk/engine/data"
	"hdrisk/engine/design"
	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

var updateMatrixTrials = flag.Bool("update-matrix-trials", false, "rewrite testdata/sklearn/matrix_trials.json")

const (
	ar1File       = "../../testdata/matrices/ar1_200x400.mtx"
	trialsFile    = "../../testdata/sklearn/matrix_trials.json"
	sklearnFile   = "../../testdata/sklearn/matrix_ar1_200x400.json"
	ar1L1         = 0.05
	ar1Noise      = 0.01
	ar1Density    = 0.2
	ar1Seed       = 7
	ar1TrialCount = 40
	ar1First      = 0
)

// matrixProblem is the scenario of a fixed matrix: its own spectrum as an empirical-sv design
// (as given), a sparse Gaussian signal, noise and the LASSO.
func matrixProblem(t testing.TB, a *Matrix, scale design.Scale) Problem {
	t.Helper()
	_, sv, err := matrixSVD(a, false)
	if err != nil {
		t.Fatal(err)
	}
	d, err := design.EmpiricalSV(float64(a.Rows)/float64(a.Cols), sv, scale)
	if err != nil {
		t.Fatal(err)
	}
	sig, err := signal.BernoulliGauss(ar1Density, 1)
	if err != nil {
		t.Fatal(err)
	}
	pen, err := penalty.L1(ar1L1)
	if err != nil {
		t.Fatal(err)
	}
	return Problem{Problem: fixedpoint.Problem{Design: d, Signal: sig, Penalty: pen, Noise: ar1Noise}}
}

func readAR1(t testing.TB) *Matrix {
	t.Helper()
	f, err := os.Open(ar1File)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	a, err := data.ReadMatrix(f, data.Limits{})
	if err != nil {
		t.Fatal(err)
	}
	return FromDense(a)
}

type trialDraw struct {
	Trial   int       `json:"trial"`
	X0Index []int     `json:"x0_index"`
	X0Value []float64 `json:"x0_value"`
	W       []float64 `json:"w"`
}

type trialsFixture struct {
	Note   string      `json:"note"`
	Seed   uint64      `json:"seed"`
	First  int         `json:"first"`
	L1     float64     `json:"l1"`
	Trials []trialDraw `json:"trials"`
}

func drawAR1Trials(t testing.TB, p Problem, m, n int) trialsFixture {
	out := trialsFixture{Note: "x0 (its nonzero entries) and w of each trial of the check with testdata/matrices/ar1_200x400.mtx: bernoulli-gauss signal density 0.2 variance 1, noise 0.01; written by TestMatrixTrialsFixture -update-matrix-trials",
		Seed: ar1Seed, First: ar1First, L1: ar1L1}
	for k := 0; k < ar1TrialCount; k++ {
		x0, w := matrixTrialDraw(p.Signal, math.Sqrt(p.Noise), ar1Seed, uint64(ar1First+k), m, n)
		d := trialDraw{Trial: ar1First + k, W: w}
		for i, v := range x0 {
			if v != 0 {
				d.X0Index, d.X0Value = append(d.X0Index, i), append(d.X0Value, v)
			}
		}
		out.Trials = append(out.Trials, d)
	}
	return out
}

// The committed draws are those the check makes: scikit-learn solved these instances.
func TestMatrixTrialsFixture(t *testing.T) {
	a := readAR1(t)
	p := matrixProblem(t, a, design.AsGiven)
	got := drawAR1Trials(t, p, a.Rows, a.Cols)
	if *updateMatrixTrials {
		b, err := json.Marshal(got)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(trialsFile, append(b, '\n'), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	b, err := os.ReadFile(trialsFile)
	if err != nil {
		t.Fatal(err)
	}
	var want trialsFixture
	if err := json.Unmarshal(b, &want); err != nil {
		t.Fatal(err)
	}
	if len(want.Trials) != len(got.Trials) {
		t.Fatalf("%d trials committed, %d drawn", len(want.Trials), len(got.Trials))
	}
	for k := range got.Trials {
		g, w := got.Trials[k], want.Trials[k]
		if !slices.Equal(g.X0Index, w.X0Index) || !slices.Equal(g.X0Value, w.X0Value) || !slices.Equal(g.W, w.W) {
			t.Fatalf("trial %d: the check draws other numbers than the committed fixture", k)
		}
	}
}

type sklearnMatrixFixture struct {
	Source  string    `json:"source"`
	Seed    uint64    `json:"seed"`
	First   int       `json:"first"`
	L1      float64   `json:"l1"`
	Alpha   float64   `json:"alpha"`
	MSE     []float64 `json:"mse"`
	MeanMSE float64   `json:"mean_mse"`
	StdErr  float64   `json:"stderr"`
}

// The check with the matrix itself gives, trial by trial, the error of scikit-learn's Lasso on
// the same matrix and the same x0 and w (reference: scikit-learn's coordinate descent,
// testdata/sklearn/matrix_ar1_200x400.json, made by make_matrix_fixture.py). Both solve the
// same convex problem to tight tolerances, so the errors agree to 1e-6 relative. VAMP is left
// out: on a matrix with correlated columns it need not converge (its convergence is shown for
// rotationally invariant designs), and the check reports its trials as not converged.
func TestMatrixAgainstSklearn(t *testing.T) {
	b, err := os.ReadFile(sklearnFile)
	if err != nil {
		t.Fatal(err)
	}
	var ref sklearnMatrixFixture
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	a := readAR1(t)
	p := matrixProblem(t, a, design.AsGiven)
	for _, c := range []struct {
		solver Solver
		tol    float64
	}{{SolverCD, 1e-12}, {SolverProx, 1e-10}} {
		solver := c.solver
		rep, err := Check(context.Background(), p, Options{Trials: len(ref.MSE), Seed: ref.Seed, First: ref.First,
			Solver: solver, Tol: c.tol, Matrix: a}, nil)
		if err != nil {
			t.Fatal(err)
		}
		if rep.NotConverged > 0 {
			t.Errorf("%v: %d trials did not converge", solver, rep.NotConverged)
		}
		worst := 0.0
		for k, tr := range rep.PerTrial {
			worst = math.Max(worst, math.Abs(tr.MSE-ref.MSE[k])/ref.MSE[k])
		}
		t.Logf("%v: mean MSE %.7g +- %.2g, scikit-learn %.7g +- %.2g; worst trial %.2g relative; rotated %.5g +- %.2g (z %.2f); predicted %.5g",
			solver, rep.MeanMSE, rep.StdErr, ref.MeanMSE, ref.StdErr, worst,
			rep.Comparison.Rotated.Mean, rep.Comparison.Rotated.StdErr, rep.Comparison.Z, rep.Predicted.MSE)
		if worst > 1e-6 {
			t.Errorf("%v: a trial's error differs from scikit-learn's by %.2g relative", solver, worst)
		}
		if math.Abs(rep.MeanMSE-ref.MeanMSE) > 1e-6*ref.MeanMSE {
			t.Errorf("%v: mean MSE %.9g, scikit-learn %.9g", solver, rep.MeanMSE, ref.MeanMSE)
		}
	}
}

// Random Haar rotations of the matrix's spectrum give the asymptotic prediction, within 3
// standard errors plus 5% (common practice, as in TestCheckAgainstPrediction).
func TestRotatedMatrixAgainstPrediction(t *testing.T) {
	a := readAR1(t)
	p := matrixProblem(t, a, design.AsGiven)
	rep, err := Check(context.Background(), p, Options{Trials: 100, Seed: 3, Factors: FactorsQR, Matrix: a}, nil)
	if err != nil {
		t.Fatal(err)
	}
	c := rep.Comparison
	t.Logf("matrix %.5g +- %.2g, Haar rotations %.5g +- %.2g, z %.2f, predicted %.5g; %.1fs",
		c.Matrix.Mean, c.Matrix.StdErr, c.Rotated.Mean, c.Rotated.StdErr, c.Z, rep.Predicted.MSE, rep.Seconds)
	if !within(c.Rotated.Mean, c.Rotated.StdErr, rep.Predicted.MSE, 0.05, 0) {
		t.Errorf("rotated mean %.5g +- %.2g, predicted %.5g", c.Rotated.Mean, c.Rotated.StdErr, rep.Predicted.MSE)
	}
	if c.RotatedNotConverged > 0 || rep.NotConverged > 0 {
		t.Errorf("%d + %d trials did not converge", rep.NotConverged, c.RotatedNotConverged)
	}
}

// An i.i.d. Gaussian matrix has generic singular vectors and agrees with its rotations; a
// matrix that observes only the first m coordinates of x0 (rows of the identity) does not:
// with it the LASSO cannot see the other n - m coordinates at all.
func TestMatrixVerdict(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 0))
	m, n := 150, 300
	g := &Matrix{Rows: m, Cols: n, Data: normals(rng, m*n)}
	sel := &Matrix{Rows: m, Cols: n, Data: make([]float64, m*n)}
	for i := 0; i < m; i++ {
		sel.Data[i*m+i] = 1
	}
	for _, c := range []struct {
		name   string
		a      *Matrix
		agrees bool
	}{{"gaussian", g, true}, {"selection", sel, false}} {
		p := matrixProblem(t, c.a, design.Columns)
		rep, err := Check(context.Background(), p, Options{Trials: 60, Seed: 5, Factors: FactorsQR, Matrix: c.a}, nil)
		if err != nil {
			t.Fatal(err)
		}
		k := rep.Comparison
		t.Logf("%s: matrix %.4g +- %.2g, rotated %.4g +- %.2g, z = %.2f", c.name, k.Matrix.Mean, k.Matrix.StdErr, k.Rotated.Mean, k.Rotated.StdErr, k.Z)
		if k.Agrees != c.agrees {
			t.Errorf("%s: agrees = %v (z = %.2f), want %v", c.name, k.Agrees, k.Z, c.agrees)
		}
	}
}

// The scenario's m/n must be the matrix's, and the matrix is scaled as the scenario says.
func TestMatrixRefusals(t *testing.T) {
	a := readAR1(t)
	p := matrixProblem(t, a, design.AsGiven)
	other, err := design.Orthogonal(0.3, design.Rows)
	if err != nil {
		t.Fatal(err)
	}
	q := p
	q.Design = other
	if _, err := Check(context.Background(), q, Options{Trials: 4, Matrix: a}, nil); err == nil {
		t.Error("a design of m/n 0.3 was accepted with a 200 x 400 matrix")
	} else if pe, ok := err.(*ParamError); !ok || pe.Field != "alpha" {
		t.Errorf("m/n mismatch: %v, want a ParamError naming alpha", err)
	}
	s, err := scaledMatrix(matrixProblem(t, a, design.Rows).Design, a)
	if err != nil {
		t.Fatal(err)
	}
	ff := 0.0
	for _, v := range s.Data {
		ff += v * v
	}
	if got := ff / float64(a.Cols); math.Abs(got-0.5) > 1e-12 {
		t.Errorf("rows scale: mean eigenvalue %.15g, want m/n = 0.5", got)
	}
}
