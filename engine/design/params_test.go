package design

import (
	"errors"
	"math"
	"strings"
	"testing"

	"hdrisk/engine/param"
)

// TestParamErrors: every invalid field gives a *param.Error naming it.
func TestParamErrors(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	tooMany := make([]float64, MaxValues+1)
	for i := range tooMany {
		tooMany[i] = 1
	}
	cases := []struct {
		name, field string
		make        func() (Law, error)
	}{
		{"gaussian alpha 0", "alpha", func() (Law, error) { return Gaussian(0, Rows) }},
		{"gaussian alpha < 0", "alpha", func() (Law, error) { return Gaussian(-1, Rows) }},
		{"gaussian alpha NaN", "alpha", func() (Law, error) { return Gaussian(nan, Rows) }},
		{"gaussian alpha Inf", "alpha", func() (Law, error) { return Gaussian(inf, Rows) }},
		{"gaussian scale", "scale", func() (Law, error) { return Gaussian(1, Scale(7)) }},
		{"orthogonal alpha", "alpha", func() (Law, error) { return Orthogonal(0, Columns) }},
		{"orthogonal scale", "scale", func() (Law, error) { return Orthogonal(1, Scale(-1)) }},
		{"uniform-sv alpha", "alpha", func() (Law, error) { return UniformSV(nan, 0, 1, Rows) }},
		{"uniform-sv min > max", "min", func() (Law, error) { return UniformSV(1, 2, 1, Rows) }},
		{"uniform-sv min < 0", "min", func() (Law, error) { return UniformSV(1, -1, 1, Rows) }},
		{"uniform-sv min NaN", "min", func() (Law, error) { return UniformSV(1, nan, 1, Rows) }},
		{"uniform-sv max 0", "max", func() (Law, error) { return UniformSV(1, 0, 0, Rows) }},
		{"uniform-sv max Inf", "max", func() (Law, error) { return UniformSV(1, 0, inf, Rows) }},
		{"uniform-sv scale", "scale", func() (Law, error) { return UniformSV(1, 0, 1, Scale(3)) }},
		{"uniform-ev alpha", "alpha", func() (Law, error) { return UniformEV(-2, 0, 1, Rows) }},
		{"uniform-ev min > max", "min", func() (Law, error) { return UniformEV(1, 3, 2, Rows) }},
		{"uniform-ev min < 0", "min", func() (Law, error) { return UniformEV(1, -0.1, 2, Rows) }},
		{"uniform-ev max NaN", "max", func() (Law, error) { return UniformEV(1, 0, nan, Rows) }},
		{"geometric alpha", "alpha", func() (Law, error) { return GeometricSV(0, 10, Rows) }},
		{"geometric condition < 1", "condition", func() (Law, error) { return GeometricSV(1, 0.5, Rows) }},
		{"geometric condition NaN", "condition", func() (Law, error) { return GeometricSV(1, nan, Rows) }},
		{"geometric condition Inf", "condition", func() (Law, error) { return GeometricSV(1, inf, Rows) }},
		{"geometric condition too large", "condition", func() (Law, error) { return GeometricSV(1, 1e16, Rows) }},
		{"geometric scale", "scale", func() (Law, error) { return GeometricSV(1, 10, Scale(9)) }},
		{"empirical alpha", "alpha", func() (Law, error) { return EmpiricalSV(0, []float64{1}, Rows) }},
		{"empirical empty", "values", func() (Law, error) { return EmpiricalSV(1, nil, Rows) }},
		{"empirical too many", "values", func() (Law, error) { return EmpiricalSV(1, tooMany, Rows) }},
		{"empirical negative", "values", func() (Law, error) { return EmpiricalSV(1, []float64{1, -1}, Rows) }},
		{"empirical NaN", "values", func() (Law, error) { return EmpiricalSV(1, []float64{nan}, Rows) }},
		{"empirical Inf", "values", func() (Law, error) { return EmpiricalSV(1, []float64{1, inf}, Rows) }},
		{"empirical all zero", "values", func() (Law, error) { return EmpiricalSV(1, []float64{0, 0}, Rows) }},
		{"empirical square overflows", "values", func() (Law, error) { return EmpiricalSV(1, []float64{1e200}, AsGiven) }},
		{"empirical scale", "scale", func() (Law, error) { return EmpiricalSV(1, []float64{1}, Scale(5)) }},
	}
	for _, c := range cases {
		l, err := c.make()
		var pe *param.Error
		if !errors.As(err, &pe) {
			t.Errorf("%s: law %v, error %v; want a *param.Error", c.name, l, err)
			continue
		}
		if pe.Field != c.field || pe.Reason == "" || !strings.Contains(err.Error(), c.field) {
			t.Errorf("%s: %q names field %q, want %q", c.name, err, pe.Field, c.field)
		}
	}
	_, err := EmpiricalSV(1, tooMany, Rows)
	if !strings.Contains(err.Error(), "100000") {
		t.Errorf("the cap is not named: %v", err)
	}
}

func TestScaleNames(t *testing.T) {
	for _, s := range []Scale{Rows, Columns, AsGiven} {
		got, err := ParseScale(s.String())
		if err != nil || got != s {
			t.Errorf("ParseScale(%q) = %v, %v", s.String(), got, err)
		}
	}
	var pe *param.Error
	if _, err := ParseScale("Rows"); !errors.As(err, &pe) || pe.Field != "scale" {
		t.Errorf("ParseScale(\"Rows\") error = %v", err)
	}
	if Scale(5).String() != "scale(5)" {
		t.Errorf("unknown scale prints as %q", Scale(5).String())
	}
}
