package simulate

import (
	"context"
	"math"
	"math/rand/v2"
	"time"

	"gonum.org/v1/gonum/mat"

	"hdrisk/engine/design"
	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/signal"
)

// AgreeZ is the largest |z| at which the trials with a fixed matrix count as agreeing with the
// trials with random rotations of its spectrum (see Comparison).
const AgreeZ = 3

// rotationSalt separates the stream of the random rotations from that of x0 and w, so that the
// trials with the matrix and with its rotations share the same x0 and w.
const rotationSalt = 0x9e3779b97f4a7c15

// Comparison sets the trials with a user's fixed matrix beside trials that keep its singular
// values and draw its singular vectors at random (docs/method.md section 8). Both use the same x0
// and w in trial t, and the same solver. The prediction assumes generic (rotationally
// invariant) singular vectors, and at a few hundred unknowns both means sit some percent from
// the asymptotic value by finite-size effects alike, so the verdict compares the two means:
//
//	z = (Matrix.Mean - Rotated.Mean) / sqrt(Matrix.StdErr^2 + Rotated.StdErr^2),
//
// and the matrix agrees when |z| <= AgreeZ. With one trial there is no standard error and the
// verdict is not meaningful (z is 0 or infinite); callers ask for at least two. The two sets of trials are positively correlated
// through their shared draws, so this z is conservative: it says "agrees" a little more often
// than an exact paired test would. Disagreement means that the matrix's singular vectors are
// not generic for this signal and penalty, and the prediction should not be trusted for it.
type Comparison struct {
	Matrix, Rotated     Stat
	Z                   float64
	Agrees              bool
	RotatedTrials       []Trial
	RotatedFactors      string
	RotatedNotConverged int
	// RotatedSolver is set when the rotated trials ran another solver than the matrix's (cd
	// asked with fast factors: see Report.SolverNote); both solve the same problem.
	RotatedSolver, RotatedSolverNote string
}

// matrixShape checks a fixed matrix against the design law: its m/n must be the law's.
func matrixShape(d design.Law, a *Matrix) error {
	if a.Rows < 1 || a.Cols < 1 || len(a.Data) != a.Rows*a.Cols {
		return paramErr("matrix", "a %d x %d matrix needs %d entries, it holds %d", a.Rows, a.Cols, a.Rows*a.Cols, len(a.Data))
	}
	if float64(a.Rows)*float64(a.Cols) > MaxDenseEntries {
		return paramErr("matrix", "%d x %d entries are past the cap of %d", a.Rows, a.Cols, MaxDenseEntries)
	}
	ratio := float64(a.Rows) / float64(a.Cols)
	if alpha := d.Alpha(); math.Abs(alpha-ratio) > 1e-9*ratio {
		return paramErr("alpha", "m/n is %g but the matrix is %d x %d (m/n = %g); a check with the matrix itself needs the design's m/n to be the matrix's", alpha, a.Rows, a.Cols, ratio)
	}
	for _, v := range a.Data {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return paramErr("matrix", "holds a NaN or Inf entry")
		}
	}
	return nil
}

// scaledMatrix returns c F with c chosen so that the mean eigenvalue of (c F)^T (c F),
// ||c F||_F^2 / n, is the design law's (docs/method.md section 1): the scale the scenario states.
func scaledMatrix(d design.Law, a *Matrix) (*Matrix, error) {
	ff := 0.0
	top := maxAbs(a.Data)
	if top == 0 {
		return nil, paramErr("matrix", "all entries are zero: the design would carry no information")
	}
	for _, v := range a.Data {
		ff += sq(v / top)
	}
	c := math.Sqrt(d.Mean()*float64(a.Cols)/ff) / top
	out := &Matrix{Rows: a.Rows, Cols: a.Cols, Data: make([]float64, len(a.Data))}
	for i, v := range a.Data {
		out.Data[i] = c * v
	}
	return out, nil
}

// matrixSVD factorizes a fixed matrix once for all trials: the singular values only, or the
// full factors for VAMP.
func matrixSVD(a *Matrix, full bool) (*SVD, []float64, error) {
	t := mat.NewDense(a.Cols, a.Rows, a.Data)
	kind := mat.SVDNone
	if full {
		if max(a.Rows, a.Cols) > MaxSVDN {
			return nil, nil, paramErr("solver", "vamp needs the SVD of the %d x %d matrix, past the cap of order %d (use cd or prox)", a.Rows, a.Cols, MaxSVDN)
		}
		kind = mat.SVDFull
	}
	var f mat.SVD
	if !f.Factorize(t.T(), kind) {
		return nil, nil, paramErr("matrix", "the singular value decomposition of the %d x %d matrix did not converge", a.Rows, a.Cols)
	}
	sv := f.Values(nil)
	if !full {
		return nil, sv, nil
	}
	var u, v mat.Dense
	f.UTo(&u)
	f.VTo(&v)
	return NewSVD(&DenseOrthogonal{Q: &u}, &DenseOrthogonal{Q: &v}, sv), sv, nil
}

