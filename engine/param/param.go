// Package param states the parameters of the engine's registries once: the design shapes,
// the signal laws and the penalty kinds each list their numbers as a Param, and the
// scenario decoder, the command line and the page's editor read them from there. It also
// holds the one error type of the engine, Error, which names the field and the reason.
package param

import (
	"fmt"
	"math"
	"strconv"
)

// Role says what a parameter does, so that a study can find "the penalty's strengths"
// without knowing their names.
type Role uint8

const (
	// Other is a parameter with none of the roles below (a probability, a count).
	Other Role = iota
	// Strength weighs a term of a penalty: 0 switches the term off, larger values
	// regularize more. Studies tune strengths.
	Strength
	// Shape changes the form of a law or a penalty (an exponent, degrees of freedom, a
	// condition number) rather than its size.
	Shape
	// Scale is a size in the units of the quantity (a width, a bound, a variance, a
	// singular value).
	Scale
)

// String returns the role's name: "other", "strength", "shape" or "scale".
func (r Role) String() string {
	switch r {
	case Strength:
		return "strength"
	case Shape:
		return "shape"
	case Scale:
		return "scale"
	}
	return "other"
}

// Param describes one number, or one list of numbers, of a registry entry. The domain of a
// number (of each entry, for a list) is the interval from Min to Max, with each end
// excluded when MinOpen or MaxOpen is set; Min may be -Inf and Max +Inf (then open).
// Rules that tie parameters together (min <= max) are left to the constructors.
type Param struct {
	Name  string // the key in the scenario file, e.g. "l1"
	Label string // the quantity in a few words, for axes and menus; Help when empty
	Unit  string // e.g. "loss per unit of |x|"; empty for a pure number
	Help  string // one line, plain words

	Min, Max         float64
	MinOpen, MaxOpen bool

	Log      bool // a sweep over it is best spaced logarithmically
	List     bool // a list of numbers rather than one number
	MaxLen   int  // the longest list accepted (lists only)
	Optional bool // may be left out; Default is then used
	Default  float64
	Role     Role
}

// Title returns Label, or Help when no label is stated.
func (p Param) Title() string {
	if p.Label != "" {
		return p.Label
	}
	return p.Help
}

// Contains reports whether x lies in the domain of p (of each entry, for a list).
// NaN is never contained.
func (p Param) Contains(x float64) bool {
	return !(math.IsNaN(x) || x < p.Min || x > p.Max || (p.MinOpen && x == p.Min) || (p.MaxOpen && x == p.Max))
}

// Check returns nil when x is a finite number in the domain of p, else an *Error under
// field (the caller's name for the value, e.g. "penalty.l1" or "signal.weights[3]").
func (p Param) Check(field string, x float64) error {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return &Error{Field: field, Reason: "must be a finite number"}
	}
	if !p.Contains(x) {
		return &Error{Field: field, Reason: "must be in " + p.Interval() + ", not " + num(x)}
	}
	return nil
}

// Interval returns the domain as an interval, e.g. "[0, +Inf)" or "(0, 1]".
func (p Param) Interval() string {
	l, r := "[", "]"
	if p.MinOpen {
		l = "("
	}
	if p.MaxOpen {
		r = ")"
	}
	return l + num(p.Min) + ", " + num(p.Max) + r
}

// Range states the domain in words, e.g. "in (0, 1]", "≥ 0", "each > 0, at most 100000
// numbers".
func (p Param) Range() string {
	r := p.ScalarRange()
	if p.List {
		r = "each " + r
		if p.MaxLen > 0 {
			r += fmt.Sprintf(", at most %d numbers", p.MaxLen)
		}
	}
	return r
}

// ScalarRange states the domain of one number in words: "in [a, b]" when both ends are
// finite, "> a", "≥ a", "< b" or "≤ b" when one is, "any number" when neither is.
func (p Param) ScalarRange() string {
	lo, hi := !math.IsInf(p.Min, -1), !math.IsInf(p.Max, 1)
	switch {
	case lo && hi:
		return "in " + p.Interval()
	case lo && p.MinOpen:
		return "> " + num(p.Min)
	case lo:
		return "≥ " + num(p.Min)
	case hi && p.MaxOpen:
		return "< " + num(p.Max)
	case hi:
		return "≤ " + num(p.Max)
	}
	return "any number"
}

func num(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
