package fixedpoint

import (
	"errors"
	"fmt"
	"math"

	"hdrisk/engine/design"
	"hdrisk/engine/loss"
	"hdrisk/engine/noise"
	"hdrisk/engine/penalty"
	"hdrisk/engine/readout"
	"hdrisk/engine/signal"

	"gonum.org/v1/gonum/mat"
)

// GLM is a generalized linear model (docs/method.md section 10): y_mu = readout((F x0)_mu, w_mu)
// and the estimate minimizes sum_mu L(y_mu, (F x)_mu) + sum_i f(x_i). With the linear readout,
// Gaussian noise and the square loss it is the Problem of Solve.
type GLM struct {
	Design  design.Law
	Signal  signal.Law
	Penalty penalty.Penalty
	Noise   noise.Law // nil: no noise
	Readout readout.Readout
	Loss    loss.Loss
}

// GLMState is a point of the generalized iteration: the input side's (g1, t1) and the output
// side's backward message p2 = MuZ z0 + N(0, SigZ) at precision G2Z.
//
// A state returned by SolveGLMFrom also carries the Newton Jacobian of its fixed point, which
// a warm start from it (or from Extrapolate) reuses.
type GLMState struct {
	G1, T1, G2Z, SigZ, MuZ float64
	jac                    *mat.Dense // nil: none; never modified once in a state
}

// Extrapolate returns the next state on the line through prev and s in (log g1, log t1,
// log g2z, log sigz, muz), the start for the next point of an evenly spaced sweep, with s's
// Jacobian.
func (s GLMState) Extrapolate(prev GLMState) GLMState {
	return GLMState{G1: s.G1 * (s.G1 / prev.G1), T1: s.T1 * (s.T1 / prev.T1), G2Z: s.G2Z * (s.G2Z / prev.G2Z),
		SigZ: s.SigZ * (s.SigZ / prev.SigZ), MuZ: 2*s.MuZ - prev.MuZ, jac: s.jac}
}

// NoMinimizerError reports a generalized model whose estimate has no unique finite
// minimizer (docs/method.md section 10), so that no error figure exists.
type NoMinimizerError struct{ Reason string }

func (e *NoMinimizerError) Error() string { return "no finite minimizer: " + e.Reason }

// SolveGLM iterates the state evolution of VAMP for generalized linear models in its MAP form
// (Schniter, Rangan & Fletcher 2016, "Vector approximate message passing for the generalized
// linear model", Asilomar) to its fixed point, for every design, signal law and penalty.
//
// The input side is today's: the scalar channel r1 = muz x0 + sqrt(t1) z at precision g1, with
// the cancellation-free update of Solve in which the output side's backward message
// N(0, sigz) takes the place of the noise. The output side is the scalar channel of z
// described by outSide. Special cases are: a label loss (logistic, hinge) with a readout
// that does not give labels +-1, and the logistic readout with noise, are input errors; with
// a label loss and a zero penalty, an iteration that runs off means separable labels, and
// with a zero penalty and fewer measurements than unknowns (F^T F singular) the minimizer
// is not unique: both give a *NoMinimizerError with the reason.
func SolveGLM(p GLM, o Options) (Result, error) {
	r, _, err := SolveGLMFrom(p, o)
	return r, err
}

// SolveGLMFrom is SolveGLM started first from each of starts in turn, states of neighbouring
// fixed points (for instance the last point of a sweep, or an extrapolation from the last
// two), and it returns the fixed point's state for the next such start. Where no start
// converges (each runs off, or stops short of the tolerance), the point is solved again from
// SolveGLM's cold starts, so that a warm start changes only the cost: the verdicts on
// existence and the fixed point are those of a cold solve (to the solver's tolerance).
// Without starts it is SolveGLM.
func SolveGLMFrom(p GLM, o Options, starts ...GLMState) (Result, GLMState, error) {
	s, err := newGLMSolver(p, o)
	if err != nil {
		return Result{}, GLMState{}, err
	}
	for _, st := range starts {
		if !finitePos(st.G1) || !finitePos(st.T1) || !finitePos(st.G2Z) || !(st.SigZ >= 0) || !finiteAll(st.SigZ, st.MuZ) {
			continue
		}
		if r, err := s.run(st); err == nil && r.Converged {
			return r, s.final, nil
		}
	}
	r, err := s.cold()
	return r, s.final, err
}

