package param

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

func TestCheckAndRange(t *testing.T) {
	inf := math.Inf(1)
	tests := []struct {
		p          Param
		in, out    []float64
		interval   string
		words      string
		listSuffix string
	}{
		{Param{Max: inf, MaxOpen: true}, []float64{0, 1e300}, []float64{-1e-300, math.NaN()}, "[0, +Inf)", "≥ 0", ""},
		{Param{Max: inf, MinOpen: true, MaxOpen: true}, []float64{1e-300}, []float64{0}, "(0, +Inf)", "> 0", ""},
		{Param{Min: 0, Max: 1, MinOpen: true}, []float64{1, 0.5}, []float64{0, 1.0000001}, "(0, 1]", "in (0, 1]", ""},
		{Param{Min: -inf, Max: 3}, []float64{-1e300, 3}, []float64{3.5}, "[-Inf, 3]", "≤ 3", ""},
		{Param{Min: -inf, Max: 3, MinOpen: true, MaxOpen: true}, []float64{2.9}, []float64{3}, "(-Inf, 3)", "< 3", ""},
		{Param{Min: -inf, Max: inf, MinOpen: true, MaxOpen: true, List: true, MaxLen: 7}, []float64{-5, 5}, nil, "(-Inf, +Inf)", "any number", "each any number, at most 7 numbers"},
	}
	for _, tc := range tests {
		for _, x := range tc.in {
			if !tc.p.Contains(x) || tc.p.Check("f", x) != nil {
				t.Errorf("%s: %v refused", tc.interval, x)
			}
		}
		for _, x := range tc.out {
			if tc.p.Contains(x) {
				t.Errorf("%s: %v accepted", tc.interval, x)
			}
			var e *Error
			if err := tc.p.Check("penalty.l1", x); !errors.As(err, &e) || e.Field != "penalty.l1" {
				t.Errorf("%s: Check(%v) = %v, want an *Error for penalty.l1", tc.interval, x, err)
			}
		}
		if got := tc.p.Interval(); got != tc.interval {
			t.Errorf("Interval = %q, want %q", got, tc.interval)
		}
		if got := tc.p.ScalarRange(); got != tc.words {
			t.Errorf("%s: ScalarRange = %q, want %q", tc.interval, got, tc.words)
		}
		if tc.listSuffix != "" && tc.p.Range() != tc.listSuffix {
			t.Errorf("%s: Range = %q, want %q", tc.interval, tc.p.Range(), tc.listSuffix)
		}
	}
	p := Param{Max: inf, MaxOpen: true}
	if err := p.Check("l1", -2); err == nil || err.Error() != "l1: must be in [0, +Inf), not -2" {
		t.Errorf("Check(-2) = %v", err)
	}
	if err := p.Check("l1", math.Inf(1)); err == nil || err.Error() != "l1: must be a finite number" {
		t.Errorf("Check(+Inf) = %v", err)
	}
}

func TestUnder(t *testing.T) {
	tests := []struct {
		prefix string
		err    error
		want   string
	}{
		{"penalty", &Error{Field: "l1", Reason: "r"}, "penalty.l1: r"},
		{"signal.weights", &Error{Field: "[3]", Reason: "r"}, "signal.weights[3]: r"},
		{"noise", &Error{Reason: "r"}, "noise: r"},
		{"", &Error{Field: "x", Reason: "r"}, "x: r"},
		{"design", fmt.Errorf("wrapped: %w", &Error{Field: "min", Reason: "r"}), "design.min: r"},
		{"design", errors.New("plain"), "design: plain"},
	}
	for _, tc := range tests {
		err := Under(tc.prefix, tc.err)
		var e *Error
		if !errors.As(err, &e) || err.Error() != tc.want {
			t.Errorf("Under(%q, %v) = %v, want the *Error %q", tc.prefix, tc.err, err, tc.want)
		}
	}
	if Under("x", nil) != nil {
		t.Error("Under(x, nil) is not nil")
	}
}

