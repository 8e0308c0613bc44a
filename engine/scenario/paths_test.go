package scenario

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"
)

func TestGetWith(t *testing.T) {
	s := baseScenario(t)
	for _, tc := range []struct {
		path string
		want float64
	}{
		{"alpha", 0.4}, {"design.alpha", 0.4}, {"l1", 0.05}, {"penalty.l1", 0.05}, {"l2", 0},
		{"density", 0.05}, {"signal.density", 0.05}, {"variance", 1}, {"signal.variance", 1},
		{"noise", 0.01}, {"noise.variance", 0.01},
	} {
		got, err := s.Get(tc.path)
		if err != nil || got != tc.want {
			t.Errorf("Get(%q) = %v, %v; want %v", tc.path, got, err, tc.want)
		}
	}
	u, err := s.With("l1", 0.2)
	if err != nil {
		t.Fatal(err)
	}
	if v, _ := u.Get("penalty.l1"); v != 0.2 {
		t.Errorf("With l1 0.2 gives %v", v)
	}
	if v, _ := s.Get("l1"); v != 0.05 {
		t.Errorf("With changed the original: l1 = %v", v)
	}
	for _, tc := range []struct {
		path  string
		v     float64
		field string
	}{
		{"l1", -1, "penalty.l1"},
		{"alpha", 0, "design.alpha"},
		{"density", 2, "signal.density"},
		{"noise", math.NaN(), "noise.variance"},
		{"q", 1.5, "q"},
		{"design.scale", 1, "design.scale"},
		{"signal.colour", 1, "signal.colour"},
	} {
		_, err := s.With(tc.path, tc.v)
		var fe *FieldError
		if !errors.As(err, &fe) || fe.Field != tc.field || fe.Reason == "" {
			t.Errorf("With(%q, %v): %v; want a *FieldError of %q", tc.path, tc.v, err, tc.field)
		}
	}
}

// TestScaleName checks that "scale" as a number means the signal's scale (design.scale is a
// word) and that a scenario without a numeric scale says so.
func TestScaleName(t *testing.T) {
	s := baseScenario(t)
	if _, err := s.Get("scale"); err == nil {
		t.Error("Get(scale) of a Bernoulli-Gauss signal should fail")
	}
	lap, err := Decode([]byte(edit(t, `"law": "bernoulli-gauss", "density": 0.05, "variance": 1`, `"law": "laplace", "scale": 2`)))
	if err != nil {
		t.Fatal(err)
	}
	if v, err := lap.Get("scale"); err != nil || v != 2 {
		t.Errorf("Get(scale) = %v, %v; want the signal scale 2", v, err)
	}
	if _, err := lap.Get("design.scale"); err == nil || !strings.Contains(err.Error(), "word") {
		t.Errorf("Get(design.scale): %v", err)
	}
}

// TestSNR checks the two ways of stating the noise against each other. With rows scale,
// E_nu[lambda] = alpha and the SNR is rho2 / Delta (definition in Noise).
func TestSNR(t *testing.T) {
	s, err := Decode([]byte(edit(t, `"law": "bernoulli-gauss", "density": 0.05, "variance": 1`, `"law": "gauss", "variance": 2`,
		`{"variance": 0.01}`, `{"variance": 0.02}`)))
	if err != nil {
		t.Fatal(err)
	}
	if v, err := s.Get("snr_db"); err != nil || math.Abs(v-20) > 1e-12 {
		t.Errorf("snr_db = %v, %v; want 20", v, err)
	}
	u, err := s.With("snr_db", 30)
	if err != nil {
		t.Fatal(err)
	}
	if !u.Noise.SNR || u.Noise.Variance != 0 {
		t.Errorf("With snr_db keeps %+v", u.Noise)
	}
	if v, err := u.Get("noise"); err != nil || math.Abs(v-0.002) > 1e-15 {
		t.Errorf("noise at 30 dB = %v, %v; want 0.002", v, err)
	}
	p, err := u.Problem()
	if err != nil || math.Abs(p.Noise-0.002) > 1e-15 {
		t.Errorf("Problem noise = %v, %v", p.Noise, err)
	}
	// Columns scale: E_nu[lambda] = 1, so the SNR is rho2 / (alpha Delta).
	c := u.clone()
	c.Design.Scale = ScaleColumns
	if v, err := c.NoiseVariance(); err != nil || math.Abs(v-0.002/0.4) > 1e-15 {
		t.Errorf("columns-scale noise = %v, %v; want %v", v, err, 0.002/0.4)
	}
	z, _ := s.With("noise", 0)
	if v, _ := z.Get("snr_db"); !math.IsInf(v, 1) {
		t.Errorf("snr_db of a noiseless scenario = %v", v)
	}
}

func TestPaths(t *testing.T) {
	s := baseScenario(t)
	var names []string
	for _, p := range s.Paths() {
		names = append(names, p.Name)
		if _, err := s.Get(p.Name); err != nil {
			t.Errorf("Get(%q): %v", p.Name, err)
		}
		if _, err := s.Get(p.Path); err != nil {
			t.Errorf("Get(%q): %v", p.Path, err)
		}
	}
	want := []string{"alpha", "density", "variance", "noise", "snr_db", "l1", "l2"}
	if !slices.Equal(names, want) {
		t.Errorf("Paths names %v, want %v", names, want)
	}
	for _, p := range s.Paths() {
		if p.Name == "l1" && (!p.Log || p.Min != 0 || !math.IsInf(p.Max, 1)) {
			t.Errorf("l1 path %+v", p)
		}
	}
}
