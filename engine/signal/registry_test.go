package signal

import (
	"errors"
	"math"
	"strings"
	"testing"

	"hdrisk/engine/param"
)

func TestBadParameters(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	big := make([]float64, MaxEmpirical+1)
	many := make([]float64, MaxMixture+1)
	for i := range many {
		many[i] = 1 / float64(len(many))
	}
	for _, tc := range []struct {
		name  string
		build func() (Law, error)
		field string
		says  string
	}{
		{"gauss variance < 0", func() (Law, error) { return Gauss(-1) }, "variance", ">= 0"},
		{"gauss variance NaN", func() (Law, error) { return Gauss(nan) }, "variance", "finite"},
		{"bg density 0", func() (Law, error) { return BernoulliGauss(0, 1) }, "density", "[1e-300, 1]"},
		{"bg density > 1", func() (Law, error) { return BernoulliGauss(1.5, 1) }, "density", "[1e-300, 1]"},
		{"bg density 5e-324", func() (Law, error) { return BernoulliGauss(5e-324, 5e99) }, "density", "[1e-300, 1]"},
		{"bg density NaN", func() (Law, error) { return BernoulliGauss(nan, 1) }, "density", "finite"},
		{"bg variance", func() (Law, error) { return BernoulliGauss(0.5, -2) }, "variance", ">= 0"},
		{"bg variance Inf", func() (Law, error) { return BernoulliGauss(0.5, inf) }, "variance", "finite"},
		{"br density", func() (Law, error) { return BernoulliRademacher(-0.1, 1) }, "density", "[1e-300, 1]"},
		{"br amplitude", func() (Law, error) { return BernoulliRademacher(0.1, -1) }, "amplitude", ">= 0"},
		{"laplace scale 0", func() (Law, error) { return Laplace(0) }, "scale", "> 0"},
		{"laplace scale Inf", func() (Law, error) { return Laplace(inf) }, "scale", "finite"},
		{"uniform halfwidth", func() (Law, error) { return Uniform(-1) }, "halfwidth", "> 0"},
		{"student dof 2", func() (Law, error) { return StudentT(2, 1) }, "dof", "> 2"},
		{"student dof 1", func() (Law, error) { return StudentT(1, 1) }, "dof", "infinite"},
		{"student dof NaN", func() (Law, error) { return StudentT(nan, 1) }, "dof", "finite"},
		{"student dof Inf", func() (Law, error) { return StudentT(inf, 1) }, "dof", "finite"},
		{"student scale", func() (Law, error) { return StudentT(5, 0) }, "scale", "> 0"},
		{"mixture empty", func() (Law, error) { return GaussMixture(nil, nil, nil) }, "weights", "at least one"},
		{"mixture sum", func() (Law, error) {
			return GaussMixture([]float64{0.5, 0.4}, []float64{0, 1}, []float64{1, 1})
		}, "weights", "sum to 0.9"},
		{"mixture negative weight", func() (Law, error) {
			return GaussMixture([]float64{1.5, -0.5}, []float64{0, 1}, []float64{1, 1})
		}, "weights[1]", ">= 0"},
		{"mixture means length", func() (Law, error) {
			return GaussMixture([]float64{0.5, 0.5}, []float64{0}, []float64{1, 1})
		}, "means", "holds 1 values, but weights holds 2"},
		{"mixture variances length", func() (Law, error) {
			return GaussMixture([]float64{0.5, 0.5}, []float64{0, 1}, []float64{1, 1, 1})
		}, "variances", "holds 3"},
		{"mixture variance", func() (Law, error) {
			return GaussMixture([]float64{0.5, 0.5}, []float64{0, 1}, []float64{1, -1})
		}, "variances[1]", ">= 0"},
		{"mixture mean NaN", func() (Law, error) {
			return GaussMixture([]float64{0.5, 0.5}, []float64{nan, 1}, []float64{1, 1})
		}, "means[0]", "finite"},
		{"mixture over cap", func() (Law, error) { return GaussMixture(many, many, many) }, "weights", "maximum 1000"},
		{"empirical empty", func() (Law, error) { return Empirical(nil) }, "values", "at least one"},
		{"empirical over cap", func() (Law, error) { return Empirical(big) }, "values", "maximum 100000"},
		{"empirical Inf", func() (Law, error) { return Empirical([]float64{1, inf}) }, "values[1]", "finite"},
	} {
		l, err := tc.build()
		var pe *param.Error
		if !errors.As(err, &pe) {
			t.Errorf("%s: got (%v, %v), want a *param.Error", tc.name, l, err)
			continue
		}
		if pe.Field != tc.field || !strings.Contains(pe.Reason, tc.says) {
			t.Errorf("%s: %v, want field %q saying %q", tc.name, err, tc.field, tc.says)
		}
	}
}

