package plot

import (
	"math"
	"slices"
	"strconv"
	"strings"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
)

// ticker places the ticks of one axis at round numbers (1, 2 or 5 times a power of ten
// apart, decades on a log axis), always labelling the values in must that lie in range (the
// thresholds a study names, such as m/n = 1) and 0 when it is in range. It knows the
// length of the axis and the style of its labels, so that it picks the finest step whose
// labels keep clear of each other.
type ticker struct {
	log      bool
	vertical bool
	must     []float64
	length   vg.Length // of the data area along the axis
	style    text.Style
	// The ticks of the last range and length asked for: gonum asks for them many times while
	// it lays a figure out, and each answer measures its labels.
	memo struct {
		lo, hi float64
		length vg.Length
		ticks  []gplot.Tick
	}
}

// gap is the least room between two neighbouring labels, in points.
func (t ticker) gap() vg.Length { return t.style.Font.Size * 0.9 }

// fits reports whether labels at values vs (between lo and hi) keep clear of each other.
func (t ticker) fits(lo, hi float64, vs []float64, labels []string) bool {
	if t.length <= 0 {
		return len(vs) <= 7
	}
	pos := func(v float64) vg.Length { return vg.Length(fraction(lo, hi, v, t.log)) * t.length }
	for i := 1; i < len(vs); i++ {
		d := pos(vs[i]) - pos(vs[i-1])
		var need vg.Length
		if t.vertical {
			need = t.style.Font.Size*1.2 + t.gap()*1.5
		} else {
			need = (t.style.Width(labels[i])+t.style.Width(labels[i-1]))/2 + t.gap()
		}
		if d < need {
			return false
		}
	}
	return true
}

// Ticks implements gonum's Ticker.
func (t *ticker) Ticks(lo, hi float64) []gplot.Tick {
	if m := &t.memo; m.ticks != nil && m.lo == lo && m.hi == hi && m.length == t.length {
		return m.ticks
	}
	ts := t.ticks(lo, hi)
	t.memo.lo, t.memo.hi, t.memo.length, t.memo.ticks = lo, hi, t.length, ts
	return ts
}

func (t *ticker) ticks(lo, hi float64) []gplot.Tick {
	if !(hi > lo) {
		return []gplot.Tick{{Value: lo, Label: label(lo)}}
	}
	var major, minor []float64
	if t.log && hi >= 10*lo {
		major, minor = t.decades(lo, hi)
	} else {
		major, minor = t.steps(lo, hi)
	}
	var must []float64
	for _, m := range t.must {
		if m >= lo && m <= hi && (!t.log || m > 0) {
			must = append(must, m)
		}
	}
	if !t.log && lo <= 0 && hi >= 0 {
		must = append(must, 0)
	}
	// A must value takes the place of the round labels that would crowd it.
	labelled := map[float64]bool{}
	for _, m := range must {
		labelled[m] = true
	}
	for _, v := range major {
		if labelled[v] {
			continue
		}
		vs := []float64{v}
		for m := range labelled {
			vs = append(vs, m)
		}
		slices.Sort(vs)
		ls := make([]string, len(vs))
		for i, x := range vs {
			ls[i] = label(x)
		}
		if t.fits(lo, hi, vs, ls) {
			labelled[v] = true
		} else {
			minor = append(minor, v)
		}
	}
	var out []gplot.Tick
	for v := range labelled {
		out = append(out, gplot.Tick{Value: v, Label: label(v)})
	}
	for _, v := range minor {
		if !labelled[v] {
			out = append(out, gplot.Tick{Value: v})
		}
	}
	slices.SortFunc(out, func(a, b gplot.Tick) int {
		switch {
		case a.Value < b.Value:
			return -1
		case a.Value > b.Value:
			return 1
		}
		return 0
	})
	return out
}

// steps returns the multiples of the finest round linear step whose labels fit (a linear
// axis reads well without minor ticks; a log axis needs them to show its scale).
func (t ticker) steps(lo, hi float64) (major, minor []float64) {
	for _, step := range candidates(hi - lo) {
		if (hi-lo)/step > 13 {
			continue
		}
		vs := multiples(lo, hi, step)
		if len(vs) < 2 && step < hi-lo {
			continue
		}
		ls := make([]string, len(vs))
		for i, v := range vs {
			ls[i] = label(v)
		}
		if len(vs) <= 12 && t.fits(lo, hi, vs, ls) {
			return vs, nil
		}
	}
	return []float64{lo, hi}, nil
}

