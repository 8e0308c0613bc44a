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
	return FromPieces(box{bound, l2}), nil
}

func (p box) Name() string { return "box" }

func (p box) Strengths() []Strength { return []Strength{{"l2", p.l2}} }

// Piecewise returns (-Inf, -b/c): -b; [-b/c, b/c): c r; [b/c, Inf): b, with c = g/(g + l2).
func (p box) Piecewise(g float64) Linear {
	c := g / (g + p.l2)
	e := p.bound / c
	inf := math.Inf(1)
	var l Linear
	if math.IsInf(e, 1) {
		l.Then(inf, c, 0)
		return l
	}
	l.Then(-e, 0, -p.bound)
	l.Then(e, c, 0)
	l.Then(inf, 0, p.bound)
	return l
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
	return FromPieces(huber{l1, width}), nil
}

func (p huber) Name() string { return "huber" }

func (p huber) Strengths() []Strength { return []Strength{{"l1", p.l1}} }

// Piecewise returns (-Inf, -e): r + l1/g; [-e, e): c r; [e, Inf): r - l1/g, with e = w + l1/g
// and c = g/(g + l1/w).
func (p huber) Piecewise(g float64) Linear {
	inf := math.Inf(1)
	shift := p.l1 / g
	c := g / (g + p.l1/p.width)
	e := p.width + shift
	var l Linear
	switch {
	case p.l1 == 0:
		l.Then(inf, 1, 0)
	case math.IsInf(e, 1):
		l.Then(inf, c, 0)
	default:
		l.Then(-e, 1, shift)
		l.Then(e, c, 0)
		l.Then(inf, 1, -shift)
	}
	return l
}

func (p huber) HasZeroRegion() bool { return false }

// StartG: f'(x) = l1 min(x/w, 1) for x > 0, see pullStart.
func (p huber) StartG(t float64) float64 {
	return pullStart(p.l1*math.Min(2*math.Sqrt(t)/p.width, 1), t)
}
