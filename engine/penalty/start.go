package penalty

import "math"

// pullStart returns the first g1 of the fixed point for a penalty whose pull at x = 2 sqrt(t)
// is fprime, the right derivative f'(2 sqrt(t)).
//
// The rule: choose g1 so that the prox pulls an entry of two channel standard deviations by
// exactly two standard deviations, f'(2 sd)/g1 = 2 sd. For the l1 penalty this is
// g1 = l1 / (2 sqrt(t)), the threshold at two standard deviations of docs/method.md section 3
// (from that sparse start the iteration converged on 640 of 648 cases where g1 = 1 ran off);
// for the other penalties it is the same rule, continuous in their parameters (for the power
// penalty, continuous in q from the l1 start at q = 1 to the ridge start g1 = l2 at q = 2).
// When the penalty does not pull at all there (zero weights), g1 = 1/t, the precision of the
// channel; when t is not a positive finite number, 1.
func pullStart(fprime, t float64) float64 {
	if !(t > 0) || math.IsInf(t, 0) {
		return 1
	}
	twoSD := 2 * math.Sqrt(t)
	if g := fprime / twoSD; g > 0 && !math.IsInf(g, 0) {
		return g
	}
	if g := 1 / t; !math.IsInf(g, 0) {
		return g
	}
	return 1
}
