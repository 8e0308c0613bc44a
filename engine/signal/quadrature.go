package signal

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/integrate/quad"

	"hdrisk/engine/penalty"
)

const (
	// quadSpan is the half-width, in standard deviations, of the range of r integrated for each
	// component; the normal mass outside is 2 Q(12) < 4e-33.
	quadSpan = 12
	// quadNodes is the number of Gauss-Legendre nodes on each sub-interval of at most one
	// standard deviation, where the integrands are smooth.
	quadNodes = 16
)

// grading holds the ratios 4^-k, k = 1..26: for a prox that is not piecewise linear, the
// sub-intervals next to r = 0 shrink geometrically towards it, where prox' may behave like a
// small power of |r| (for |x|^q with q near 2, like |r|^((2-q)/(q-1))) and a fixed rule on an
// interval touching 0 would converge only algebraically. On [a, 4a] such a power is analytic
// well beyond the interval, so each piece is integrated to rounding error. Away from 0 such a
// prox can still turn quickly (|x|^q with q near 1 is a smoothed soft threshold, turning over
// about a tenth of its threshold), so its sub-intervals are a quarter of a standard deviation.
var grading = func() []float64 {
	d := make([]float64, 26)
	for k := range d {
		d[k] = math.Pow(4, -float64(k+1))
	}
	return d
}()

// legendre holds the quadNodes-point Gauss-Legendre rule on [-1, 1] (gonum quad.Legendre).
var legendreX, legendreW = func() ([]float64, []float64) {
	x := make([]float64, quadNodes)
	w := make([]float64, quadNodes)
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	return x, w
}()

// ExpectQuad returns the same moments as Expect by quadrature, for any penalty: for each
// component x0 ~ N(mu, s2) it integrates over r ~ N(mu, s2 + t) within mu +- 12 standard
// deviations, split at p.Kinks(g) and at r = 0 (where the prox of a symmetric penalty may be
// non-smooth although its derivative does not jump, as for |x|^q; when the prox is not
// piecewise linear the sub-intervals also shrink geometrically towards 0 and are at most a
// quarter of a standard deviation, see grading), then into sub-intervals of at most one
// standard deviation, each by 16-point Gauss-Legendre (gonum quad.Legendre), using
// p.Prox and p.Deriv. Nodes are interior to the sub-intervals, so no node falls on a kink. The
// MSE uses the same posterior split as Expect: E[(prox(r) - E[x0|r])^2] + s2 t / (s2 + t).
//
// Special cases are: as for Expect.
func ExpectQuad(l Law, p penalty.Penalty, g, t float64) Moments {
	if !(g > 0) || !(t >= 0) {
		return nanMoments()
	}
	splits := append(slices.Clone(p.Kinks(g)), 0)
	_, linear := p.Pieces(g)
	graded := !linear
	// A prox without a zero region is nonzero but at isolated points, so the fraction is
	// exactly 1 even where the computed prox underflows to 0 (|x|^q with q near 1 inside
	// the threshold).
	zeroRegion := p.HasZeroRegion()
	var m Moments
	for _, c := range componentsOf(l) {
		active := c.active()
		if active {
			m.Active += c.Weight
		}
		v := c.Var + t
		if v == 0 {
			xhat := p.Prox(c.Mean, g)
			m.MSE += c.Weight * (xhat - c.Mean) * (xhat - c.Mean)
			m.A += c.Weight * p.Deriv(c.Mean, g)
			if xhat != 0 {
				m.NonZero += c.Weight
				if active {
					m.TruePos += c.Weight
				}
			}
			continue
		}
		sd := math.Sqrt(v)
		beta := c.Var / v
		lo, hi := c.Mean-quadSpan*sd, c.Mean+quadSpan*sd
		width := sd
		if graded {
			width = sd / 4
		}
		cuts := []float64{lo, hi}
		for _, k := range splits {
			if k > lo && k < hi {
				cuts = append(cuts, k)
			}
		}
		if graded {
			for _, d := range grading {
				for _, k := range [2]float64{-d * sd, d * sd} {
					if k > lo && k < hi {
						cuts = append(cuts, k)
					}
				}
			}
		}
		slices.Sort(cuts)
		cuts = slices.Compact(cuts)
		var mse, a, nz float64
		// Sub-intervals below the rounding of their position add nothing but time.
		width = math.Max(width, 1e-14*math.Max(math.Abs(lo), math.Abs(hi)))
		for i := 1; i < len(cuts); i++ {
			n := int(math.Ceil((cuts[i] - cuts[i-1]) / width))
			h := (cuts[i] - cuts[i-1]) / float64(n)
			for j := range n {
				left := cuts[i-1] + float64(j)*h
				for k, x := range legendreX {
					r := left + (x+1)*h/2
					y := (r - c.Mean) / sd
					w := legendreW[k] * h / 2 * math.Exp(-y*y/2) / (sd * math.Sqrt(2*math.Pi))
					xhat := p.Prox(r, g)
					d := xhat - (c.Mean + beta*(r-c.Mean))
					mse += w * d * d
					a += w * p.Deriv(r, g)
					if xhat != 0 || !zeroRegion {
						nz += w
					}
				}
			}
		}
		m.MSE += c.Weight * (mse + c.Var*t/v)
		m.A += c.Weight * a
		m.NonZero += c.Weight * nz
		if active {
			m.TruePos += c.Weight * nz
		}
	}
	return m
}
