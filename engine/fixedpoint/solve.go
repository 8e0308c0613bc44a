// Package fixedpoint solves the state evolution of vector approximate message passing in its
// MAP form for penalized linear regression with a rotationally invariant design, and reports
// the high-dimensional limit of the error and of the other observables.
//
// Model and conventions (method.md sections 1-4): x0 in R^n has i.i.d. entries, y = F x0 + w
// with w ~ N(0, Delta I_m), and the estimate minimizes 1/2 ||y - F x||^2 + sum_i f(x_i) for a
// convex separable f. The design enters through nu, the limiting eigenvalue law of F^T F; the
// penalty and the signal law enter through the scalar channel r = x0 + sqrt(t1) z, whose
// estimate is prox(r; g1).
//
// The unknowns are (g1, t1). One update, free of the cancellations that the textbook
// two-message form suffers at both ends of a regularization path:
//
//	E, A  = moments of the scalar channel at (g1, t1);  V = A / g1
//	g2    solves S1(g2) = V
//	g1   <- E_nu[lambda/(lambda+g2)] / S1(g2)
//	t1   <- (Delta S3 + W E) / (g1^2 S2)
//
// Its fixed point is the replica prediction, proved for convex separable penalties and
// rotationally invariant designs (Rangan, Schniter & Fletcher 2019, "Vector approximate message
// passing", IEEE Trans. Inf. Theory 65(10)); the replica form of the same prediction for
// rotationally invariant designs is in Tulino, Caire, Verdu & Shamai 2013, "Support recovery
// with sparsely sampled free random matrices", IEEE Trans. Inf. Theory 59(7).
package fixedpoint

