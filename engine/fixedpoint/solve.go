// Package fixedpoint solves the state evolution of vector approximate message passing in its
// MAP form for penalized linear regression with a rotationally invariant design, and reports
// the high-dimensional limit of the error and of the other observables.
//
// Model and conventions (docs/method.md sections 1-4): x0 in R^n has i.i.d. entries, y = F x0 + w
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
	"slices"

	"hdrisk/engine/design"
	"hdrisk/engine/param"
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
	MaxIter int     // per start of the damped iteration; default 2000 (see Solve)
	Start   *State  // warm start, for instance the State of a neighbouring Result

	noCoarse bool // solve without the coarse start (the package's tests compare the two)
}

// Result is the fixed point and the observables of docs/method.md section 4. Every number is
// finite; the fractions lie in [0, 1] and the susceptibility is positive.
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
	// Converged reports a fixed point reached to the tolerance (or the zero estimate, or
	// the error floor below). A result with Converged false is the last iterate: a study
	// must not use it as a best point, a planner answer or a contour without a mark.
	Converged    bool
	Residual     float64 // last relative change of (g1, t1)
	EstimateZero bool    // the estimate is zero except on an exponentially small set
	// Floor reports an error below FloorNMSE times E[x0^2], the solver's floor: the error
	// is at most that (with noise 0 it falls to 0, exact recovery), not the printed digits.
	Floor bool
	// Note says in plain words which limit or special case applies, if any.
	Note string

	// Set by SolveGLM only (docs/method.md section 10); zero from Solve.
	GLM         bool    // solved as a generalized linear model
	Labels      bool    // the readout gives labels: TestError and TrainMisfit apply
	Cosine      float64 // lim <xhat, x0> / (|xhat| |x0|)
	NormRatio   float64 // lim |xhat| / |x0|
	TestError   float64 // P(sign of a fresh row's prediction != its fresh label)
	TrainMisfit float64 // fraction of training labels that sign(F xhat) gets wrong
	TrainLoss   float64 // (1/m) sum_mu L(y_mu, (F xhat)_mu)
}

// State returns the fixed point as a warm start for a neighbouring problem.
func (r Result) State() State { return State{G1: r.G1, T1: r.T1} }

// ErrInput reports a problem that cannot be solved as stated.
var ErrInput = errors.New("fixedpoint: invalid problem")

// fieldErr reports a problem that has no finite, unique fixed point, or that cannot be
// solved as stated, as a *param.Error: Field names the scenario field to change ("penalty",
// "design.alpha", "noise") and Reason says why and what to do.
func fieldErr(field, format string, args ...any) error {
	return &param.Error{Field: field, Reason: fmt.Sprintf(format, args...)}
}

const (
	// zeroA is the derivative below which the estimate is zero but for an exponentially
	// small set (docs/method.md section 3).
	zeroA = 1e-12
	// mseFloor, relative to E[x0^2], stops noiseless recovery, which converges only
	// linearly towards zero error.
	mseFloor = 1e-13
	// FloorNMSE is the normalized error below which a result is marked Floor (-120 dB):
	// the digits below are the solver's, not the problem's.
	FloorNMSE = 1e-12
	// runOff is how far t1 may grow past the scale of the problem before the iterate is
	// treated as having run off (and the bracketing strategy takes over).
	runOff  = 1e12
	dbFloor = -300.0
	// tFar and tNear bound the search for t1 of the bracketing strategy, in units of
	// E[x0^2]: an error beyond tFar is reported as unbounded, one below tNear as the floor.
	tFar  = 1e40
	tNear = 1e-30
	// suspectT is the t1, in units of E[x0^2] + Delta, above which a converged iteration is
	// checked for a crawl towards an infinite error.
	suspectT = 1e6

	defaultMaxIter = 2000
	// stallIter is how many steps a start may go without halving its best residual.
	stallIter = 400
	// quadSettle is the factor above the tolerance within which a stalled residual counts as
	// converged on a quadrature path: there the map's own rounding, about 1e-12 of the moments
	// amplified near noiseless recovery, keeps the relative change from going lower (measured:
	// a power penalty at q = 1.61 with NMSE 5e-12 settles at 1.0e-10 to 1.2e-9 against 1e-10).
	quadSettle = 10

	// MinAlpha is the smallest sampling ratio solved: below, the atom 1 - alpha of the
	// design at zero is 1 to within 1e-8 and the observables differ from those of no
	// measurement at all by about alpha.
	MinAlpha = 1e-8
	// MinPower is the smallest E[x0^2] solved: below, the weights and variances of the
	// signal's components approach the subnormal numbers.
	MinPower = 1e-280
	// MaxNoiseRatio bounds, either way, the ratio of the noise variance to E[x0^2] E[lambda]
	// (an SNR of +-600 dB) within which the solver is expected to reach every fixed point;
	// beyond, a scenario is solved where a strategy reaches it and refused naming the noise
	// where none does.
	MaxNoiseRatio = 1e60
	// MaxSpread is the largest ratio of the largest to the smallest nonzero eigenvalue of a
	// design held as atoms.
	MaxSpread = 1e30
)

