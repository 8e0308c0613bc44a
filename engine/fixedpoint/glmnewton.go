package fixedpoint

import (
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
	"gonum.org/v1/gonum/mat"
)

// The generalized iteration, like Solve's, contracts weakly near a boundary (the existence
// boundary of an unpenalized classifier, alpha near 1): there it takes Newton steps on
// F(x) = M(x) - x in x = (log g1, log t1, log g2z, log sigz, muz), with a forward-difference
// Jacobian updated by Broyden's formula between steps, a step capped at a factor e^2 per
// coordinate, and halving until the map's residual falls.

const glmDim = 5

func glmCoords(s GLMState) [glmDim]float64 {
	return [glmDim]float64{math.Log(s.G1), math.Log(s.T1), math.Log(s.G2Z), math.Log(math.Max(s.SigZ, 1e-300)), s.MuZ}
}

func glmPoint(x [glmDim]float64) GLMState {
	return GLMState{G1: math.Exp(x[0]), T1: math.Exp(x[1]), G2Z: math.Exp(x[2]), SigZ: math.Exp(x[3]), MuZ: x[4]}
}

// newton takes one Newton step from st. The first step of a run forms the forward-difference
// Jacobian (glmDim evaluations of the map); later steps update it by Broyden's rank-one
// secant formula from the previous step (Broyden 1965, Math. Comp. 19(92); Dennis & Schnabel
// 1996, "Numerical Methods for Unconstrained Optimization and Nonlinear Equations", section
// 8.1), which costs no evaluation, and fall back to a fresh difference Jacobian when the
// updated one gives no step that lowers the residual.
//
// A warm start may carry the Jacobian of the neighbouring fixed point (GLMState.jac): the
// first step then tries it as it is, with no evaluation.
func (s *glmSolver) newton(st GLMState, cur glmImage) (GLMState, glmImage, bool) {
	if !(st.SigZ > 0) || !(st.T1 > 0) || !(cur.next.SigZ > 0) || !(cur.next.T1 > 0) {
		return st, cur, false
	}
	x0 := glmCoords(st)
	f0 := glmCoords(cur.next)
	for i := range f0 {
		f0[i] -= x0[i]
	}
	if s.jac != nil {
		if s.secant {
			s.broyden(x0, f0)
		}
		if n, im, ok := s.newtonStep(x0, f0, cur); ok {
			s.jx, s.jf, s.secant = x0, f0, true
			return n, im, true
		}
	}
	if !s.diffJacobian(x0, f0, cur) {
		s.jac = nil
		return st, cur, false
	}
	n, im, ok := s.newtonStep(x0, f0, cur)
	if !ok {
		s.jac = nil
		return st, cur, false
	}
	s.jx, s.jf, s.secant = x0, f0, true
	return n, im, true
}

// diffJacobian sets s.jac to the forward-difference Jacobian of F at x0.
func (s *glmSolver) diffJacobian(x0, f0 [glmDim]float64, cur glmImage) bool {
	const h = 1e-6
	jac := mat.NewDense(glmDim, glmDim, nil)
	for k := range glmDim {
		x := x0
		x[k] += h
		im, err := s.apply(glmPoint(x), cur.g)
		if err != nil || !(im.next.SigZ > 0) || !(im.next.T1 > 0) {
			return false
		}
		fk := glmCoords(im.next)
		for i := range fk {
			jac.Set(i, k, (fk[i]-x[i]-f0[i])/h)
		}
	}
	s.jac = jac
	return true
}

// broyden updates s.jac, the Jacobian at s.jx, to x0: J += (df - J dx) dx^T / (dx^T dx).
func (s *glmSolver) broyden(x0, f0 [glmDim]float64) {
	var dx, df [glmDim]float64
	nn := 0.0
	for i := range dx {
		dx[i] = x0[i] - s.jx[i]
		df[i] = f0[i] - s.jf[i]
		nn += dx[i] * dx[i]
	}
	if !(nn > 0) {
		return
	}
	for i := range glmDim {
		r := df[i]
		for k := range glmDim {
			r -= s.jac.At(i, k) * dx[k]
		}
		for k := range glmDim {
			s.jac.Set(i, k, s.jac.At(i, k)+r*dx[k]/nn)
		}
	}
}

// newtonStep solves J d = -F and takes the step, capped at a factor e^2 per coordinate and
// halved until the map's residual falls.
func (s *glmSolver) newtonStep(x0, f0 [glmDim]float64, cur glmImage) (GLMState, glmImage, bool) {
	d, ok := solveJac(s.jac, f0)
	if !ok {
		return GLMState{}, cur, false
	}
	step := [glmDim]float64{}
	big := 0.0
	for i := range step {
		step[i] = -d[i]
		big = math.Max(big, math.Abs(step[i]))
	}
	if !(big < math.Inf(1)) {
		return GLMState{}, cur, false
	}
	if c := big / 2; c > 1 {
		for i := range step {
			step[i] /= c
		}
	}
	for range 4 {
		x := x0
		for i := range x {
			x[i] += step[i]
		}
		n := glmPoint(x)
		im, err := s.apply(n, cur.g)
		if err == nil && im.res < cur.res {
			return n, im, true
		}
		for i := range step {
			step[i] /= 2
		}
	}
	return GLMState{}, cur, false
}

// solveJac solves jac d = f by LU with partial pivoting (gonum lapack64.Getrf, Getrs) on
// arrays of the stack, refusing a matrix whose pivots span more than 1/eps (a lower bound on
// its condition number, common practice): mat.Dense.Solve's 1-norm condition estimate costs
// as much as the factorization here, and a poor step is refused anyway by newtonStep's
// halving.
func solveJac(jac *mat.Dense, f [glmDim]float64) ([glmDim]float64, bool) {
	var a [glmDim * glmDim]float64
	for i := range glmDim {
		for k := range glmDim {
			a[i*glmDim+k] = jac.At(i, k)
		}
	}
	var ipiv [glmDim]int
	lu := blas64.General{Rows: glmDim, Cols: glmDim, Stride: glmDim, Data: a[:]}
	if !lapack64.Getrf(lu, ipiv[:]) {
		return f, false
	}
	lo, hi := math.Inf(1), 0.0
	for i := range glmDim {
		u := math.Abs(a[i*glmDim+i])
		lo, hi = math.Min(lo, u), math.Max(hi, u)
	}
	if !(lo > 0) || !(hi/lo < 1/dlamchE) {
		return f, false
	}
	lapack64.Getrs(blas.NoTrans, lu, blas64.General{Rows: glmDim, Cols: 1, Stride: 1, Data: f[:]}, ipiv[:])
	return f, true
}

// dlamchE is the machine epsilon of float64.
const dlamchE = 0x1p-52
