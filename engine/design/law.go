package design

import (
	"fmt"
	"math"

	"hdrisk/engine/param"
)

// Transforms holds the transforms of a law nu at one point g (docs/method.md sections 2 and 3).
// Every field is formed without the cancellations of docs/method.md section 3, so each keeps its
// relative accuracy from g much smaller to g much larger than the spectrum.
type Transforms struct {
	S1, S2, S3 float64 // E[1/(l+g)], E[1/(l+g)^2], E[l/(l+g)^2]
	T          float64 // E[l/(l+g)]   (= 1 - g S1, formed without the subtraction)
	W          float64 // Var[1/(l+g)] / S1^2   (= S2/S1^2 - 1, without the subtraction)
	S2Pos      float64 // E[1{l>0}/(l+g)^2]: S2 without the atom at zero
}

// Law is the limiting eigenvalue law nu of F^T F (n x n) for a design F of m rows and
// n columns, after scaling.
type Law interface {
	// At returns the transforms of nu at g. The domain is g >= 0, and g > 0 when
	// Atom0() > 0; at g = 0 a transform that diverges is +Inf.
	At(g float64) Transforms
	// Stieltjes returns S1 and S2 only: the cheap path for inverting S1.
	Stieltjes(g float64) (s1, s2 float64)
	// Atom0 returns nu({0}), which is at least max(0, 1 - alpha).
	Atom0() float64
	// Mean returns E_nu[lambda] after scaling.
	Mean() float64
	// Alpha returns the sampling ratio m/n.
	Alpha() float64
	// SingularValues returns the min(m, n) singular values of an m x n instance of this
	// design, from the quantiles of the law (decreasing order), already scaled. The shape
	// and the sampling ratio are those of the law, whatever the ratio m/n.
	// Special cases are: m < 1 or n < 1 gives nil.
	SingularValues(m, n int) []float64
}

// mix returns the transforms of nu = p0 delta_0 + q mu at g > 0 from those of the probability
// law mu, which has no atom at zero. The variance of the two-part mixture is
// q Var_mu + p0 q (1/g - S1_mu)^2, and 1/g - S1_mu = T_mu/g, so no term is a difference.
func mix(p0, q, g float64, m Transforms) Transforms {
	ig := 1 / g
	gs1 := p0 + q*g*m.S1
	gm := g * m.S1
	return Transforms{
		S1:    p0*ig + q*m.S1,
		S2:    p0*ig*ig + q*m.S2,
		S3:    q * m.S3,
		T:     q * m.T,
		W:     q * (m.W*gm*gm + p0*m.T*m.T) / (gs1 * gs1),
		S2Pos: q * m.S2,
	}
}

// parts returns the atom at zero max(0, 1 - alpha) and the weight min(1, alpha) of the law
// of the squared nonzero singular values.
func parts(alpha float64) (p0, q float64) {
	if alpha >= 1 {
		return 0, 1
	}
	return 1 - alpha, alpha
}

func checkAlpha(alpha float64) error {
	if math.IsNaN(alpha) || math.IsInf(alpha, 0) || alpha <= 0 {
		return &param.Error{Field: "alpha", Reason: fmt.Sprintf("%v: the sampling ratio m/n must be finite and positive", alpha)}
	}
	return nil
}

func checkScale(s Scale) error {
	if !s.valid() {
		return &param.Error{Field: "scale", Reason: fmt.Sprintf("%v is not one of rows, columns, as-given", s)}
	}
	return nil
}

// quantileProbs returns the k plotting positions (i + 1/2)/k in decreasing order, so that
// quantiles come out in the decreasing order of singular values.
func quantileProbs(m, n int) []float64 {
	k := min(m, n)
	if k < 1 {
		return nil
	}
	p := make([]float64, k)
	for i := range p {
		p[i] = 1 - (float64(i)+0.5)/float64(k)
	}
	return p
}