// Solve finds the fixed point of the state evolution and its observables.
//
// It works in units where E[x0^2] = 1 and the mean eigenvalue of the design is 1 (docs/method.md
// section 3.8), so that problems of any size meet the same numbers and equivalent scenarios
// (a design scale and its translation, a signal and noise rescaled together with the
// penalty) give the same result to rounding. Then:
//
//	the zero-estimate end is tested first: if the estimate is zero at the fixed point of a
//	  zero estimate (A < 1e-12 there), MSE = E[x0^2] and EstimateZero is set;
//	the damped iteration with Newton steps runs from the warm start and two cold starts;
//	if none converges, a bracketing strategy solves the one-dimensional reduction (docs/method.md
//	  section 3.10): for each t1 the root in g2 of A(g1(g2), t1) = T(g2), then the root in
//	  t1 of t1 = Phi(t1), each by the Illinois method on a bracket in log scale;
//	Delta = 0 below the recovery threshold: the error goes to 0 linearly; the solver stops
//	  when MSE < 1e-13 E[x0^2] and reports it as converged, with Floor set;
//	no convergence within MaxIter and no bracket: the last iterate, Converged = false, and
//	  the residual; with MaxIter below the default the bracketing strategy is not tried.
//
// A *param.Error naming the field is returned for a nil part, a negative or non-finite Delta,
// a NaN, infinite or >= 1 tolerance, a signal of zero power, a problem whose minimizer is not
// unique (no penalty below m/n = 1) and one whose error is infinite (least squares on a
// design whose eigenvalues reach 0, or no finite fixed point). No result holds NaN or Inf.
func Solve(p Problem, o Options) (Result, error) {
	if p.Design == nil || p.Signal == nil || p.Penalty == nil {
		return Result{}, fieldErr("scenario", "design, signal and penalty are all needed")
	}
	if !(p.Noise >= 0) || math.IsInf(p.Noise, 0) {
		return Result{}, fieldErr("noise", "the noise variance must be a finite number >= 0, not %v (an snr_db at the end of its range with a signal or design at the end of theirs can give this: state noise.variance instead)", p.Noise)
	}
	if math.IsNaN(o.Tol) || o.Tol >= 1 {
		return Result{}, fieldErr("tol", "the tolerance must be a number below 1 (the default is 1e-10), not %v", o.Tol)
	}
	rho2 := p.Signal.Second()
	if !(rho2 > 0) {
		return Result{}, fieldErr("signal", "the signal has no power (E[x0^2] = %v), so the normalized error is undefined: give it a positive variance, amplitude or scale", rho2)
	}
	if rho2 < MinPower {
		return Result{}, fieldErr("signal", "E[x0^2] = %v is below %v, where double precision loses the digits of the signal's law: rescale the signal (and the noise and the penalty with it)", rho2, MinPower)
	}
	if math.IsInf(rho2, 0) {
		return Result{}, fieldErr("signal", "E[x0^2] exceeds the range of double-precision numbers (1.8e308): give the signal smaller values")
	}
	if a := p.Design.Alpha(); a < MinAlpha {
		return Result{}, fieldErr("design.alpha", "m/n = %v is below the solver's limit %v (fewer than one measurement per 100 million unknowns, where 1 - m/n rounds to 1): the error there is E[x0^2] to within m/n", a, MinAlpha)
	}
	if sp := design.Spread(p.Design); !(sp <= MaxSpread) {
		return Result{}, fieldErr("design", "its nonzero eigenvalues spread over a factor %.3g, beyond the solver's limit %g (singular values over a factor 1e15), where the smallest ones are zeros to double precision: raise the smallest singular value (design.min, or the smallest of design.values), or give it as 0", sp, MaxSpread)
	}
	mean := p.Design.Mean()
	if !(mean > 0) || math.IsInf(mean, 0) {
		return Result{}, fieldErr("design", "the mean eigenvalue of F^T F is %v: the design needs a nonzero singular value, and squares of its singular values below 1.8e308", mean)
	}
	if o.Tol <= 0 {
		o.Tol = 1e-10
	}
	if o.MaxIter <= 0 {
		o.MaxIter = defaultMaxIter
	}
	sc := math.Sqrt(rho2)
	q := Problem{
		Design:  design.Rescaled(p.Design, mean),
		Signal:  signal.Scaled(p.Signal, sc),
		Penalty: scalePenalty(p.Penalty, sc, mean),
		Noise:   p.Noise / mean / sc / sc,
	}
	if err := refuse(q); err != nil {
		return Result{}, err
	}
	s := solver{p: q, o: o, rho2: q.Signal.Second()}
	if isIdentity(q.Penalty) && q.Design.Atom0() == 0 {
		// refuse has ruled out a design that reaches 0.
		if r, ok, err := s.leastSquares(); ok {
			if err != nil {
				return Result{}, err
			}
			return s.unscale(r, rho2, sc, mean)
		}
	}
	r, err := s.solve(o.Start, sc, mean)
	if err == nil {
		err = s.nonUnique(r)
	}
	if err == nil {
		err = s.undetermined(r)
	}
	if err != nil {
		return Result{}, err
	}
	return s.unscale(r, rho2, sc, mean)
}