func TestLawsListEveryLaw(t *testing.T) {
	want := []string{"gauss", "bernoulli-gauss", "bernoulli-rademacher", "laplace", "uniform", "student-t", "gauss-mixture", "empirical"}
	ks := Laws()
	if len(ks) != len(want) {
		t.Fatalf("Laws has %d entries, want %d", len(ks), len(want))
	}
	for i, k := range ks {
		if k.Name != want[i] || k.Help == "" || len(k.Params) == 0 {
			t.Errorf("Laws[%d] = %+v, want %q with help and parameters", i, k, want[i])
		}
		for _, p := range k.Params {
			if p.Unit == "" || p.Help == "" || !(p.Min <= p.Max) || p.List != (p.MaxLen > 0) {
				t.Errorf("%s.%s: incomplete description %+v", k.Name, p.Name, p)
			}
		}
	}
}

// The registry's declared scalar domains agree with the constructors, and New builds the same
// law as the constructor, with Exact as declared.
func TestRegistryDomainsMatchConstructors(t *testing.T) {
	for _, k := range Laws() {
		params := map[string]float64{}
		lists := map[string][]float64{}
		for _, p := range k.Params {
			if p.List {
				continue
			}
			switch {
			case !math.IsInf(p.Max, 0):
				params[p.Name] = (p.Min + p.Max) / 2
			default:
				params[p.Name] = p.Min + 1.5
			}
		}
		switch k.Name {
		case "gauss-mixture":
			lists = map[string][]float64{"weights": {0.4, 0.6}, "means": {0, 1}, "variances": {1, 0}}
		case "empirical":
			lists = map[string][]float64{"values": {1, 2, 2}}
		}
		l, err := New(k.Name, params, lists)
		if err != nil {
			t.Fatalf("%s: %v", k.Name, err)
		}
		if l.Name() != k.Name || l.Exact() != k.Exact {
			t.Errorf("%s: New gives %q with Exact %v (registry says %v)", k.Name, l.Name(), l.Exact(), k.Exact)
		}
		for _, p := range k.Params {
			if p.List {
				continue
			}
			try := func(v float64, ok bool) {
				t.Helper()
				m := map[string]float64{}
				for n, x := range params {
					m[n] = x
				}
				m[p.Name] = v
				_, err := New(k.Name, m, lists)
				var pe *param.Error
				switch {
				case ok && err != nil:
					t.Errorf("%s.%s = %v refused: %v", k.Name, p.Name, v, err)
				case !ok && (!errors.As(err, &pe) || pe.Field != p.Name):
					t.Errorf("%s.%s = %v: got %v, want an error naming %q", k.Name, p.Name, v, err, p.Name)
				}
			}
			try(p.Min, !p.MinOpen)
			try(p.Min-1, false)
			try(math.NaN(), false)
			if !math.IsInf(p.Max, 0) {
				try(p.Max, !p.MaxOpen)
				try(p.Max+1, false)
			}
		}
	}
}

func TestNewErrors(t *testing.T) {
	for _, tc := range []struct {
		law    string
		params map[string]float64
		lists  map[string][]float64
		field  string
		says   string
	}{
		{"normal", map[string]float64{"variance": 1}, nil, "law", "unknown"},
		{"gauss", nil, nil, "variance", "missing"},
		{"gauss", map[string]float64{"variance": 1, "mean": 2}, nil, "mean", "not a parameter"},
		{"gauss", nil, map[string][]float64{"variance": {1}}, "variance", "a single number"},
		{"empirical", map[string]float64{"values": 1}, nil, "values", "a list"},
		{"gauss-mixture", nil, map[string][]float64{"weights": {1}, "means": {0}}, "variances", "missing"},
		{"student-t", map[string]float64{"dof": 2, "scale": 1}, nil, "dof", "> 2"},
	} {
		_, err := New(tc.law, tc.params, tc.lists)
		var pe *param.Error
		if !errors.As(err, &pe) || pe.Field != tc.field || !strings.Contains(pe.Reason, tc.says) {
			t.Errorf("New(%q, %v, %v) = %v, want field %q saying %q", tc.law, tc.params, tc.lists, err, tc.field, tc.says)
		}
	}
}
