package penalty

import "math"

// elasticNet is f(x) = l1 |x| + (l2/2) x^2. Its prox is the scaled soft threshold
// c soft(r, l1/g) with c = g/(g + l2) (Parikh & Boyd 2014, Proximal Algorithms, section 6.5.3).
type elasticNet struct {
	name   string
	l1, l2 float64
}

// L1 returns the LASSO penalty l1 |x| (l1 >= 0, finite). Its prox is the soft threshold at l1/g.
//
// Special cases are: l1 = 0 gives the identity prox (least squares).
func L1(l1 float64) (Penalty, error) {
	if err := checkWeight("l1", l1); err != nil {
		return nil, err
	}
	return FromPieces(elasticNet{"l1", l1, 0}), nil
}

// Ridge returns the ridge penalty (l2/2) x^2 (l2 >= 0, finite). Its prox is g r / (g + l2).
//
// Special cases are: l2 = 0 gives the identity prox (least squares).
func Ridge(l2 float64) (Penalty, error) {
	if err := checkWeight("l2", l2); err != nil {
		return nil, err
	}
	return FromPieces(elasticNet{"ridge", 0, l2}), nil
}

// ElasticNet returns l1 |x| + (l2/2) x^2 (l1, l2 >= 0, finite).
//
// Special cases are: l2 = 0 is the LASSO, l1 = 0 is ridge.
func ElasticNet(l1, l2 float64) (Penalty, error) {
	if err := checkWeight("l1", l1); err != nil {
		return nil, err
	}
	if err := checkWeight("l2", l2); err != nil {
		return nil, err
	}
	return FromPieces(elasticNet{"elastic-net", l1, l2}), nil
}

func (p elasticNet) Name() string { return p.name }

func (p elasticNet) Strengths() []Strength {
	switch p.name {
	case "l1":
		return []Strength{{"l1", p.l1}}
	case "ridge":
		return []Strength{{"l2", p.l2}}
	}
	return []Strength{{"l1", p.l1}, {"l2", p.l2}}
}

// Piecewise returns (-Inf, -theta): c(r + theta); [-theta, theta): 0; [theta, Inf): c(r - theta),
// with theta = l1/g and c = g/(g + l2). With theta = 0 it is the single piece c r; with
// theta = +Inf (g underflowing against l1) the single zero piece.
func (p elasticNet) Piecewise(g float64) Linear {
	theta := p.l1 / g
	c := g / (g + p.l2)
	inf := math.Inf(1)
	var l Linear
	switch {
	case theta == 0:
		l.Then(inf, c, 0)
	case math.IsInf(theta, 1):
		l.Then(inf, 0, 0)
	default:
		l.Then(-theta, c, c*theta)
		l.Then(theta, 0, 0)
		l.Then(inf, c, -c*theta)
	}
	return l
}

func (p elasticNet) HasZeroRegion() bool { return p.l1 > 0 }

// StartG: f'(x) = l1 + l2 x for x > 0, see pullStart.
func (p elasticNet) StartG(t float64) float64 {
	return pullStart(p.l1+p.l2*2*math.Sqrt(t), t)
}

// nonnegL1 is f(x) = l1 x + (l2/2) x^2 for x >= 0 and +Inf for x < 0. Its prox is
// c max(0, r - l1/g), the one-sided soft threshold.
type nonnegL1 struct{ l1, l2 float64 }

// NonnegL1 returns the nonnegative LASSO l1 x + (l2/2) x^2 on x >= 0, +Inf below
// (l1, l2 >= 0, finite).
//
// Special cases are: l1 = l2 = 0 is the projection onto x >= 0, which still has a zero region
// (every r < 0 maps to 0).
func NonnegL1(l1, l2 float64) (Penalty, error) {
	if err := checkWeight("l1", l1); err != nil {
		return nil, err
	}
	if err := checkWeight("l2", l2); err != nil {
		return nil, err
	}
	return FromPieces(nonnegL1{l1, l2}), nil
}

func (p nonnegL1) Name() string { return "nonneg-l1" }

func (p nonnegL1) Strengths() []Strength { return []Strength{{"l1", p.l1}, {"l2", p.l2}} }

// Piecewise returns (-Inf, theta): 0; [theta, Inf): c(r - theta).
func (p nonnegL1) Piecewise(g float64) Linear {
	theta := p.l1 / g
	c := g / (g + p.l2)
	inf := math.Inf(1)
	var l Linear
	if math.IsInf(theta, 1) {
		l.Then(inf, 0, 0)
		return l
	}
	l.Then(theta, 0, 0)
	l.Then(inf, c, -c*theta)
	return l
}

func (p nonnegL1) HasZeroRegion() bool { return true }

func (p nonnegL1) StartG(t float64) float64 {
	return pullStart(p.l1+p.l2*2*math.Sqrt(t), t)
}