// checkMatrix runs the trials of a check with a fixed matrix (o.Matrix) and with random
// rotations of its spectrum; rep arrives with the settings filled in.
func checkMatrix(ctx context.Context, p Problem, o Options, rotSolver Solver, draw DesignDraw, rep Report, l1, l2 float64,
	so SolverOptions, pred fixedpoint.Result, progress func(done, total int), start time.Time) (Report, error) {
	f, err := scaledMatrix(p.Design, o.Matrix)
	if err != nil {
		return Report{}, err
	}
	shared, sv, err := matrixSVD(f, o.Solver == SolverVAMP)
	if err != nil {
		return Report{}, err
	}
	m, n := f.Rows, f.Cols
	rep.M, rep.N, rep.Factors = m, n, "matrix"
	var rot Report
	var traces [][]float64
	sd := math.Sqrt(p.Noise)
	if !(p.Noise >= 0) || math.IsInf(p.Noise, 0) {
		return Report{}, paramErr("noise", "variance %g must be finite and >= 0", p.Noise)
	}
	for t := 0; t < o.Trials; t++ {
		if err := ctx.Err(); err != nil {
			return Report{}, err
		}
		t0 := time.Now()
		idx := uint64(o.First + t)
		x0, w := matrixTrialDraw(p.Signal, sd, o.Seed, idx, m, n)
		inst := &Instance{M: m, N: n, X0: x0, Y: make([]float64, m), Dense: f, SVD: shared, Lipschitz: sv[0] * sv[0]}
		f.Mul(inst.Y, x0)
		for i := range inst.Y {
			inst.Y[i] += w[i]
		}
		tr, trace, err := solveTrial(ctx, inst, p, o.Solver, l1, l2, so, pred)
		if err != nil {
			return Report{}, err
		}
		tr.Seconds = time.Since(t0).Seconds()
		rep.add(tr)
		if trace != nil {
			traces = append(traces, trace)
		}

		t1 := time.Now()
		rr := rand.New(rand.NewPCG(o.Seed^rotationSalt, idx))
		s := append([]float64(nil), sv...)
		ri := &Instance{M: m, N: n, X0: x0, Y: make([]float64, m),
			SVD: NewSVD(orthogonalFactor(rr, draw, m), orthogonalFactor(rr, draw, n), s)}
		ri.SVD.Mul(ri.Y, x0)
		for i := range ri.Y {
			ri.Y[i] += w[i]
		}
		tr, _, err = solveTrial(ctx, ri, p, rotSolver, l1, l2, so, pred)
		if err != nil {
			return Report{}, err
		}
		tr.Seconds = time.Since(t1).Seconds()
		rot.add(tr)
		if progress != nil {
			progress(t+1, o.Trials)
		}
	}
	rep.summarize()
	rot.summarize()
	rep.Comparison = compare(rep, rot, o.Factors.String())
	if rotSolver != o.Solver {
		rep.Comparison.RotatedSolver, rep.Comparison.RotatedSolverNote = rotSolver.String(), cdNote
	}
	if o.Solver == SolverVAMP {
		rep.Trace = vampTrace(p.Problem, startGamma2(pred), traces)
	}
	rep.Seconds = time.Since(start).Seconds()
	return rep, nil
}

// matrixTrialDraw draws x0 (n entries from sig) and w (m entries N(0, sd^2)) of trial idx of a
// check with a fixed matrix, from PCG(seed, idx) in that order.
func matrixTrialDraw(sig signal.Law, sd float64, seed, idx uint64, m, n int) (x0, w []float64) {
	rng := rand.New(rand.NewPCG(seed, idx))
	x0 = sig.Sample(rng, n)
	w = normals(rng, m)
	for i := range w {
		w[i] *= sd
	}
	return x0, w
}

// compare sets the verdict of a check with a fixed matrix (see Comparison).
func compare(mat, rot Report, factors string) *Comparison {
	c := &Comparison{Matrix: Stat{mat.MeanMSE, mat.StdErr}, Rotated: Stat{rot.MeanMSE, rot.StdErr},
		RotatedTrials: rot.PerTrial, RotatedFactors: factors, RotatedNotConverged: rot.NotConverged}
	c.Z = Verdict(c.Matrix, c.Rotated)
	c.Agrees = math.Abs(c.Z) <= AgreeZ
	return c
}

// Verdict returns z = (a.Mean - b.Mean) / sqrt(a.StdErr^2 + b.StdErr^2). Special cases are:
// two means without spread give 0 when equal and +-Inf otherwise.
func Verdict(a, b Stat) float64 {
	d := a.Mean - b.Mean
	s := math.Hypot(a.StdErr, b.StdErr)
	if s == 0 {
		if d == 0 {
			return 0
		}
		return math.Copysign(math.Inf(1), d)
	}
	return d / s
}
