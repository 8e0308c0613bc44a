package penalty

import (
	"errors"
	"math"
	"slices"
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

// Every penalty states as its strengths exactly the parameters its registry kind marks with
// the role param.Strength, in order, with the values it was built from.
func TestStrengthsFollowTheRegistry(t *testing.T) {
	for _, k := range Kinds() {
		v := map[string]float64{}
		var want []Strength
		for i, p := range k.Params {
			v[p.Name] = inside(p) + float64(i)/8
			if p.Role == param.Strength {
				want = append(want, Strength{p.Name, v[p.Name]})
			}
		}
		pen, err := New(k.Name, v)
		if err != nil {
			t.Fatalf("%s: %v", k.Name, err)
		}
		if got := pen.Strengths(); !slices.Equal(got, want) {
			t.Errorf("%s: Strengths = %v, want %v", k.Name, got, want)
		}
	}
	for _, q := range []float64{1, 1.5, 2} {
		pen, _ := Power(0.3, q)
		if got := pen.Strengths(); !slices.Equal(got, []Strength{{"weight", 0.3}}) {
			t.Errorf("power q = %v: Strengths = %v", q, got)
		}
	}
}

// A prox of more pieces than Linear holds inline spills into a slice and keeps every piece.
func TestLinearHoldsAnyNumberOfPieces(t *testing.T) {
	var l Linear
	for i := range 9 {
		hi := float64(i)
		if i == 8 {
			hi = math.Inf(1)
		}
		l.Then(hi, float64(i%2), float64(i))
	}
	ps := l.Pieces()
	if len(ps) != 9 || !math.IsInf(ps[0].Lo, -1) || !math.IsInf(ps[8].Hi, 1) {
		t.Fatalf("pieces %v", ps)
	}
	for i := 1; i < len(ps); i++ {
		if ps[i].Lo != ps[i-1].Hi || ps[i].Intercept != float64(i) {
			t.Errorf("piece %d = %v after %v", i, ps[i], ps[i-1])
		}
	}
	if q := l.at(3.5); q.Intercept != 4 {
		t.Errorf("at(3.5) = %v, want the piece [3, 4)", q)
	}
	var e Linear
	e.Then(0, 1, 0)
	e.Then(0, 5, 5)
	e.Then(math.Inf(1), 2, 0)
	if ps := e.Pieces(); len(ps) != 2 || ps[1].Slope != 2 || ps[1].Lo != 0 {
		t.Errorf("an empty piece was kept: %v", ps)
	}
}

func TestRegisterRefusesBadKinds(t *testing.T) {
	build := func(map[string]float64) (Penalty, error) { return L1(1) }
	for _, k := range []Kind{
		{Name: ""},
		{Name: "l1"},
		{Name: "x", Params: []param.Param{{Name: "a", Min: 2, Max: 1}}},
		{Name: "x", Params: []param.Param{{Name: "a", Max: 1}, {Name: "a", Max: 1}}},
	} {
		var pe *param.Error
		if err := Register(k, build); !errors.As(err, &pe) {
			t.Errorf("Register(%+v) = %v, want a *param.Error", k, err)
		}
	}
	if err := Register(Kind{Name: "y"}, nil); err == nil {
		t.Error("a nil constructor was accepted")
	}
	if len(Kinds()) != 7 {
		t.Errorf("a refused kind was registered: %d kinds", len(Kinds()))
	}
}
