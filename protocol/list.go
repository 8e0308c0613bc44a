package protocol

import (
	"slices"
	"strconv"
)

// ShortList returns values written in at most budget characters the way a list box shows
// them (each value in its shortest form, 'g' -1, separated by ", "): the values as they are
// if they fit; else each rounded to the most significant digits (down to 6) that fit; else
// n evenly spaced quantiles of the sorted values (levels (i + 1/2)/n), at 6 digits, with n
// as large as fits. digits is 0 when the values are unrounded and thinned is set when
// they were thinned. The page's renderer cannot put a longer text into a box.
// Special cases are: an empty list is returned as is; budget below 64 is taken as 64.
func ShortList(values []float64, budget int) (out []float64, digits int, thinned bool) {
	budget = max(budget, 64)
	if len(values) == 0 || listLen(values) <= budget {
		return values, 0, false
	}
	for d := 16; d >= 6; d-- {
		r := roundList(values, d)
		if listLen(r) <= budget {
			return r, d, false
		}
	}
	sorted := slices.Clone(values)
	slices.Sort(sorted)
	r := roundList(sorted, 6)
	n := max(1, len(values)*budget/listLen(r))
	for n > 1 {
		r = roundList(Quantiles(sorted, n), 6)
		if listLen(r) <= budget {
			break
		}
		n = n * 9 / 10
	}
	return r, 6, true
}

func roundList(v []float64, digits int) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i], _ = strconv.ParseFloat(strconv.FormatFloat(x, 'g', digits, 64), 64)
	}
	return out
}

func listLen(v []float64) int {
	n := 2 * (len(v) - 1)
	for _, x := range v {
		n += len(strconv.FormatFloat(x, 'g', -1, 64))
	}
	return n
}

// Quantiles returns k quantiles of sorted data at levels (i + 1/2)/k, by linear
// interpolation between order statistics (Hyndman & Fan 1996, Am. Stat. 50(4), type 7 on
// the 0-based positions p (n - 1)).
func Quantiles(sorted []float64, k int) []float64 {
	n := len(sorted)
	q := make([]float64, k)
	for i := range q {
		pos := (float64(i) + 0.5) / float64(k) * float64(n-1)
		j := int(pos)
		f := pos - float64(j)
		if j+1 < n {
			q[i] = sorted[j] + f*(sorted[j+1]-sorted[j])
		} else {
			q[i] = sorted[n-1]
		}
	}
	return q
}
