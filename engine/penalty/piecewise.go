package penalty

import "math"

// Linear is the piecewise-linear form of a prox held by value: its pieces, left to right,
// tiling the real line. Up to four pieces are held without allocating, which keeps the hot
// path of package signal free of allocation; more spill into a slice, so a penalty may have
// as many pieces as it needs.
type Linear struct {
	n     int
	small [4]Piece
	more  []Piece
}

// Then appends the piece slope*r + intercept on [Lo, hi), where Lo is the end of the last
// piece (-Inf for the first). The last piece must end at +Inf. A piece that would be empty
// (hi <= Lo) is left out, so that a penalty may state pieces that vanish for some of its
// parameters.
func (l *Linear) Then(hi, slope, intercept float64) {
	lo := math.Inf(-1)
	if ps := l.Pieces(); len(ps) > 0 {
		lo = ps[len(ps)-1].Hi
	}
	if !(hi > lo) {
		return
	}
	p := Piece{Lo: lo, Hi: hi, Slope: slope, Intercept: intercept}
	switch {
	case l.more != nil:
		l.more = append(l.more, p)
	case l.n < len(l.small):
		l.small[l.n] = p
		l.n++
	default:
		l.more = append(append(make([]Piece, 0, 2*l.n), l.small[:l.n]...), p)
	}
}

// Pieces returns the pieces of l; the slice shares l's storage.
func (l *Linear) Pieces() []Piece {
	if l.more != nil {
		return l.more
	}
	return l.small[:l.n]
}

// at returns the piece of l containing r (pieces are [Lo, Hi), so a kink belongs to the
// piece on its right).
func (l *Linear) at(r float64) Piece {
	ps := l.Pieces()
	for _, p := range ps[:len(ps)-1] {
		if r < p.Hi {
			return p
		}
	}
	return ps[len(ps)-1]
}

// PiecewiseLinear is what a penalty whose prox is piecewise linear at every g states of its
// own: its name, strengths, pieces, whether it has a zero region and its start. FromPieces
// supplies the rest of Penalty from the pieces.
type PiecewiseLinear interface {
	Name() string
	Strengths() []Strength
	// Piecewise returns the prox at precision g as its pieces (docs/method.md section 7).
	Piecewise(g float64) Linear
	HasZeroRegion() bool
	StartG(t float64) float64
}

// FromPieces returns the Penalty of p: Prox, Deriv, Kinks, Pieces and Linear all read the
// pieces p states.
func FromPieces(p PiecewiseLinear) Penalty { return piecewise{p} }

type piecewise struct{ PiecewiseLinear }

// Prox evaluates the piece holding r. A flat piece returns its level, so that the prox of
// +-Inf on a flat outer piece (the box) is the level rather than 0*Inf.
func (p piecewise) Prox(r, g float64) float64 {
	l := p.Piecewise(g)
	return l.Prox(r)
}

// Prox returns the value at r of the prox that l describes: the Prox of its penalty at the
// precision l was made for, without building the pieces again (a solver that applies one
// prox to many coordinates builds them once).
func (l *Linear) Prox(r float64) float64 {
	if math.IsNaN(r) {
		return r
	}
	q := l.at(r)
	if q.Slope == 0 {
		return q.Intercept
	}
	return q.Slope*r + q.Intercept
}

func (p piecewise) Deriv(r, g float64) float64 {
	l := p.Piecewise(g)
	return l.at(r).Slope
}

// Kinks returns the interior boundaries where the slope changes.
func (p piecewise) Kinks(g float64) []float64 {
	l := p.Piecewise(g)
	ps := l.Pieces()
	k := []float64{}
	for i := 1; i < len(ps); i++ {
		if ps[i].Slope != ps[i-1].Slope {
			k = append(k, ps[i].Lo)
		}
	}
	return k
}

func (p piecewise) Pieces(g float64) ([]Piece, bool) {
	l := p.Piecewise(g)
	return append([]Piece(nil), l.Pieces()...), true
}

func (p piecewise) Linear(g float64) (Linear, bool) { return p.Piecewise(g), true }
