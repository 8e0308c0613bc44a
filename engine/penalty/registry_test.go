package penalty

import (
	"errors"
	"math"
	"strings"
	"testing"

	"hdrisk/engine/param"
)

func TestKindsListEveryPenalty(t *testing.T) {
	want := []string{"l1", "ridge", "elastic-net", "nonneg-l1", "box", "huber", "power"}
	ks := Kinds()
	if len(ks) != len(want) {
		t.Fatalf("Kinds has %d entries, want %d", len(ks), len(want))
	}
	for i, k := range ks {
		if k.Name != want[i] {
			t.Errorf("Kinds[%d] = %q, want %q", i, k.Name, want[i])
		}
		if k.Help == "" || len(k.Params) == 0 {
			t.Errorf("%s: missing help or parameters", k.Name)
		}
		for _, p := range k.Params {
			if p.Unit == "" || p.Help == "" || !(p.Min <= p.Max) {
				t.Errorf("%s.%s: incomplete description %+v", k.Name, p.Name, p)
			}
		}
	}
	ks[0].Params[0].Name = "changed"
	if Kinds()[0].Params[0].Name != "l1" {
		t.Error("Kinds returns shared storage")
	}
}

// inside returns a value strictly inside the domain of p.
func inside(p param.Param) float64 {
	switch {
	case !math.IsInf(p.Max, 0):
		return (p.Min + p.Max) / 2
	case p.MinOpen:
		return p.Min + 1
	}
	return p.Min + 0.5
}

// The registry's declared domains agree with the constructors: a value inside is accepted,
// the ends are accepted or refused as declared, and values beyond are refused naming the field.
func TestRegistryDomainsMatchConstructors(t *testing.T) {
	for _, k := range Kinds() {
		base := map[string]float64{}
		for _, p := range k.Params {
			base[p.Name] = inside(p)
		}
		if _, err := New(k.Name, base); err != nil {
			t.Fatalf("%s: inside values %v refused: %v", k.Name, base, err)
		}
		for _, p := range k.Params {
			try := func(v float64, ok bool) {
				t.Helper()
				m := map[string]float64{}
				for n, x := range base {
					m[n] = x
				}
				m[p.Name] = v
				_, err := New(k.Name, m)
				var pe *param.Error
				switch {
				case ok && err != nil:
					t.Errorf("%s.%s = %v refused: %v", k.Name, p.Name, v, err)
				case !ok && !errors.As(err, &pe):
					t.Errorf("%s.%s = %v accepted", k.Name, p.Name, v)
				case !ok && pe.Field != p.Name:
					t.Errorf("%s.%s = %v: error names %q", k.Name, p.Name, v, pe.Field)
				}
			}
			try(p.Min, !p.MinOpen)
			try(p.Min-1, false)
			try(math.NaN(), false)
			if !math.IsInf(p.Max, 0) {
				try(p.Max, !p.MaxOpen)
				try(p.Max+1, false)
			}
			try(math.Inf(1), false)
		}
	}
}

func TestNewMatchesConstructors(t *testing.T) {
	en, _ := ElasticNet(0.3, 0.2)
	bx, _ := Box(1.1, 0)
	nn, _ := NonnegL1(0.4, 0)
	for _, tc := range []struct {
		kind   string
		params map[string]float64
		want   Penalty
	}{
		{"elastic-net", map[string]float64{"l1": 0.3, "l2": 0.2}, en},
		{"box", map[string]float64{"bound": 1.1}, bx},
		{"nonneg-l1", map[string]float64{"l1": 0.4}, nn},
	} {
		p, err := New(tc.kind, tc.params)
		if err != nil {
			t.Fatalf("%s: %v", tc.kind, err)
		}
		if p.Name() != tc.kind {
			t.Errorf("New(%q).Name() = %q", tc.kind, p.Name())
		}
		for _, r := range testRs {
			if p.Prox(r, 0.7) != tc.want.Prox(r, 0.7) {
				t.Errorf("%s: New and the constructor differ at r = %v", tc.kind, r)
			}
		}
	}
}

func TestNewErrors(t *testing.T) {
	for _, tc := range []struct {
		kind   string
		params map[string]float64
		field  string
		says   string
	}{
		{"lasso", map[string]float64{"l1": 1}, "kind", "unknown"},
		{"l1", map[string]float64{}, "l1", "missing"},
		{"l1", map[string]float64{"l1": 1, "l2": 1}, "l2", "not a parameter"},
		{"elastic-net", map[string]float64{"l1": 1}, "l2", "missing"},
		{"power", map[string]float64{"weight": 1, "q": 0.5}, "q", "non-convex"},
	} {
		_, err := New(tc.kind, tc.params)
		var pe *param.Error
		if !errors.As(err, &pe) || pe.Field != tc.field || !strings.Contains(pe.Reason, tc.says) {
			t.Errorf("New(%q, %v) = %v, want field %q saying %q", tc.kind, tc.params, err, tc.field, tc.says)
		}
	}
}
