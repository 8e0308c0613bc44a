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
	return elasticNet{"l1", l1, 0}, nil
}

// Ridge returns the ridge penalty (l2/2) x^2 (l2 >= 0, finite). Its prox is g r / (g + l2).
//
// Special cases are: l2 = 0 gives the identity prox (least squares).
func Ridge(l2 float64) (Penalty, error) {
	if err := checkWeight("l2", l2); err != nil {
		return nil, err
	}
	return elasticNet{"ridge", 0, l2}, nil
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
	return elasticNet{"elastic-net", l1, l2}, nil
}

func (p elasticNet) Name() string { return p.name }

// Prox returns c soft(r, l1/g), c = g/(g + l2).
func (p elasticNet) Prox(r, g float64) float64 {
	theta := p.l1 / g
	c := g / (g + p.l2)
	switch {
	case r > theta:
		return c * (r - theta)
	case r < -theta:
		return c * (r + theta)
	case math.IsNaN(r):
		return r
	}
	return 0
}

func (p elasticNet) Deriv(r, g float64) float64 {
	l, _ := p.Linear(g)
	return l.at(r).Slope
}

func (p elasticNet) Kinks(g float64) []float64 {
	l, _ := p.Linear(g)
	return l.kinks()
}

func (p elasticNet) Pieces(g float64) ([]Piece, bool) {
	l, _ := p.Linear(g)
	return l.slice(), true
}

// Linear returns (-Inf, -theta): c(r + theta); [-theta, theta): 0; [theta, Inf): c(r - theta).
// With theta = 0 it is the single piece c r; with theta = +Inf (g underflowing against l1)
// the single zero piece.
func (p elasticNet) Linear(g float64) (Linear, bool) {
	theta := p.l1 / g
	c := g / (g + p.l2)
	inf := math.Inf(1)
	switch {
	case theta == 0:
		return Linear{N: 1, P: [MaxPieces]Piece{{-inf, inf, c, 0}}}, true
	case math.IsInf(theta, 1):
		return Linear{N: 1, P: [MaxPieces]Piece{{-inf, inf, 0, 0}}}, true
	}
	return Linear{N: 3, P: [MaxPieces]Piece{
		{-inf, -theta, c, c * theta},
		{-theta, theta, 0, 0},
		{theta, inf, c, -c * theta},
	}}, true
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
	return nonnegL1{l1, l2}, nil
}

func (p nonnegL1) Name() string { return "nonneg-l1" }

func (p nonnegL1) Prox(r, g float64) float64 {
	theta := p.l1 / g
	if r > theta || math.IsNaN(r) {
		return g / (g + p.l2) * (r - theta)
	}
	return 0
}

func (p nonnegL1) Deriv(r, g float64) float64 {
	l, _ := p.Linear(g)
	return l.at(r).Slope
}

func (p nonnegL1) Kinks(g float64) []float64 {
	l, _ := p.Linear(g)
	return l.kinks()
}

func (p nonnegL1) Pieces(g float64) ([]Piece, bool) {
	l, _ := p.Linear(g)
	return l.slice(), true
}

// Linear returns (-Inf, theta): 0; [theta, Inf): c(r - theta).
func (p nonnegL1) Linear(g float64) (Linear, bool) {
	theta := p.l1 / g
	c := g / (g + p.l2)
	inf := math.Inf(1)
	if math.IsInf(theta, 1) {
		return Linear{N: 1, P: [MaxPieces]Piece{{-inf, inf, 0, 0}}}, true
	}
	return Linear{N: 2, P: [MaxPieces]Piece{
		{-inf, theta, 0, 0},
		{theta, inf, c, -c * theta},
	}}, true
}

func (p nonnegL1) HasZeroRegion() bool { return true }

func (p nonnegL1) StartG(t float64) float64 {
	return pullStart(p.l1+p.l2*2*math.Sqrt(t), t)
}
