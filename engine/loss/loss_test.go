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

// TestLogisticProxNearAccuracy: the logistic prox from any start solves its optimality
// condition g (s - q) = sigma(-s) (s = y zhat, q = y p) to rounding in s, and its derivative is
// g / (g + sigma(s) sigma(-s)) at that s, although the last Newton step is not evaluated again.
func TestLogisticProxNearAccuracy(t *testing.T) {
	l := Logistic().(Near)
	worst, worstD := 0.0, 0.0
	for _, y := range []float64{-1, 1} {
		for _, g := range []float64{1e-4, 1e-3, 1e-2, 0.03, 0.3, 1, 100} {
			for p := -30.0; p <= 30; p += 0.0731 {
				for _, near := range []float64{math.NaN(), p, p + 0.1, p - 3, p + y/g, p + 0.5*y/g} {
					z, d := l.ProxNear(y, p, g, near)
					s, q := y*z, y*p
					sig := 1 / (1 + math.Exp(s))
					// the residual over the equation's slope: the error of s itself
					r := math.Abs(g*(s-q)-sig) / (g + sig*(1-sig)) / math.Max(1, math.Abs(s))
					worst = math.Max(worst, r)
					dd := math.Abs(d-g/(g+sig*(1-sig))) / d
					worstD = math.Max(worstD, dd)
				}
			}
		}
	}
	// 1e-14: a few roundings of s (common practice for a converged root).
	if worst > 1e-14 || worstD > 1e-13 {
		t.Fatalf("largest relative residual %.3g, derivative error %.3g", worst, worstD)
	}
}