import (
	"errors"
	"fmt"
	"math"

	"hdrisk/engine/design"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

// Problem is one scenario: a design law, a signal law, a penalty and the noise variance Delta.
type Problem struct {
	Design  design.Law
	Signal  signal.Law
	Penalty penalty.Penalty
	Noise   float64 // Delta >= 0
}

// State is a point (g1, t1) of the iteration, used as a warm start.
type State struct{ G1, T1 float64 }

// Options tune the solver. The zero value selects the defaults.
type Options struct {
	Tol     float64 // relative change of (g1, t1) that counts as converged; default 1e-10
	MaxIter int     // default 2000
	Start   *State  // warm start, for instance the State of a neighbouring Result
}

// Result is the fixed point and the observables of method.md section 4.
type Result struct {
	MSE            float64 // lim (1/n)||xhat - x0||^2
	NMSE           float64 // MSE / E[x0^2]
	NMSEdB         float64 // 10 log10 NMSE, floored at -300 dB when the error vanishes
	Susceptibility float64 // V = E[prox'] / g1
	G1, T1, G2     float64
	NonZero        float64 // fraction of nonzero entries of xhat
	TPP            float64 // P(xhat != 0 | x0 != 0); 0 when the signal has no nonzero entries
	FDP            float64 // P(x0 = 0 | xhat != 0); 0 when the estimate has no nonzero entries
	TrainError     float64 // (1/m)||y - F xhat||^2
	Iterations     int
	Converged      bool
	Residual       float64         // last relative change of (g1, t1)
	EstimateZero   bool            // the estimate is zero except on an exponentially small set
	GLM            *GLMObservables // the generalized model's own observables (SolveGLM); nil from Solve
}

// State returns the fixed point as a warm start for a neighbouring problem.
func (r Result) State() State { return State{G1: r.G1, T1: r.T1} }

// ErrInput reports a problem that cannot be solved as stated.
var ErrInput = errors.New("fixedpoint: invalid problem")

const (
	// zeroA is the derivative below which the estimate is zero but for an exponentially
	// small set (method.md section 3).
	zeroA = 1e-12
	// mseFloor, relative to E[x0^2], stops noiseless recovery, which converges only
	// linearly towards zero error.
	mseFloor = 1e-13
	// runOff is how far t1 may grow past the scale of the problem before the iterate is
	// treated as having run off (and restarted from a sparser point).
	runOff  = 1e12
	dbFloor = -300.0
)

// Solve iterates the state evolution to its fixed point.
//
// Special cases are:
//
//	Delta = 0 below the recovery threshold: the error goes to 0 linearly; the solver stops
//	  when MSE < 1e-13 E[x0^2] and reports it as converged;
//	E[prox'] < 1e-12 (a penalty so strong that the estimate is zero): MSE = E[x0^2] and
//	  EstimateZero is set;
//	no convergence within MaxIter: the last iterate, Converged = false, and the residual.
//
// An error is returned for a nil part, a negative or non-finite Delta, a signal of zero power,
// or when the iteration leaves the finite numbers even after a restart. No result ever holds
// NaN or Inf.
func Solve(p Problem, o Options) (Result, error) {
	if p.Design == nil || p.Signal == nil || p.Penalty == nil {
		return Result{}, fmt.Errorf("%w: design, signal and penalty are all needed", ErrInput)
	}
	if !(p.Noise >= 0) || math.IsInf(p.Noise, 0) {
		return Result{}, fmt.Errorf("%w: noise variance must be a finite number >= 0, got %v", ErrInput, p.Noise)
	}
	rho2 := p.Signal.Second()
	if !(rho2 > 0) || math.IsInf(rho2, 0) {
		return Result{}, fmt.Errorf("%w: the signal has no power (E[x0^2] = %v), so the normalized error is undefined", ErrInput, rho2)
	}
	if o.Tol <= 0 {
		o.Tol = 1e-10
	}
	if o.MaxIter <= 0 {
		o.MaxIter = 2000
	}
	s := solver{p: p, o: o, rho2: rho2}
	starts := []State{s.coldStart(2), s.coldStart(4)}
	if o.Start != nil && o.Start.G1 > 0 && o.Start.T1 > 0 && !math.IsInf(o.Start.G1+o.Start.T1, 0) {
		starts = append([]State{*o.Start}, starts...)
	}
	var last Result
	var lastErr error
	for _, st := range starts {
		r, err := s.run(st)
		if err == nil && r.Converged {
			return r, nil
		}
		if err == nil {
			last, lastErr = r, nil
		} else if lastErr == nil && last.Iterations == 0 {
			lastErr = err
		}
	}
	if last.Iterations > 0 {
		return last, nil
	}
	return Result{}, lastErr
}

type solver struct {
	p    Problem
	o    Options
	rho2 float64
}

// coldStart starts sparse (method.md section 3): t1 = rho2 and g1 such that a threshold
// penalty thresholds at k standard deviations; the restart uses a larger k.
func (s *solver) coldStart(k float64) State {
	t := s.rho2 + s.p.Noise
	g := s.p.Penalty.StartG(t) * 2 / k
	if !(g > 0) || math.IsInf(g, 0) {
		g = 1
	}
	return State{G1: g, T1: t}
}

var errRunOff = errors.New("fixedpoint: the iteration ran off")

// image is one evaluation of the update map at (g1, t1).
type image struct {
	g1, t1, g2 float64
	m          signal.Moments
	res        float64 // relative change from the argument
}

// apply evaluates the update map of the package comment at (g1, t1); near is a guess of g2.
func (s *solver) apply(g1, t1, near float64) (image, error) {
	p := s.p
	m := signal.Expect(p.Signal, p.Penalty, g1, t1)
	v := math.Max(m.A, zeroA) / g1
	g2, err := invertS1(p.Design, v, near)
	if err != nil {
		return image{}, err
	}
	tr := p.Design.At(g2)
	ng1 := tr.T / tr.S1
	nt1 := (p.Noise*tr.S3 + tr.W*m.MSE) / (ng1 * ng1 * tr.S2)
	if !finitePos(ng1) || !(nt1 >= 0) || math.IsInf(nt1, 0) {
		return image{}, errRunOff
	}
	res := math.Max(math.Abs(ng1-g1)/g1, math.Abs(nt1-t1)/math.Max(t1, 1e-300))
	return image{g1: ng1, t1: nt1, g2: g2, m: m, res: res}, nil
}

// newtonFrom is the residual below which the solver tries Newton steps on the fixed-point
// equation in (log g1, log t1); the damped iteration alone crawls where the map contracts
// weakly (near alpha = 1, at vanishing penalties, near a recovery threshold).
const newtonFrom = 1e-2

// newton tries one Newton step on F(x) = log M(x) - x, x = (log g1, log t1), with a
// forward-difference Jacobian and a step capped at a factor e^2 per coordinate; it returns the
// new point only if the map's residual there is smaller than at the current one.
func (s *solver) newton(g1, t1 float64, cur image) (float64, float64, image, bool) {
	const h = 1e-6
	f0 := [2]float64{math.Log(cur.g1 / g1), math.Log(cur.t1 / t1)}
	var jac [2][2]float64
	for k := 0; k < 2; k++ {
		pg, pt := g1, t1
		if k == 0 {
			pg *= math.Exp(h)
		} else {
			pt *= math.Exp(h)
		}
		im, err := s.apply(pg, pt, cur.g2)
		if err != nil || !(im.t1 > 0) {
			return 0, 0, image{}, false
		}
		fk := [2]float64{math.Log(im.g1 / pg), math.Log(im.t1 / pt)}
		jac[0][k] = (fk[0] - f0[0]) / h
		jac[1][k] = (fk[1] - f0[1]) / h
	}
	det := jac[0][0]*jac[1][1] - jac[0][1]*jac[1][0]
	if !(math.Abs(det) > 1e-300) {
		return 0, 0, image{}, false
	}
	d0 := -(jac[1][1]*f0[0] - jac[0][1]*f0[1]) / det
	d1 := -(-jac[1][0]*f0[0] + jac[0][0]*f0[1]) / det
	if c := math.Max(math.Abs(d0), math.Abs(d1)) / 2; c > 1 {
		d0, d1 = d0/c, d1/c
	}
	for try := 0; try < 4; try++ {
		ng1, nt1 := g1*math.Exp(d0), t1*math.Exp(d1)
		im, err := s.apply(ng1, nt1, cur.g2)
		if err == nil && im.res < cur.res {
			return ng1, nt1, im, true
		}
		d0, d1 = d0/2, d1/2
	}
	return 0, 0, image{}, false
}

func (s *solver) run(st State) (Result, error) {
	g1, t1 := st.G1, st.T1
	scale := s.rho2 + s.p.Noise*(1+1/s.p.Design.Mean()) + 1
	damp := 0.5
	prevRes := math.Inf(1)
	zeroCount := 0
	var r Result
	im, err := s.apply(g1, t1, math.NaN())
	for it := 1; it <= s.o.MaxIter; it++ {
		if err != nil {
			return r, err
		}
		if im.m.A < zeroA {
			zeroCount++
			if zeroCount >= 2 {
				return s.zeroResult(it, g1, t1, im.m), nil
			}
		} else {
			zeroCount = 0
		}
		r = Result{G1: g1, T1: t1, G2: im.g2, Iterations: it, Residual: im.res}
		// The floor ends noiseless recovery only while the error is still falling: a warm
		// start from a recovering neighbour sits below the floor at its first step even
		// where this problem does not recover.
		if im.res < s.o.Tol || (im.m.MSE < mseFloor*s.rho2 && im.t1 <= t1 && it > 1) {
			r.Converged = true
			break
		}
		if im.res < newtonFrom {
			if ng1, nt1, nim, ok := s.newton(g1, t1, im); ok {
				g1, t1, im = ng1, nt1, nim
				continue
			}
		}
		if im.res > prevRes {
			damp = math.Max(0.05, damp*0.5)
		} else if damp < 1 {
			damp = math.Min(1, damp*1.2)
		}
		prevRes = im.res
		g1 = (1-damp)*g1 + damp*im.g1
		t1 = (1-damp)*t1 + damp*im.t1
		if t1 > runOff*scale {
			return r, errRunOff
		}
		im, err = s.apply(g1, t1, im.g2)
	}
	return s.observe(r)
}

// observe evaluates every observable at the final (g1, t1).
func (s *solver) observe(r Result) (Result, error) {
	p := s.p
	m := signal.Expect(p.Signal, p.Penalty, r.G1, r.T1)
	if m.A < zeroA {
		return s.zeroResult(r.Iterations, r.G1, r.T1, m), nil
	}
	v := m.A / r.G1
	g2, err := invertS1(p.Design, v, r.G2)
	if err != nil {
		return Result{}, err
	}
	tr := p.Design.At(g2)
	r.G2 = g2
	r.MSE = m.MSE
	r.Susceptibility = v
	s.fill(&r, m)
	// Training error over mu, the law of F F^T (m x m): E_mu[h] = E_nu[h]/alpha +
	// (1 - 1/alpha) h(0), with h(l) = g2^2 (Delta + l t2)/(l + g2)^2 (method.md section 4).
	// g2^2 t2 = (E - A^2 t1)/V^2 because 1 - A = g2 V; the atom of nu at zero is split off so
	// that nothing cancels when alpha < 1.
	alpha := p.Design.Alpha()
	g2t2 := math.Max(m.MSE-m.A*m.A*r.T1, 0) / (v * v)
	r.TrainError = (p.Noise*g2*g2*tr.S2Pos+g2t2*tr.S3)/alpha +
		p.Noise*math.Max(0, 1-(1-p.Design.Atom0())/alpha)
	if !finiteAll(r.MSE, r.TrainError, r.G1, r.T1, r.G2, r.Susceptibility) {
		return Result{}, errRunOff
	}
	return r, nil
}

func (s *solver) zeroResult(it int, g1, t1 float64, m signal.Moments) Result {
	r := Result{G1: g1, T1: t1, Iterations: it, Converged: true, EstimateZero: true}
	r.MSE = s.rho2
	r.Susceptibility = m.A / g1
	s.fill(&r, signal.Moments{MSE: s.rho2, Active: m.Active})
	// With a zero estimate every residual is the measurement itself: (1/m)||y||^2 =
	// (E_nu[lambda] rho2)/alpha + Delta.
	r.TrainError = s.p.Design.Mean()*s.rho2/s.p.Design.Alpha() + s.p.Noise
	return r
}

func (s *solver) fill(r *Result, m signal.Moments) {
	r.NMSE = r.MSE / s.rho2
	r.NMSEdB = dbFloor
	if r.NMSE > 0 {
		r.NMSEdB = math.Max(dbFloor, 10*math.Log10(r.NMSE))
	}
	r.NonZero = m.NonZero
	if m.Active > 0 {
		r.TPP = m.TruePos / m.Active
	}
	if m.NonZero > 0 {
		r.FDP = math.Max(0, m.NonZero-m.TruePos) / m.NonZero
	}
}

// invertS1 solves S1(g) = v for g >= 0, starting from near (the previous solution). When the
// law has no atom at zero and v >= S1(0), the iterate lies past the design's reach and the
// solution is taken on the boundary g = 0.
func invertS1(l design.Law, v, near float64) (float64, error) {
	if l.Atom0() == 0 {
		if s0, _ := l.Stieltjes(0); v >= s0 {
			return 0, nil
		}
	}
	return design.InverseS1Near(l, v, near)
}

func finitePos(x float64) bool { return x > 0 && !math.IsInf(x, 0) }

func finiteAll(xs ...float64) bool {
	for _, x := range xs {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}