// unscale returns the result in the units of the problem: x by sc, eigenvalues by mean.
func (s *solver) unscale(r Result, rho2, sc, mean float64) (Result, error) {
	r.NMSE = r.MSE / s.rho2
	r.MSE = r.NMSE * rho2
	r.G1 *= mean
	r.G2 *= mean
	r.T1 *= rho2
	r.Susceptibility /= mean
	r.TrainError *= mean * rho2
	if !finiteAll(r.MSE, r.T1, r.G1, r.G2, r.TrainError) || !(r.Susceptibility > 0) {
		return Result{}, fieldErr("signal", "the error, %v, lies outside the range of double-precision numbers: rescale the signal, the noise and the penalty together", r.MSE)
	}
	return r, nil
}

// refuse returns the account of a problem without a finite, unique fixed point that can be
// told before iterating (docs/method.md section 3.11).
func refuse(q Problem) error {
	if !isIdentity(q.Penalty) {
		return nil
	}
	if q.Design.Atom0() > 0 {
		return fieldErr("penalty", "with no penalty (every strength 0) and a share %.3g of the design's eigenvalues at 0 (m/n = %v) the minimizer is not unique: give the penalty a positive strength (as l1 goes to 0 the LASSO tends to the minimum-l1 interpolant), or raise design.alpha to 1 or more", q.Design.Atom0(), q.Design.Alpha())
	}
	if q.Noise > 0 && design.ReachesZero(q.Design) {
		return fieldErr("penalty", "least squares (every strength 0) on a design whose eigenvalues come down to 0 has an infinite error whenever there is noise: give the penalty a positive l2, or keep the eigenvalues away from 0 (design.min above 0, or design.alpha away from 1)")
	}
	return nil
}

// diagnose returns the account of a problem that the bracketing strategy could not solve when
// the penalty barely acts at the scale of the signal (it moves an entry of half the signal's
// root mean square by less than 1e-9 of it at unit precision) while the design has an atom at 0:
// the minimizer is then not unique, or it is the vanishing-penalty limit (the minimum-penalty
// interpolant), which lies beyond double precision.
func (s *solver) diagnose() error {
	pull := math.Abs(0.5-s.p.Penalty.Prox(0.5, 1)) / 0.5
	if small := 1e-3; s.p.Penalty.Prox(small, 1) == small {
		// Flat about 0 (a box without l2): small entries are left as they are.
		pull = 0
	}
	if pull < 1e-9 && s.p.Design.Atom0() > 0 {
		return fieldErr("penalty", "the penalty barely acts on entries of the size of the signal (it moves them by %.2g of their size) and %.3g of the design's eigenvalues are 0 (m/n = %v): the minimizer is not unique, or is the limit of a vanishing penalty, beyond the solver's reach; strengthen the penalty (a box penalty needs an l2 term here), or raise design.alpha", pull, s.p.Design.Atom0(), s.p.Design.Alpha())
	}
	return nil
}

// isIdentity reports a penalty that is zero: its prox is the identity.
func isIdentity(p penalty.Penalty) bool {
	pc, ok := p.Pieces(1)
	return ok && len(pc) == 1 && pc[0].Slope == 1 && pc[0].Intercept == 0
}

// solve runs the strategies of Solve in the solver's units; start is in the problem's units.
func (s *solver) solve(start *State, sc, mean float64) (Result, error) {
	if r, ok := s.zeroEnd(); ok {
		return r, nil
	}
	// The third start is g1 at the mean eigenvalue, 1 in these units (its value at the zero
	// estimate), whatever the penalty: a penalty without pull at the signal's scale (a box
	// with no l2) gives the other two g1 = 1/t in units of x0^2, not of the eigenvalues,
	// 5e195 for a signal of power 2e-196, where the iteration leaves the range at once.
	starts := []State{s.coldStart(2), s.coldStart(4), {G1: 1, T1: s.rho2 + s.p.Noise}}
	cold := 0 // the index of the first cold start: after the warm one, if any
	if st := start; st != nil && st.G1 > 0 && st.T1 > 0 && !math.IsInf(st.G1+st.T1, 0) {
		w := State{G1: st.G1 / mean, T1: st.T1 / sc / sc}
		if w.G1 > 0 && w.T1 > 0 && !math.IsInf(w.G1+w.T1, 0) {
			starts = append([]State{w}, starts...)
			cold = 1
		}
	}
	var last Result
	for i, st := range starts {
		if i == cold && !s.o.noCoarse {
			if r, ok := s.fromCoarse(); ok {
				return r, nil
			}
		}
		r, err := s.run(st)
		if err == nil && r.Converged {
			if r.T1 > suspectT*(s.rho2+s.p.Noise) && !r.EstimateZero {
				// A crawl towards an infinite error also has small relative changes:
				// the bracketing strategy tells the two apart.
				if s.crawls(r) {
					return Result{}, errUnbounded(s)
				}
			}
			return r, nil
		}
		if err == nil && r.Iterations > 0 && (last.Iterations == 0 || r.Residual < last.Residual) {
			last = r
		}
	}
	if last.Iterations > 0 && s.o.MaxIter < defaultMaxIter {
		// A caller that caps the iterations below the default gets the capped iterate.
		return last, nil
	}
	r, err := s.bracket()
	if err == nil && r.Converged {
		return r, nil
	}
	if d := s.diagnose(); d != nil {
		return Result{}, d
	}
	if err != nil {
		return Result{}, err
	}
	if last.Iterations > 0 && last.Residual < r.Residual {
		return last, nil
	}
	return r, nil
}

