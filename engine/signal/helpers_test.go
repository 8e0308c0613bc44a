package signal

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/integrate/quad"
)

// integrate returns int_a^b f by 20-point Gauss-Legendre (gonum quad.Fixed with quad.Legendre)
// on sub-intervals of length at most h, split at the given points, so that f is smooth on
// every sub-interval.
func integrate(f func(float64) float64, a, b, h float64, splits ...float64) float64 {
	cuts := []float64{a, b}
	for _, s := range splits {
		if s > a && s < b {
			cuts = append(cuts, s)
		}
	}
	slices.Sort(cuts)
	cuts = slices.Compact(cuts)
	sum := 0.0
	for i := 1; i < len(cuts); i++ {
		n := int(math.Ceil((cuts[i] - cuts[i-1]) / h))
		w := (cuts[i] - cuts[i-1]) / float64(n)
		for j := range n {
			lo := cuts[i-1] + float64(j)*w
			sum += quad.Fixed(f, lo, lo+w, 20, quad.Legendre{}, 0)
		}
	}
	return sum
}

func normPDF(y float64) float64 { return math.Exp(-y*y/2) / math.Sqrt(2*math.Pi) }

// must returns v, and stops the test binary when a constructor refuses parameters that the
// test means to be valid (a bug in the test or the constructor).
func must[T any](v T, err error) T {
	if err != nil {
		panic(err)
	}
	return v
}

// close reports |got - want| <= tol * max(|want|, floor).
func close(got, want, tol, floor float64) bool {
	return math.Abs(got-want) <= tol*math.Max(math.Abs(want), floor)
}
