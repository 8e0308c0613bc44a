package noise

import (
	"math"
	"testing"
)

// TestMixturesHoldTheirVariance: the components' weights sum to 1 and their variance is the
// law's E[w^2]; "variance" is the typical entry's.
func TestMixturesHoldTheirVariance(t *testing.T) {
	for name, c := range map[string]struct {
		l       Law
		typical float64
		second  float64
	}{
		"gauss":     {must(Gauss(0.3)), 0.3, 0.3},
		"laplace":   {must(Laplace(0.3)), 0.3, 0.3},
		"student-t": {must(StudentT(0.3, 5)), 0.3, 0.3},
		"outliers":  {must(Outliers(0.3, 0.1, 9)), 0.3, 0.9*0.3 + 0.1*9},
	} {
		w, v := 0.0, 0.0
		for _, k := range c.l.Components() {
			w += k.Weight
			v += k.Weight * k.Var
		}
		if math.Abs(w-1) > 1e-12 || math.Abs(v-c.second) > 1e-9*c.second || math.Abs(c.l.Second()-c.second) > 1e-12 || c.l.Variance() != c.typical {
			t.Errorf("%s: weights %v, mixture variance %v, Second %v, Variance %v", name, w, v, c.l.Second(), c.l.Variance())
		}
	}
	for _, bad := range []func() (Law, error){
		func() (Law, error) { return StudentT(1, 2) },
		func() (Law, error) { return Outliers(1, 1, 2) },
		func() (Law, error) { return Laplace(0) },
		func() (Law, error) { return Gauss(-1) },
	} {
		if _, err := bad(); err == nil {
			t.Error("bad parameters accepted")
		}
	}
}

func must(l Law, err error) Law {
	if err != nil {
		panic(err)
	}
	return l
}