// The coarse start (docs/method.md section 3.6): the size of the surrogate mixture, and the
// tolerance and iteration limit of its fixed point. A surrogate of five nodes built at the
// noise of the first cold start puts the fixed point within about 1e-6 of the full law's
// (measured on the grid of TestCoarseStart), so that the full run from there converges in
// two evaluations of the channel; 1e-5 stops the surrogate's Newton steps once they are
// below that error.
const (
	coarseNodes = 5
	coarseTol   = 1e-5
	coarseIter  = 100
)

// fromCoarse solves the fixed point from the fixed point of a coarse surrogate of the signal's
// law (signal.Coarse, built at the noise of the first cold start and solved from there), so
// that the full mixture is evaluated only where Newton's method is already close. It reports
// ok only for a result that the cold starts would accept without a second look: converged,
// not the zero estimate, not at the error floor (where the point at which the iteration stops
// depends on the path) and below the t1 at which a crawl towards an infinite error is
// checked. Otherwise, or when the law has no surrogate (too few components, a nonzero mean),
// or the problem is one that diagnose names (which the cold starts then decide alone), Solve
// goes on with the cold starts exactly as without it; the result of a failed attempt is not
// kept.
func (s *solver) fromCoarse() (Result, bool) {
	// The noise of coldStart(2), whose penalty-dependent g1 is not needed when the law has
	// no surrogate (most laws have a few components: Coarse refuses them at once).
	l, ok := signal.Coarse(s.p.Signal, coarseNodes, s.rho2+s.p.Noise)
	if !ok || s.diagnose() != nil {
		// Where diagnose would refuse a problem that the cold starts and the bracketing
		// strategy fail on (a vanishing penalty with eigenvalues at 0), a coarse start must
		// not reach a fixed point that they do not: the problem is refused as before.
		return Result{}, false
	}
	st := s.coldStart(2)
	c := solver{p: s.p, o: Options{Tol: coarseTol, MaxIter: coarseIter}, rho2: s.rho2, coarse: true}
	c.p.Signal = l
	r, err := c.run(st)
	if err != nil || !r.Converged || r.EstimateZero || r.Floor {
		return Result{}, false
	}
	// Iterations then counts the steps with the signal's own law (those that cost), not the
	// surrogate's.
	r, err = s.run(r.State())
	if err != nil || !r.Converged || r.EstimateZero || r.Floor || r.T1 > suspectT*(s.rho2+s.p.Noise) {
		return Result{}, false
	}
	return r, true
}

// zeroEnd tests the fixed point of a zero estimate: A = 0 gives V = 0, g2 = Inf and, in the
// limit, g1 = E[lambda] = 1 and t1 = Delta + Var[lambda] (in the solver's units). If the
// prox there is zero but on a set of derivative mass below zeroA, that is the fixed point.
func (s *solver) zeroEnd() (Result, bool) {
	// g2 far above the spectrum, so that T(g2) g2 = E[lambda] = 1 to 1e-9: the limit.
	far := 1e12
	tr := s.p.Design.At(far)
	for math.Abs(tr.T*far-1) > 1e-9 && far < 1e290 {
		far *= 1e6
		tr = s.p.Design.At(far)
	}
	g1 := tr.T / tr.S1
	t1 := (s.p.Noise*tr.S3 + tr.W*s.rho2) / (g1 * g1 * tr.S2)
	if !finitePos(g1) || !finitePos(t1) {
		return Result{}, false
	}
	// Most problems are far from this end, and the first components decide that.
	if signal.AReaches(s.p.Signal, s.p.Penalty, g1, t1, zeroA) {
		return Result{}, false
	}
	m := signal.Expect(s.p.Signal, s.p.Penalty, g1, t1)
	r := s.zeroResult(0, g1, t1, m)
	r.G2 = far
	return r, true
}

type solver struct {
	p         Problem // in the solver's units
	o         Options
	rho2      float64 // E[x0^2] in the solver's units: 1 to rounding
	unbounded bool    // set by bracket when t1 = Phi(t1) has no root below tFar

	// The last moments and where they were taken: the observables at the end of a run are
	// taken where the last step of the iteration already evaluated them, and on a mixture
	// of many components (Laplace, Student-t) that evaluation is most of a fixed point's time.
	lastG1, lastT1 float64
	last           signal.Moments
	lastSl         signal.Slopes
	lastSlOK       bool

	// coarse marks the solver of a coarse start's surrogate (fromCoarse), whose evaluations
	// are cheap: Newton steps with closed-form slopes are tried from the first one on (one
	// that fails costs a few evaluations of a handful of components).
	coarse bool
}

// expect returns the moments of the scalar channel at (g1, t1) and, where the channel gives
// them in closed form, their slopes (ok), reusing the last ones when the point is the same.
func (s *solver) expect(g1, t1 float64) (signal.Moments, signal.Slopes, bool) {
	if s.lastG1 == g1 && s.lastT1 == t1 && g1 > 0 {
		return s.last, s.lastSl, s.lastSlOK
	}
	m, sl, ok := signal.ExpectSlopes(s.p.Signal, s.p.Penalty, g1, t1)
	s.lastG1, s.lastT1, s.last, s.lastSl, s.lastSlOK = g1, t1, m, sl, ok
	return m, sl, ok
}