// newGLMSolver checks p and sets up its solver, or refuses it.
func newGLMSolver(p GLM, o Options) (*glmSolver, error) {
	if p.Design == nil || p.Signal == nil || p.Penalty == nil || p.Readout == nil || p.Loss == nil {
		return nil, fmt.Errorf("%w: design, signal, penalty, readout and loss are all needed", ErrInput)
	}
	rho2 := p.Signal.Second()
	if !(rho2 > 0) || math.IsInf(rho2, 0) {
		return nil, fmt.Errorf("%w: the signal has no power (E[x0^2] = %v), so the normalized error is undefined", ErrInput, rho2)
	}
	if p.Loss.Labels() && p.Readout.Name() != "sign" && p.Readout.Name() != "logistic" {
		return nil, fmt.Errorf("%w: loss %s needs labels +-1, which readout %s does not give (use sign or logistic)", ErrInput, p.Loss.Name(), p.Readout.Name())
	}
	nz := []noise.Component{{Weight: 1, Var: 0}}
	w2 := 0.0
	if p.Noise != nil {
		nz = p.Noise.Components()
		w2 = p.Noise.Second()
	}
	if p.Readout.Name() == "logistic" && w2 != 0 {
		return nil, fmt.Errorf("%w: the logistic readout draws its own label noise; leave the noise out or give it variance 0", ErrInput)
	}
	if o.Tol <= 0 {
		o.Tol = 1e-10
	}
	if o.MaxIter <= 0 {
		o.MaxIter = 2000
	}
	out := &outSide{rd: p.Readout, ls: p.Loss, nz: nz, w2: w2, rhoz: p.Design.Mean() * rho2 / p.Design.Alpha()}
	if c, ok := p.Readout.(readout.Cells); ok {
		out.levels, out.cuts = c.Levels()
	} else if p.Readout.Labels() {
		out.levels = []float64{-1, 1}
	}
	s := &glmSolver{p: p, o: o, rho2: rho2, out: out, zeroPen: zeroPenalty(p.Penalty)}
	if s.zeroPen && p.Design.Atom0() > 0 {
		return nil, s.absent("no penalty and fewer independent measurements than unknowns (F^T F is singular): the minimizer is not unique")
	}
	return s, nil
}

// cold solves from the cold starts and reads a run-off as the verdict on existence.
func (s *glmSolver) cold() (Result, error) {
	p := s.p
	// Solve's two cold starts, and one more with a larger g1: a start whose g1 is too small
	// for the design's reach (S1(g) = g2z A/g1 beyond S1(0)) puts g on the boundary 0.
	var r Result
	var err error
	for _, f := range [...]float64{1, 4, 100} {
		st := s.coldStart()
		st.G1 *= f
		r, err = s.run(st)
		if err == nil && r.Converged {
			return r, nil
		}
		if !s.zeroPen {
			// Newton steps from a residual of 0.3 can carry the iteration out of the
			// problem's range where the damped steps alone reach the fixed point (3-bit
			// readout, l1, m/n 0.5): the same start again, with Newton steps from 1e-2.
			s.cautious = true
			rc, errc := s.run(st)
			s.cautious = false
			if errc == nil && rc.Converged {
				return rc, nil
			}
		}
		if err == nil || !errors.Is(err, errRunOff) || r.Iterations > 1 {
			break
		}
	}
	if s.zeroPen && p.Loss.Labels() && errors.Is(err, errRunOff) {
		return Result{}, s.absent("the training labels are linearly separable (the iteration runs off to an estimate of unbounded norm): with the " + p.Loss.Name() + " loss and no penalty there is no finite minimizer")
	}
	return r, err
}

// zeroPenalty reports whether the prox is the identity (no penalty at all), tested at
// points of both signs and several sizes.
func zeroPenalty(f penalty.Penalty) bool {
	for _, r := range [...]float64{-7, -0.3, 0.02, 0.9, 40} {
		if f.Prox(r, 1) != r {
			return false
		}
	}
	return true
}