func TestRoleString(t *testing.T) {
	for r, want := range map[Role]string{Other: "other", Strength: "strength", Shape: "shape", Scale: "scale"} {
		if r.String() != want {
			t.Errorf("Role(%d) = %q, want %q", r, r, want)
		}
	}
}

func TestGather(t *testing.T) {
	ps := []Param{{Name: "a"}, {Name: "b", Optional: true, Default: 7}, {Name: "v", List: true}, {Name: "w", List: true, Optional: true}}
	v, l, err := Gather("shape x", ps, map[string]float64{"a": 1}, map[string][]float64{"v": {2, 3}})
	if err != nil || v["a"] != 1 || v["b"] != 7 || len(l["v"]) != 2 {
		t.Errorf("Gather = %v, %v, %v", v, l, err)
	}
	if _, ok := l["w"]; ok {
		t.Error("an optional list left out was filled in")
	}
	for _, c := range []struct {
		nums         map[string]float64
		lists        map[string][]float64
		field, error string
	}{
		{nil, map[string][]float64{"v": {1}}, "a", "a: missing (shape x needs it)"},
		{map[string]float64{"a": 1}, nil, "v", "v: missing (shape x needs it)"},
		{map[string]float64{"a": 1, "v": 2}, nil, "v", "v: must be a list of numbers"},
		{map[string]float64{}, map[string][]float64{"a": {1}, "v": {1}}, "a", "a: must be a single number"},
		{map[string]float64{"a": 1, "zz": 1}, map[string][]float64{"v": {1}}, "zz", "zz: not a parameter of shape x (its parameters: a, b, v, w)"},
		{map[string]float64{"a": 1}, map[string][]float64{"v": {1}, "q": {1}}, "q", "q: not a parameter of shape x (its parameters: a, b, v, w)"},
	} {
		_, _, err := Gather("shape x", ps, c.nums, c.lists)
		var e *Error
		if !errors.As(err, &e) || e.Field != c.field || err.Error() != c.error {
			t.Errorf("Gather(%v, %v) = %v, want %q", c.nums, c.lists, err, c.error)
		}
	}
	if Names(nil) != "none" {
		t.Errorf("Names(nil) = %q", Names(nil))
	}
}

func TestFind(t *testing.T) {
	names := []string{"l1", "ridge"}
	name := func(i int) string { return names[i] }
	if i, err := Find("kind", "penalty", "ridge", len(names), name); i != 1 || err != nil {
		t.Errorf("ridge: %d, %v", i, err)
	}
	_, err := Find("kind", "penalty", "lasso", len(names), name)
	if want := `kind: unknown penalty "lasso" (known: l1, ridge)`; err == nil || err.Error() != want {
		t.Errorf("lasso: %v, want %s", err, want)
	}
}

func TestLookup(t *testing.T) {
	type entry struct {
		name string
		ps   []Param
	}
	entries := []entry{{"l1", []Param{{Name: "l1", Max: math.Inf(1)}}}, {"ridge", []Param{{Name: "l2", Max: math.Inf(1)}}}}
	parts := func(e entry) (string, []Param) { return e.name, e.ps }
	e, v, _, err := Lookup("kind", "penalty", "ridge", entries, parts, map[string]float64{"l2": 0.5}, nil)
	if err != nil || e.name != "ridge" || v["l2"] != 0.5 {
		t.Errorf("ridge: %+v %v %v", e, v, err)
	}
	_, _, _, err = Lookup("kind", "penalty", "lasso", entries, parts, nil, nil)
	if want := `kind: unknown penalty "lasso" (known: l1, ridge)`; err == nil || err.Error() != want {
		t.Errorf("lasso: %v, want %s", err, want)
	}
	_, _, _, err = Lookup("kind", "penalty", "ridge", entries, parts, map[string]float64{"l1": 1}, nil)
	var pe *Error
	if !errors.As(err, &pe) || pe.Field != "l2" || !strings.Contains(err.Error(), "penalty ridge") {
		t.Errorf("ridge given l1: %v, want a missing l2 of penalty ridge", err)
	}
}