// coldStart starts sparse (docs/method.md section 3): t1 = rho2 and g1 such that a threshold
// penalty thresholds at k standard deviations; the restart uses a larger k.
func (s *solver) coldStart(k float64) State {
	t := s.rho2 + s.p.Noise
	g := s.p.Penalty.StartG(t) * 2 / k
	if !(g > 0) || math.IsInf(g, 0) {
		g = 1
	}
	return State{G1: g, T1: t}
}

// errRunOff ends one run of the damped iteration; it never leaves Solve, which then tries
// the next start and the bracketing strategy.
var errRunOff = errors.New("the damped iteration left the range of the problem")

// image is one evaluation of the update map at (g1, t1).
type image struct {
	g1, t1, g2 float64
	tr         design.Transforms // the design's transforms at g2
	m          signal.Moments
	sl         signal.Slopes // the slopes of m in g1 and t1, when slOK
	slOK       bool
	res        float64 // relative change from the argument
}

// apply evaluates the update map of the package comment at (g1, t1); near is a guess of g2.
func (s *solver) apply(g1, t1, near float64) (image, error) {
	m, sl, slOK := s.expect(g1, t1)
	v := math.Max(m.A, zeroA) / g1
	g2, ng1, nt1, tr, err := s.linear(v, m.MSE, near)
	if err != nil {
		return image{}, err
	}
	res := math.Max(math.Abs(ng1-g1)/g1, math.Abs(nt1-t1)/math.Max(t1, 1e-300))
	return image{g1: ng1, t1: nt1, g2: g2, tr: tr, m: m, sl: sl, slOK: slOK, res: res}, nil
}

// linear is steps 2-4 of the update (docs/method.md section 3.3): from V and E to g2 and the
// new (g1, t1); near is a guess of g2.
func (s *solver) linear(v, mse, near float64) (g2, ng1, nt1 float64, tr design.Transforms, err error) {
	p := s.p
	g2, err = invertS1(p.Design, v, near)
	if err != nil {
		return 0, 0, 0, tr, err
	}
	tr = p.Design.At(g2)
	ng1 = tr.T / tr.S1
	nt1 = (p.Noise*tr.S3 + tr.W*mse) / (ng1 * ng1 * tr.S2)
	if !finitePos(ng1) || !(nt1 >= 0) || math.IsInf(nt1, 0) {
		return 0, 0, 0, tr, errRunOff
	}
	return g2, ng1, nt1, tr, nil
}

// newtonFrom is the residual below which the solver tries Newton steps on the fixed-point
// equation in (log g1, log t1); the damped iteration alone crawls where the map contracts
// weakly (near alpha = 1, at vanishing penalties, near a recovery threshold).
const newtonFrom = 1e-2

// newtonFromSlopes replaces newtonFrom where the channel gives the slopes of its moments in
// closed form: a Newton step then costs one evaluation of the map, like a damped step, and
// is tried from a residual of 0.3 on (it is still kept only if it lowers the residual).
const newtonFromSlopes = 0.3