type glmSolver struct {
	p       GLM
	o       Options
	rho2    float64
	out     *outSide
	zeroPen bool
	// cautious makes run wait for Solve's residual before Newton steps (as without a
	// penalty), for a second try of a start whose early Newton steps failed.
	cautious bool
	final    GLMState // the last iterate of the last run, where it converged
	// the Newton steps' Jacobian of M(x) - x, at jx where M(x) - x = jf (glmnewton.go)
	jac    *mat.Dense
	jx, jf [glmDim]float64
	secant bool // jx, jf hold the last Newton step's point, for Broyden's update
}

func (s *glmSolver) absent(reason string) error { return &NoMinimizerError{Reason: reason} }

// coldStart starts from the scale of the problem: the input side as in Solve, the backward
// message of a readout with labels at the labels' own scale (the noise inside a sign says
// nothing about the scale of y).
func (s *glmSolver) coldStart() GLMState {
	t := s.rho2 + s.out.w2
	sz := s.out.w2 + 0.5*s.out.rhoz
	if len(s.out.levels) > 0 {
		y2 := 0.0
		for _, y := range s.out.levels {
			y2 += y * y / float64(len(s.out.levels))
		}
		t, sz = s.rho2, y2
	}
	g := s.p.Penalty.StartG(t)
	if !(g > 0) || math.IsInf(g, 0) {
		g = 1
	}
	return GLMState{G1: g, T1: t, G2Z: 1, SigZ: sz, MuZ: 1}
}

// glmImage is one evaluation of the update map.
type glmImage struct {
	next            GLMState
	m               signal.Moments
	ov              float64 // E[(xhat - muz x0) x0], label readouts only
	g               float64 // g2x / g2z
	om              outMoments
	mu1z, tau1, g1z float64
	res             float64
}

// apply evaluates the update map at st (docs/method.md section 10):
//
//	E, A  = moments of r1 = muz x0 + sqrt(t1) z at g1;       S1(g) = g2z A / g1
//	g1   <- g2z T / S1;  t1 <- (W E + sigz S3) S1^2 / (S2 T^2)
//	g1z   = g2z (alpha - T)/T
//	Var(p1 - muz z0) = [alpha S3 (E - sigz S3)/S2 + sigz (alpha (T - g S3) - T^2)] / (alpha - T)^2
//	Cov(p1 - muz z0, z0) = g1 O T / (A g2z (alpha - T)),  O = E[(xhat - muz x0) x0]
//	Az, muz, sigz <- output side at (g1z, p1);  g2z <- g1z (1 - Az)/Az
func (s *glmSolver) apply(st GLMState, near float64) (glmImage, error) {
	p := s.p
	lin := !p.Readout.Labels()
	var law signal.Law = p.Signal
	if !lin {
		law = newScaledLaw(p.Signal, st.MuZ)
	}
	m := signal.Expect(law, p.Penalty, st.G1, st.T1)
	if m.A < zeroA {
		// The estimate is zero: the output side has nothing to fit, and run reports it.
		return glmImage{m: m, next: st}, nil
	}
	a := m.A
	g, err := invertS1(p.Design, st.G2Z*a/st.G1, near)
	if err != nil {
		return glmImage{}, err
	}
	tr := p.Design.At(g)
	alpha := p.Design.Alpha()
	im := glmImage{m: m, g: g}
	im.next.G1 = st.G2Z * tr.T / tr.S1
	im.next.T1 = (tr.W*m.MSE + st.SigZ*tr.S3) * tr.S1 * tr.S1 / (tr.S2 * tr.T * tr.T)
	amt := alpha - tr.T
	if alpha >= 1 {
		amt = (alpha - 1) + g*tr.S1
	}
	if !(amt > 0) {
		return glmImage{}, errRunOff
	}
	im.g1z = st.G2Z * amt / tr.T
	eq := alpha*(tr.T-g*tr.S3) - tr.T*tr.T
	vz := (alpha*tr.S3*math.Max(m.MSE-st.SigZ*tr.S3, 0)/tr.S2 + st.SigZ*math.Max(eq, 0)) / (amt * amt)
	if lin {
		im.om = s.out.linear(im.g1z, vz)
		im.mu1z, im.tau1 = 1, vz
	} else {
		im.ov = overlap(p.Signal, p.Penalty, st.MuZ, st.G1, st.T1)
		cov := st.G1 * im.ov * tr.T / (a * st.G2Z * amt)
		im.mu1z = st.MuZ + cov/s.out.rhoz
		im.tau1 = math.Max(vz-cov*cov/s.out.rhoz, 0)
		im.om = s.out.labels(im.g1z, im.mu1z, im.tau1)
	}
	om := im.om
	if om.zeroDeriv || !(om.az > 0) {
		return glmImage{}, errRunOff
	}
	im.next.G2Z = im.g1z * (1 - om.az) / om.az
	im.next.SigZ = om.sigz
	im.next.MuZ = om.muz
	n := im.next
	if !finitePos(n.G1) || !(n.T1 >= 0) || math.IsInf(n.T1, 0) || !finitePos(n.G2Z) || !finiteAll(n.SigZ, n.MuZ) {
		return glmImage{}, errRunOff
	}
	im.res = math.Max(math.Max(relChange(n.G1, st.G1), relChange(n.T1, st.T1)),
		math.Max(relChange(n.G2Z, st.G2Z), math.Max(relChange(n.SigZ, st.SigZ), relChange(n.MuZ, st.MuZ))))
	return im, nil
}