// decades returns the powers of ten in range (every second or third one when they crowd
// each other) and the multiples 2..9 of each decade as unlabelled ticks.
func (t ticker) decades(lo, hi float64) (major, minor []float64) {
	k0, k1 := int(math.Floor(math.Log10(lo)+1e-9)), int(math.Ceil(math.Log10(hi)-1e-9))
	for every := 1; every <= 6; every++ {
		major = major[:0]
		for k := k0; k <= k1; k++ {
			v := pow10(k)
			if v >= lo*(1-1e-9) && v <= hi*(1+1e-9) && k%every == 0 {
				major = append(major, v)
			}
		}
		ls := make([]string, len(major))
		for i, v := range major {
			ls[i] = label(v)
		}
		if t.fits(lo, hi, major, ls) {
			break
		}
	}
	// Two decades or fewer leave few labels: 2 and 5 times each power of ten are labelled
	// too when they fit.
	if len(major) < 3 {
		var more []float64
		for k := k0; k <= k1; k++ {
			for _, m := range []float64{1, 2, 5} {
				if v := m * pow10(k); v >= lo*(1-1e-9) && v <= hi*(1+1e-9) {
					more = append(more, v)
				}
			}
		}
		ls := make([]string, len(more))
		for i, v := range more {
			ls[i] = label(v)
		}
		if t.fits(lo, hi, more, ls) {
			major = more
		}
	}
	for k := k0; k <= k1; k++ {
		for m := 1; m <= 9; m++ {
			v := float64(m) * pow10(k)
			if v >= lo*(1-1e-9) && v <= hi*(1+1e-9) && !slices.Contains(major, v) {
				minor = append(minor, v)
			}
		}
	}
	return major, minor
}

// candidates lists the round steps 1, 2, 5 x 10^k from about a hundredth of span upwards.
func candidates(span float64) []float64 {
	k := int(math.Floor(math.Log10(span))) - 2
	var out []float64
	for ; len(out) < 15; k++ {
		for _, m := range []float64{1, 2, 5} {
			out = append(out, m*pow10(k))
		}
	}
	return out
}

// multiples returns the multiples of step in [lo, hi], rounded to the step's precision.
func multiples(lo, hi, step float64) []float64 {
	var out []float64
	for i := math.Ceil(lo/step - 1e-9); i*step <= hi+step*1e-9; i++ {
		out = append(out, clean(i*step, step))
	}
	return out
}

// clean rounds v to a tenth of step, so that 0.1*3 reads 0.3 and -0 reads 0.
func clean(v, step float64) float64 {
	d := math.Max(0, -math.Floor(math.Log10(step))+1)
	p := math.Pow(10, d)
	r := math.Round(v*p) / p
	if r == 0 {
		return 0
	}
	return r
}

func pow10(k int) float64 {
	v, _ := strconv.ParseFloat("1e"+strconv.Itoa(k), 64)
	return v
}

// label formats a tick value: plainly between 1e-3 and 1e5, as 1e-4 beyond.
func label(v float64) string {
	if v == 0 {
		return "0"
	}
	a := math.Abs(v)
	if a >= 1e-3 && a < 1e5 {
		return strconv.FormatFloat(v, 'f', -1, 64)
	}
	s := strconv.FormatFloat(v, 'e', -1, 64)
	s = strings.Replace(s, "e+0", "e", 1)
	s = strings.Replace(s, "e-0", "e-", 1)
	return strings.Replace(s, "e+", "e", 1)
}

// niceRange widens [lo, hi] to round ends: the neighbouring multiples of a step of about a
// sixth of the span on a linear axis, the neighbouring 1, 2 or 5 x 10^k on a log axis.
// Special cases are: an empty or degenerate range is returned as it is.
func niceRange(lo, hi float64, log bool) (float64, float64) {
	if !(hi > lo) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return lo, hi
	}
	if log {
		if !(lo > 0) {
			return lo, hi
		}
		down := func(v float64) float64 {
			k := math.Floor(math.Log10(v) + 1e-9)
			for _, m := range []float64{5, 2, 1} {
				if m*math.Pow(10, k) <= v*(1+1e-9) {
					return m * math.Pow(10, k)
				}
			}
			return math.Pow(10, k)
		}
		up := func(v float64) float64 {
			k := math.Floor(math.Log10(v) - 1e-9)
			for _, m := range []float64{1, 2, 5, 10} {
				if m*math.Pow(10, k) >= v*(1-1e-9) {
					return m * math.Pow(10, k)
				}
			}
			return math.Pow(10, k+1)
		}
		return down(lo), up(hi)
	}
	step := candidates(hi - lo)[0]
	for _, s := range candidates(hi - lo) {
		if (hi-lo)/s <= 8 {
			step = s
			break
		}
	}
	return clean(math.Floor(lo/step+1e-9)*step, step), clean(math.Ceil(hi/step-1e-9)*step, step)
}
