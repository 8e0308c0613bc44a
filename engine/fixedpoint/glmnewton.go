package fixedpoint

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// The generalized iteration, like Solve's, contracts weakly near a boundary (the existence
// boundary of an unpenalized classifier, alpha near 1): there it takes Newton steps on
// F(x) = M(x) - x in x = (log g1, log t1, log g2z, log sigz, muz), with a forward-difference
// Jacobian, a step capped at a factor e^2 per coordinate, and halving until the map's
// residual falls.

const glmDim = 5

func glmCoords(s GLMState) [glmDim]float64 {
	return [glmDim]float64{math.Log(s.G1), math.Log(s.T1), math.Log(s.G2Z), math.Log(math.Max(s.SigZ, 1e-300)), s.MuZ}
}

func glmPoint(x [glmDim]float64) GLMState {
	return GLMState{G1: math.Exp(x[0]), T1: math.Exp(x[1]), G2Z: math.Exp(x[2]), SigZ: math.Exp(x[3]), MuZ: x[4]}
}

func (s *glmSolver) newton(st GLMState, cur glmImage) (GLMState, glmImage, bool) {
	if !(st.SigZ > 0) || !(st.T1 > 0) || !(cur.next.SigZ > 0) || !(cur.next.T1 > 0) {
		return st, cur, false
	}
	const h = 1e-6
	x0 := glmCoords(st)
	f0 := glmCoords(cur.next)
	for i := range f0 {
		f0[i] -= x0[i]
	}
	jac := mat.NewDense(glmDim, glmDim, nil)
	for k := range glmDim {
		x := x0
		x[k] += h
		im, err := s.apply(glmPoint(x), cur.g)
		if err != nil || !(im.next.SigZ > 0) || !(im.next.T1 > 0) {
			return st, cur, false
		}
		fk := glmCoords(im.next)
		for i := range fk {
			jac.Set(i, k, (fk[i]-x[i]-f0[i])/h)
		}
	}
	var d mat.VecDense
	if err := d.SolveVec(jac, mat.NewVecDense(glmDim, f0[:])); err != nil {
		return st, cur, false
	}
	step := [glmDim]float64{}
	big := 0.0
	for i := range step {
		step[i] = -d.AtVec(i)
		big = math.Max(big, math.Abs(step[i]))
	}
	if !(big < math.Inf(1)) {
		return st, cur, false
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
	return st, cur, false
}