// newton tries one Newton step on F(x) = log M(x) - x, x = (log g1, log t1), with the step
// capped at a factor e^2 per coordinate; it returns the new point only if the map's residual
// there is smaller than at the current one. The Jacobian comes from the closed-form slopes
// of the channel's moments where signal.ExpectSlopes gives them (the linear side by a
// forward difference in V, which costs no evaluation of the channel), else from forward
// differences of the whole map (docs/method.md section 3.4). (A Jacobian carried by Broyden's
// update instead saves two evaluations a step but ends the iteration just below the
// tolerance rather than far below it, and the tuned optimum of a study, found on a flat
// minimum, then moves by 4e-5.)
func (s *solver) newton(g1, t1 float64, cur image) (float64, float64, image, bool) {
	f0 := [2]float64{math.Log(cur.g1 / g1), math.Log(cur.t1 / t1)}
	jac, ok := s.jacobian(g1, t1, cur)
	if !ok {
		return 0, 0, image{}, false
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

// jacobianStep is the step in each log coordinate of the forward differences of newton.
const jacobianStep = 1e-6

// jacobian returns the Jacobian of F(x) = log M(x) - x at x = (log g1, log t1), cur being
// M's image there.
func (s *solver) jacobian(g1, t1 float64, cur image) ([2][2]float64, bool) {
	return s.jacobianBy(g1, t1, cur, false)
}

// jacobianBy is jacobian, with central differences where central is set (two more
// evaluations of the linear side, or of the map, and an error of order h^2 instead of h).
func (s *solver) jacobianBy(g1, t1 float64, cur image, central bool) ([2][2]float64, bool) {
	const h = jacobianStep
	var jac [2][2]float64
	f0 := [2]float64{math.Log(cur.g1 / g1), math.Log(cur.t1 / t1)}
	if cur.slOK && cur.t1 > 0 {
		// M = (g1', t1') depends on x through V = max(A, zeroA)/g1 (which fixes g2, hence g1'
		// and the coefficients of t1') and through E, on which t1' is affine.
		m, sl := cur.m, cur.sl
		a := math.Max(m.A, zeroA)
		v := a / g1
		dv := [2]float64{-1, 0} // d log V / dx
		if m.A > zeroA {
			dv = [2]float64{g1*sl.Ag/m.A - 1, t1 * sl.At / m.A}
		}
		de := [2]float64{g1 * sl.MSEg, t1 * sl.MSEt} // dE / dx
		bg1, bt1 := cur.g1, cur.t1
		_, pg1, pt1, _, err := s.linear(v*math.Exp(h), m.MSE, cur.g2)
		if err != nil || !(pt1 > 0) {
			return jac, false
		}
		lg := math.Log(pg1/bg1) / h // d log g1' / d log V
		lt := math.Log(pt1/bt1) / h // d log t1' / d log V at fixed E
		if central {
			_, mg1, mt1, _, err := s.linear(v*math.Exp(-h), m.MSE, cur.g2)
			if err != nil || !(mt1 > 0) {
				return jac, false
			}
			lg, lt = math.Log(pg1/mg1)/(2*h), math.Log(pt1/mt1)/(2*h)
		}
		// d log t1' / dE = W / (g1'^2 S2 t1'), from t1' = (Delta S3 + W E)/(g1'^2 S2).
		te := cur.tr.W / (bg1 * bg1 * cur.tr.S2 * bt1)
		for k := 0; k < 2; k++ {
			jac[0][k] = lg * dv[k]
			jac[1][k] = lt*dv[k] + te*de[k]
		}
		jac[0][0]--
		jac[1][1]--
		return jac, finiteAll(jac[0][0], jac[0][1], jac[1][0], jac[1][1])
	}
	// F at x moved by step along coordinate k.
	at := func(k int, step float64) ([2]float64, bool) {
		pg, pt := g1, t1
		if k == 0 {
			pg *= math.Exp(step)
		} else {
			pt *= math.Exp(step)
		}
		im, err := s.apply(pg, pt, cur.g2)
		if err != nil || !(im.t1 > 0) {
			return [2]float64{}, false
		}
		return [2]float64{math.Log(im.g1 / pg), math.Log(im.t1 / pt)}, true
	}
	for k := 0; k < 2; k++ {
		fk, ok := at(k, h)
		if !ok {
			return jac, false
		}
		lo, step := f0, h
		if central {
			if lo, ok = at(k, -h); !ok {
				return jac, false
			}
			step = 2 * h
		}
		jac[0][k] = (fk[0] - lo[0]) / step
		jac[1][k] = (fk[1] - lo[1]) / step
	}
	return jac, true
}

// leastSquares returns the fixed point of least squares (every strength 0) on a design with
// no eigenvalue at 0, in closed form: the prox is the identity, so A = 1 and E = t1, g2 = 0
// and g1 = 1/S1(0); then t1 = (Delta S3 + W t1)/(g1^2 S2) with g1^2 S2 = 1 + W gives
// t1 = Delta S3(0) = Delta E[1/lambda], the error of least squares (the trace of the inverse
// Gram matrix, common practice; docs/method.md section 3.9). Iterating to it instead meets
// equations degenerate to E[1/lambda]^2/E[1/lambda^2], which for eigenvalues spread over
// many decades is below double precision.
// A penalty that is the identity at g = 1 but not at that g1 (a ridge of strength 1e-17
// where g1 = 1e-20) is not least squares there, and is left to the iteration (ok false).
func (s *solver) leastSquares() (r Result, ok bool, err error) {
	s0, _ := s.p.Design.Stieltjes(0)
	if !finitePos(s0) || !finitePos(1/s0) {
		return r, false, nil
	}
	if pc, lin := s.p.Penalty.Pieces(1 / s0); !lin || len(pc) != 1 || pc[0].Slope != 1 || pc[0].Intercept != 0 {
		return r, false, nil
	}
	r = Result{G1: 1 / s0, T1: s.p.Noise * s0, Converged: true}
	r.Note = "least squares (every strength 0) on a design with no eigenvalue at 0: MSE = noise E[1/lambda], in closed form"
	r, err = s.observe(r)
	return r, true, err
}

// minDetermined is the smallest singular value of the Jacobian of F(x) = log M(x) - x,
// x = (log g1, log t1), at which Solve reports a fixed point: a fixed point moves by the map's
// own error (about 1e-12 of itself: the design's and the channel's rules) divided by that
// value, so that below 1e-7 its digits are not determined in double precision. Measured over
// the property test's random scenarios, NMSE changed between versions of the solver by
// 6e-5 at 2.2e-7, by factors below 1e-9 (docs/method.md section 3.11).
const minDetermined = 1e-7

// undetermined returns the account of a converged fixed point whose equations are degenerate
// to double precision (see minDetermined): least squares, or a penalty too weak to act, on a
// design whose eigenvalues spread over many decades, where 1 - d t1'/d t1 is about
// E[1/lambda]^2 / E[1/lambda^2] and falls below 1e-13. The test runs where such a fixed point
// can arise, g2 far below the mean eigenvalue or a spread above 1e6, and costs two or four
// evaluations of the linear side or of the map.
func (s *solver) undetermined(r Result) error {
	if !r.Converged || r.EstimateZero || r.Floor || !(r.G2 < 1e-6 || design.Spread(s.p.Design) > 1e6) {
		return nil
	}
	im, err := s.apply(r.G1, r.T1, r.G2)
	if err != nil {
		return nil
	}
	jac, ok := s.jacobianBy(r.G1, r.T1, im, true)
	if !ok {
		return nil
	}
	if sv := smallestSingular(jac); sv < minDetermined {
		return errNotDetermined(s, fmt.Sprintf(" (its equations are degenerate to %.1g)", sv))
	}
	return nil
}

// errNotDetermined is the account of undetermined, and of an iteration that finds no fixed
// point on a design whose error is finite for every convex penalty; how adds detail.
func errNotDetermined(s *solver, how string) error {
	if sp := design.Spread(s.p.Design); sp > 1e6 {
		return fieldErr("design", "the fixed point is not determined to double precision here%s: the penalty acts too weakly to fix the error against eigenvalues that spread over a factor %.3g; narrow that spread (a larger smallest eigenvalue or singular value, or a smaller condition number) or strengthen the penalty", how, sp)
	}
	return fieldErr("penalty", "the fixed point is not determined to double precision here%s: the penalty acts too weakly to fix the error; strengthen the penalty, or move design.alpha away from 1", how)
}

// smallestSingular returns the smallest singular value of a 2 x 2 matrix, from
// sigma_min^2 = 2 det^2 / (f + sqrt(f^2 - 4 det^2)), f the squared Frobenius norm (the form
// without cancellation).
func smallestSingular(a [2][2]float64) float64 {
	f := a[0][0]*a[0][0] + a[0][1]*a[0][1] + a[1][0]*a[1][0] + a[1][1]*a[1][1]
	det := a[0][0]*a[1][1] - a[0][1]*a[1][0]
	if f == 0 {
		return 0
	}
	return math.Sqrt(2 * det * det / (f + math.Sqrt(math.Max(0, f*f-4*det*det))))
}

func (s *solver) run(st State) (Result, error) {
	g1, t1 := st.G1, st.T1
	scale := s.rho2 + s.p.Noise*(1+1/s.p.Design.Mean()) + 1
	damp := 0.5
	prevRes := math.Inf(1)
	bestRes, bestIt := math.Inf(1), 0
	var closest Result // the iterate of the smallest residual so far
	zeroCount := 0
	newtonNext, newtonWait := 0, 1
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
		if closest.Iterations == 0 || im.res < closest.Residual {
			closest = r
		}
		// The floor ends noiseless recovery only while the error is still falling: a warm
		// start from a recovering neighbour sits below the floor at its first step even
		// where this problem does not recover.
		if im.res < s.o.Tol || (im.m.MSE < mseFloor*s.rho2 && im.t1 <= t1 && it > 1) {
			r.Converged = true
			break
		}
		if (im.res < newtonFrom || (im.slOK && (s.coarse || im.res < newtonFromSlopes))) && it >= newtonNext {
			if ng1, nt1, nim, ok := s.newton(g1, t1, im); ok {
				g1, t1, im = ng1, nt1, nim
				newtonWait = 1
				if t1 > runOff*scale {
					// Newton steps along a crawl towards an infinite error run off as the
					// damped ones do (docs/method.md section 3.6).
					return r, errRunOff
				}
				continue
			}
			// A failed Newton step costs up to six evaluations of the map; where the map
			// is too rough for it (quadrature noise at an extreme t1) it keeps failing,
			// so the next try waits twice as long.
			newtonNext = it + newtonWait
			newtonWait *= 2
		}
		if im.res < bestRes/2 {
			bestRes, bestIt = im.res, it
		} else if it-bestIt > stallIter && s.o.MaxIter >= defaultMaxIter {
			// No halving of the residual in stallIter steps: this start is stuck, and the
			// bracketing strategy is cheaper than the rest of the budget. Where the channel is
			// a quadrature (no closed-form slopes) and the residual settled within
			// quadSettle of the tolerance, the iterate is as converged as the rule's own
			// rounding lets it be (docs/method.md section 3.4): that closest iterate is the result.
			if !im.slOK && closest.Residual < quadSettle*s.o.Tol {
				r = closest
				r.Converged = true
				r.Note = fmt.Sprintf("converged to the precision of the quadrature: the relative change of the iterate settles at %.2g, within a factor %d of the tolerance %.2g", r.Residual, quadSettle, s.o.Tol)
			}
			break
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
	m, _, _ := s.expect(r.G1, r.T1)
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
	// (1 - 1/alpha) h(0), with h(l) = g2^2 (Delta + l t2)/(l + g2)^2 (docs/method.md section 4).
	// g2^2 t2 = (E - A^2 t1)/V^2 because 1 - A = g2 V; the atom of nu at zero is split off so
	// that nothing cancels when alpha < 1.
	alpha := p.Design.Alpha()
	g2t2 := math.Max(m.MSE-m.A*m.A*r.T1, 0) / (v * v)
	r.TrainError = (p.Noise*g2*g2*tr.S2Pos+g2t2*tr.S3)/alpha +
		p.Noise*math.Max(0, 1-(1-p.Design.Atom0())/alpha)
	if !finiteAll(r.MSE, r.TrainError, r.G1, r.T1, r.G2) || !finitePos(r.Susceptibility) {
		return Result{}, errRunOff
	}
	if !r.Converged && r.Note == "" {
		r.Note = fmt.Sprintf("not converged: the last relative change of the iterate is %.2g, above the tolerance %.2g", r.Residual, s.o.Tol)
	}
	return r, nil
}

func (s *solver) zeroResult(it int, g1, t1 float64, m signal.Moments) Result {
	r := Result{G1: g1, T1: t1, Iterations: it, Converged: true, EstimateZero: true}
	r.MSE = s.rho2
	// V is exponentially small but positive; it is floored at the smallest normal number
	// so that it stays a positive number through the change of units.
	r.Susceptibility = math.Max(m.A, 0x1p-1022) / g1
	r.Note = "the penalty is strong enough that the estimate is zero: MSE = E[x0^2]"
	s.fill(&r, signal.Moments{MSE: s.rho2, Active: m.Active})
	// With a zero estimate every residual is the measurement itself: (1/m)||y||^2 =
	// (E_nu[lambda] rho2)/alpha + Delta.
	r.TrainError = s.p.Design.Mean()*s.rho2/s.p.Design.Alpha() + s.p.Noise
	return r
}

// fill sets the normalized error and the support fractions. Quadrature sums may exceed 1 by
// a rounding error; the fractions are clamped to [0, 1].
func (s *solver) fill(r *Result, m signal.Moments) {
	r.MSE = math.Max(r.MSE, 0)
	r.NMSE = r.MSE / s.rho2
	r.NMSEdB = dbFloor
	if r.NMSE > 0 {
		r.NMSEdB = math.Max(dbFloor, 10*math.Log10(r.NMSE))
	}
	if r.NMSE < FloorNMSE && !r.EstimateZero {
		r.Floor = true
		r.Note = "the error is below the solver's floor of 1e-12 E[x0^2] (-120 dB): read it as at most that; with noise 0 it falls to 0 (exact recovery)"
	}
	r.NonZero = clamp01(m.NonZero)
	if m.Active > 0 {
		r.TPP = clamp01(m.TruePos / m.Active)
	}
	if m.NonZero > 0 {
		r.FDP = clamp01(math.Max(0, m.NonZero-m.TruePos) / m.NonZero)
	}
}

func clamp01(x float64) float64 { return math.Min(1, math.Max(0, x)) }

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

// scaled is a penalty in the solver's units: x = sc x' and g = c g', so that
// prox'(r'; g') = prox(sc r'; c g')/sc (docs/method.md section 3.8).
type scaled struct {
	penalty.Penalty
	sc, c float64
}

func scalePenalty(p penalty.Penalty, sc, c float64) penalty.Penalty {
	if sc == 1 && c == 1 {
		return p
	}
	if b, ok := p.(brancher); ok {
		return scaledBranch{scaled{p, sc, c}, b}
	}
	return scaled{p, sc, c}
}

// brancher is the explicit inverse of the power prox that package signal integrates along
// (see penalty's power Branch); scaledBranch keeps it visible through the change of units.
type brancher interface {
	Branch(u, g float64) (x, dxdu, r, drdu float64)
	BranchAt(r, g float64) float64
	Exponent() float64
}

type scaledBranch struct {
	scaled
	b brancher
}

func (p scaledBranch) Branch(u, g float64) (x, dxdu, r, drdu float64) {
	x, dxdu, r, drdu = p.b.Branch(u, p.c*g)
	return x / p.sc, dxdu / p.sc, r / p.sc, drdu / p.sc
}

func (p scaledBranch) BranchAt(r, g float64) float64 { return p.b.BranchAt(p.sc*r, p.c*g) }
func (p scaledBranch) Exponent() float64             { return p.b.Exponent() }

func (p scaled) Prox(r, g float64) float64  { return p.Penalty.Prox(p.sc*r, p.c*g) / p.sc }
func (p scaled) Deriv(r, g float64) float64 { return p.Penalty.Deriv(p.sc*r, p.c*g) }
func (p scaled) StartG(t float64) float64   { return p.Penalty.StartG(p.sc*p.sc*t) / p.c }

func (p scaled) Kinks(g float64) []float64 {
	k := slices.Clone(p.Penalty.Kinks(p.c * g))
	for i := range k {
		k[i] /= p.sc
	}
	return k
}

func (p scaled) Pieces(g float64) ([]penalty.Piece, bool) {
	pc, ok := p.Penalty.Pieces(p.c * g)
	pc = slices.Clone(pc)
	for i := range pc {
		pc[i] = p.piece(pc[i])
	}
	return pc, ok
}

func (p scaled) Linear(g float64) (penalty.Linear, bool) {
	lf, ok := p.Penalty.(penalty.LinearForm)
	if !ok {
		return penalty.Linear{}, false
	}
	l, ok := lf.Linear(p.c * g)
	if !ok {
		return penalty.Linear{}, false
	}
	var out penalty.Linear
	for _, q := range l.Pieces() {
		q = p.piece(q)
		out.Then(q.Hi, q.Slope, q.Intercept)
	}
	return out, true
}

func (p scaled) piece(q penalty.Piece) penalty.Piece {
	return penalty.Piece{Lo: q.Lo / p.sc, Hi: q.Hi / p.sc, Slope: q.Slope, Intercept: q.Intercept / p.sc}
}