// glmNewtonFrom is the residual below which run tries Newton steps when the penalty is not
// zero. Solve's newtonFrom (1e-2)
// leaves many damped steps to the generalized map, whose Newton steps are safeguarded
// (glmnewton.go: a step that does not lower the residual is halved, then dropped for a
// fresh Jacobian or a damped step): from 0.3, as Solve does with its slopes, a cold solve of
// the sign readout with the square loss and l1 takes about half the evaluations of the map.
const glmNewtonFrom = 0.3

func relChange(a, b float64) float64 {
	return math.Abs(a-b) / math.Max(math.Abs(b), 1e-300)
}

func (s *glmSolver) run(st GLMState) (Result, error) {
	s.jac, s.secant = nil, false
	if st.jac != nil {
		s.jac = mat.DenseCopyOf(st.jac)
	}
	damp := 0.5
	prevRes := math.Inf(1)
	scale := s.rho2 + s.out.w2 + s.out.rhoz + 1
	var r Result
	newtonAt := glmNewtonFrom
	if s.zeroPen || s.cautious {
		// Without a penalty the damped iteration's run-off is the verdict on existence
		// (separable labels): early Newton steps can land on a spurious fixed point beyond
		// the existence boundary, so they wait for Solve's residual.
		newtonAt = newtonFrom
	}
	im, err := s.apply(st, math.NaN())
	halfT1 := math.NaN()
	for it := 1; it <= s.o.MaxIter; it++ {
		if it == s.o.MaxIter/2 {
			halfT1 = st.T1
		}
		if err != nil {
			return r, err
		}
		if im.m.A < zeroA {
			return s.zeroResult(it, st, im), nil
		}
		r = Result{Iterations: it, Residual: im.res}
		if im.res < s.o.Tol {
			r.Converged = true
			break
		}
		if im.res < newtonAt {
			if nst, nim, ok := s.newton(st, im); ok {
				st, im = nst, nim
				continue
			}
		}
		if im.res > prevRes {
			damp = math.Max(0.05, damp*0.5)
		} else if damp < 1 {
			damp = math.Min(1, damp*1.2)
		}
		prevRes = im.res
		n := im.next
		st = GLMState{
			G1:   (1-damp)*st.G1 + damp*n.G1,
			T1:   (1-damp)*st.T1 + damp*n.T1,
			G2Z:  (1-damp)*st.G2Z + damp*n.G2Z,
			SigZ: (1-damp)*st.SigZ + damp*n.SigZ,
			MuZ:  (1-damp)*st.MuZ + damp*n.MuZ,
		}
		if st.T1 > runOff*scale || st.SigZ > runOff*scale || st.G1 < 1e-300 {
			return r, errRunOff
		}
		im, err = s.apply(st, im.g)
	}
	if err != nil {
		return r, err
	}
	if !r.Converged && st.T1 > 1.2*halfT1 {
		// Still growing by a fifth over the second half of the iterations: the estimate's norm
		// has no finite limit.
		return r, errRunOff
	}
	return s.observe(st, im, r)
}

