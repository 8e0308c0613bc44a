package data

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"
)

func TestReadValues(t *testing.T) {
	for _, c := range []struct {
		in   string
		want []float64
	}{
		{"1\n2\n3\n", []float64{1, 2, 3}},
		{"1, 2;3\t4 5\r\n6", []float64{1, 2, 3, 4, 5, 6}},
		{"\xef\xbb\xbf# samples, invented\n\nx\n-1.5\n  2e-3 \n", []float64{-1.5, 2e-3}},
		{"sv value\n3 4\n", []float64{3, 4}},
		{`"1.5","2"`, []float64{1.5, 2}},
		{"1e-400", []float64{0}},
	} {
		got, err := ReadValues(strings.NewReader(c.in), Limits{})
		if err != nil || !slices.Equal(got, c.want) {
			t.Errorf("%q: %v %v, want %v", c.in, got, err, c.want)
		}
	}
}

func TestReadValuesErrors(t *testing.T) {
	for _, c := range []struct{ in, msg string }{
		{"", "the input holds no numbers"},
		{"# nothing\n", "the input holds no numbers"},
		{"x\n", "the input holds no numbers"},
		{"1\n2\nabc\n", `line 3: "abc" is not a number`},
		{"x 1\n", `line 1: "x" is not a number`},
		{"x\ny\n", `line 2: "y" is not a number`},
		{"1,,2\n", "line 1: a field is empty"},
		{",1\n", "line 1: a field is empty"},
		{"1\n2,\n3\n", "line 2: the line ends with a separator and no number after it"},
		{"1,", "line 1: the line ends with a separator and no number after it"},
		{"1\n\n-nan\n", "line 3: NaN is not allowed"},
		{"1 +Infinity", "line 1: Inf is not allowed"},
		{"1e999", `line 1: "1e999" is out of the range of float64`},
		{strings.Repeat("7", 600), "line 1: a field is longer than 512 characters"},
		{"1 2 3 4", "line 1: more than the cap of 3 numbers"},
	} {
		_, err := ReadValues(strings.NewReader(c.in), Limits{MaxEntries: 3})
		var le *LineError
		if !errors.As(err, &le) || err.Error() != c.msg {
			t.Errorf("%.40q: got %v, want %s", c.in, err, c.msg)
		}
	}
}

func TestReadSpectrum(t *testing.T) {
	sv, err := ReadSpectrum(strings.NewReader("1 3 2 0"), false, Limits{})
	if err != nil || !slices.Equal(sv, []float64{3, 2, 1, 0}) {
		t.Errorf("singular values: %v %v", sv, err)
	}
	// Eigenvalues of F^T F are squared singular values; a rounding negative reads as 0.
	sv, err = ReadSpectrum(strings.NewReader("4\n9\n0.25\n-1e-15\n"), true, Limits{})
	if err != nil || !slices.Equal(sv, []float64{3, 2, 0.5, 0}) {
		t.Errorf("eigenvalues: %v %v", sv, err)
	}
	for _, c := range []struct {
		in    string
		eigen bool
		msg   string
	}{
		{"1\n-0.5\n", false, "line 2: the singular value -0.5 is negative"},
		{"1\n-1e-15\n", false, "line 2: the singular value -1e-15 is negative"},
		{"4\n9\n-0.001\n", true, "line 3: the eigenvalue -0.001 is negative"},
	} {
		if _, err := ReadSpectrum(strings.NewReader(c.in), c.eigen, Limits{}); err == nil || err.Error() != c.msg {
			t.Errorf("%q: got %v, want %s", c.in, err, c.msg)
		}
	}
}

func TestHistogram(t *testing.T) {
	h, err := NewHistogram([]float64{0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10}, 5)
	if err != nil {
		t.Fatal(err)
	}
	// Bins of width 2: [0, 2), [2, 4), [4, 6), [6, 8), [8, 10]; values on an edge
	// go to the bin it opens, the top value to the last bin.
	if !slices.Equal(h.Counts, []int{2, 2, 2, 2, 3}) {
		t.Errorf("counts %v", h.Counts)
	}
	area := 0.0
	for k, d := range h.Density {
		area += d * (h.Edges[k+1] - h.Edges[k])
	}
	if math.Abs(area-1) > 1e-12 {
		t.Errorf("density integrates to %g", area)
	}
	one, err := NewHistogram([]float64{1, 1, 1}, 0)
	if err != nil || one.Edges[0] != 0.5 || one.Edges[len(one.Edges)-1] != 1.5 || one.Counts[len(one.Counts)/2] != 3 {
		t.Errorf("single value: %+v %v", one, err)
	}
	auto, _ := NewHistogram(make([]float64, 10001), 0)
	if len(auto.Counts) != 100 {
		t.Errorf("automatic bins %d, want 100", len(auto.Counts))
	}
	wide, err := NewHistogram([]float64{-math.MaxFloat64, 0, math.MaxFloat64}, 2)
	if err != nil || !slices.Equal(wide.Counts, []int{1, 2}) {
		t.Errorf("full float range: %+v %v", wide, err)
	}
	for _, bad := range []struct {
		x    []float64
		bins int
	}{{nil, 1}, {[]float64{1}, -1}, {[]float64{1}, 1001}, {[]float64{math.NaN()}, 1}, {[]float64{math.Inf(-1)}, 1}} {
		if _, err := NewHistogram(bad.x, bad.bins); err == nil {
			t.Errorf("NewHistogram(%v, %d) accepted", bad.x, bad.bins)
		}
	}
}
