package penalty

import "math"

// box is f(x) = (l2/2) x^2 for |x| <= bound and +Inf outside. Its prox is the projection of
// the ridge estimate c r, c = g/(g + l2), onto [-bound, bound] (Parikh & Boyd 2014, Proximal
// Algorithms, section 6.2: the prox of an indicator is the projection).
type box struct{ bound, l2 float64 }

// Box returns the box constraint |x| <= bound with an optional ridge term (l2/2) x^2
// (bound > 0, l2 >= 0, both finite).
func Box(bound, l2 float64) (Penalty, error) {
	if err := checkPositive("bound", bound); err != nil {
		return nil, err
	}
	if err := checkWeight("l2", l2); err != nil {
		return nil, err
	}
	return box{bound, l2}, nil
}

func (p box) Name() string { return "box" }

func (p box) Prox(r, g float64) float64 {
	return math.Max(-p.bound, math.Min(p.bound, g/(g+p.l2)*r))
}

func (p box) Deriv(r, g float64) float64 {
	l, _ := p.Linear(g)
	return l.at(r).Slope
}

func (p box) Kinks(g float64) []float64 {
	l, _ := p.Linear(g)
	return l.kinks()
}

func (p box) Pieces(g float64) ([]Piece, bool) {
	l, _ := p.Linear(g)
	return l.slice(), true
}

// Linear returns (-Inf, -b/c): -b; [-b/c, b/c): c r; [b/c, Inf): b, with c = g/(g + l2).
func (p box) Linear(g float64) (Linear, bool) {
	c := g / (g + p.l2)
	e := p.bound / c
	inf := math.Inf(1)
	if math.IsInf(e, 1) {
		return Linear{N: 1, P: [MaxPieces]Piece{{-inf, inf, c, 0}}}, true
	}
	return Linear{N: 3, P: [MaxPieces]Piece{
		{-inf, -e, 0, -p.bound},
		{-e, e, c, 0},
		{e, inf, 0, p.bound},
	}}, true
}

func (p box) HasZeroRegion() bool { return false }

// StartG: f'(x) = l2 x inside the box (the constraint itself exerts no pull), see pullStart.
func (p box) StartG(t float64) float64 {
	return pullStart(p.l2*2*math.Sqrt(t), t)
}

// huber is f(x) = l1 h_w(x) with h_w(x) = x^2/(2w) for |x| <= w and |x| - w/2 beyond: ridge
// with l2 = l1/w near zero, l1 far out. Its prox is linear with slope g/(g + l1/w) for
// |r| <= w + l1/g and r -+ l1/g beyond (Parikh & Boyd 2014, Proximal Algorithms, section 6.5.1,
// scaled by w).
type huber struct{ l1, width float64 }

// Huber returns l1 h_width(x) (l1 >= 0, width > 0, both finite).
//
// Special cases are: l1 = 0 gives the identity prox.
func Huber(l1, width float64) (Penalty, error) {
	if err := checkWeight("l1", l1); err != nil {
		return nil, err
	}
	if err := checkPositive("width", width); err != nil {
		return nil, err
	}
	return huber{l1, width}, nil
}

func (p huber) Name() string { return "huber" }

func (p huber) Prox(r, g float64) float64 {
	shift := p.l1 / g
	edge := p.width + shift
	switch {
	case r >= edge:
		return r - shift
	case r <= -edge:
		return r + shift
	}
	return g / (g + p.l1/p.width) * r
}

func (p huber) Deriv(r, g float64) float64 {
	l, _ := p.Linear(g)
	return l.at(r).Slope
}

func (p huber) Kinks(g float64) []float64 {
	l, _ := p.Linear(g)
	return l.kinks()
}

func (p huber) Pieces(g float64) ([]Piece, bool) {
	l, _ := p.Linear(g)
	return l.slice(), true
}

// Linear returns (-Inf, -e): r + l1/g; [-e, e): c r; [e, Inf): r - l1/g, with e = w + l1/g
// and c = g/(g + l1/w).
func (p huber) Linear(g float64) (Linear, bool) {
	inf := math.Inf(1)
	shift := p.l1 / g
	c := g / (g + p.l1/p.width)
	e := p.width + shift
	switch {
	case p.l1 == 0:
		return Linear{N: 1, P: [MaxPieces]Piece{{-inf, inf, 1, 0}}}, true
	case math.IsInf(e, 1):
		return Linear{N: 1, P: [MaxPieces]Piece{{-inf, inf, c, 0}}}, true
	}
	return Linear{N: 3, P: [MaxPieces]Piece{
		{-inf, -e, 1, shift},
		{-e, e, c, 0},
		{e, inf, 1, -shift},
	}}, true
}

func (p huber) HasZeroRegion() bool { return false }

// StartG: f'(x) = l1 min(x/w, 1) for x > 0, see pullStart.
func (p huber) StartG(t float64) float64 {
	return pullStart(p.l1*math.Min(2*math.Sqrt(t)/p.width, 1), t)
}