// observe fills the observables at the last iterate st, evaluating the map there once more
// with the training observables.
func (s *glmSolver) observe(st GLMState, im glmImage, r Result) (Result, error) {
	p := s.p
	s.final = st
	s.final.jac = nil
	if s.jac != nil {
		s.final.jac = mat.DenseCopyOf(s.jac)
	}
	s.out.train = true
	im, err := s.apply(st, im.g)
	s.out.train = false
	if err != nil {
		return Result{}, err
	}
	m := im.m
	r.GLM, r.Labels = true, p.Readout.Labels()
	r.G1, r.T1, r.G2 = st.G1, st.T1, im.g*st.G2Z
	r.Susceptibility = m.A / st.G1
	ov := im.ov
	if !r.Labels {
		ov = overlap(p.Signal, p.Penalty, st.MuZ, st.G1, st.T1)
	}
	mu := st.MuZ
	// m.MSE is E[(xhat - mu x0)^2]; xhat - x0 = (xhat - mu x0) + (mu - 1) x0.
	r.MSE = m.MSE + 2*(mu-1)*ov + (mu-1)*(mu-1)*s.rho2
	if !r.Labels {
		r.MSE = m.MSE
	}
	r.MSE = math.Max(r.MSE, 0)
	q := math.Max(m.MSE+2*mu*ov+mu*mu*s.rho2, 0) // E[xhat^2]
	c := ov + mu*s.rho2                          // E[xhat x0]
	if q > 0 {
		r.Cosine = c / math.Sqrt(q*s.rho2)
	}
	r.NormRatio = math.Sqrt(q / s.rho2)
	fill(&r, m, s.rho2)
	r.TrainError = im.om.trainErr
	r.TrainLoss = im.om.trainLoss
	if r.Labels {
		r.TrainMisfit = im.om.misfit
		k := p.Design.Mean() / p.Design.Alpha()
		r.TestError = s.out.testError(k*q, k*c)
	}
	if !finiteAll(r.MSE, r.TrainError, r.TrainLoss, r.Cosine, r.NormRatio, r.TestError) {
		return Result{}, errRunOff
	}
	if !r.Converged && r.Note == "" {
		r.Note = fmt.Sprintf("not converged: the last relative change of the iterate is %.2g, above the tolerance %.2g", r.Residual, s.o.Tol)
	}
	return r, nil
}

func (s *glmSolver) zeroResult(it int, st GLMState, im glmImage) Result {
	s.final = st
	s.final.jac = nil
	r := Result{G1: st.G1, T1: st.T1, Iterations: it, Converged: true, EstimateZero: true, MSE: s.rho2,
		GLM: true, Labels: s.p.Readout.Labels(),
		Note: "the penalty is strong enough that the estimate is zero: MSE = E[x0^2]"}
	fill(&r, signal.Moments{MSE: s.rho2, Active: im.m.Active}, s.rho2)
	r.NormRatio = 0
	if r.Labels {
		r.TestError = 0.5
		r.TrainMisfit = math.NaN()
	}
	om := s.out.trainAtZero()
	r.TrainError, r.TrainLoss = om.trainErr, om.trainLoss
	if r.Labels {
		r.TrainMisfit = om.misfit
	}
	return r
}

// fill sets the normalized error and the support counts, as solver.fill does.
func fill(r *Result, m signal.Moments, rho2 float64) {
	r.NMSE = r.MSE / rho2
	r.NMSEdB = dbFloor
	if r.NMSE > 0 {
		r.NMSEdB = math.Max(dbFloor, 10*math.Log10(r.NMSE))
	}
	if r.NMSE < FloorNMSE && !r.EstimateZero {
		r.Floor = true
		r.Note = "the error is below the solver's floor of 1e-12 E[x0^2] (-120 dB): read it as at most that"
	}
	r.NonZero = m.NonZero
	if m.Active > 0 {
		r.TPP = m.TruePos / m.Active
	}
	if m.NonZero > 0 {
		r.FDP = math.Max(0, m.NonZero-m.TruePos) / m.NonZero
	}
}
