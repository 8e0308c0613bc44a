package loss

import (
	"math"
	"testing"
)

// TestProxMinimizes checks each prox against the definition: zhat minimizes
// L(y, z) + (g/2)(z - p)^2 (no neighbour does better), and d zhat/dp against a central
// difference away from the kinks.
func TestProxMinimizes(t *testing.T) {
	h, _ := Huber(0.7)
	for _, l := range []Loss{Square(), h, Absolute(), Logistic(), Hinge()} {
		ys := []float64{-1.3, 0.4, 2}
		if l.Labels() {
			ys = []float64{-1, 1}
		}
		for _, y := range ys {
			for _, g := range []float64{0.3, 1, 4} {
				for p := -4.0; p <= 4; p += 0.37 {
					z, d := l.Prox(y, p, g)
					obj := func(z float64) float64 { return l.Value(y, z) + g/2*(z-p)*(z-p) }
					for _, e := range []float64{1e-4, -1e-4, 1e-2, -1e-2} {
						if obj(z+e) < obj(z)-1e-12 {
							t.Fatalf("%s y %g g %g p %g: zhat %g is not the minimizer (%g better)", l.Name(), y, g, p, z, z+e)
						}
					}
					near := false
					for _, k := range l.Kinks(y, g) {
						near = near || math.Abs(k-p) < 1e-3
					}
					if near {
						continue
					}
					zp, _ := l.Prox(y, p+1e-6, g)
					zm, _ := l.Prox(y, p-1e-6, g)
					if fd := (zp - zm) / 2e-6; math.Abs(fd-d) > 1e-6 {
						t.Fatalf("%s y %g g %g p %g: derivative %g, central difference %g", l.Name(), y, g, p, d, fd)
					}
				}
			}
		}
	}
}

func TestRegistry(t *testing.T) {
	for _, k := range Kinds() {
		params := map[string]float64{}
		for _, p := range k.Params {
			params[p.Name] = 1
		}
		l, err := New(k.Name, params)
		if err != nil || l.Name() != k.Name || l.Labels() != k.Labels {
			t.Errorf("%s: %v", k.Name, err)
		}
	}
	if _, err := New("huber", nil); err == nil {
		t.Error("huber without its width accepted")
	}
	if _, err := New("square", map[string]float64{"width": 1}); err == nil {
		t.Error("square with a width accepted")
	}
	if _, err := Huber(-1); err == nil {
		t.Error("negative width accepted")
	}
}
