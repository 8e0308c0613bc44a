package penalty

import (
	"errors"
	"math"
	"strings"
	"testing"

	"hdrisk/engine/param"
)

// testCase pairs a penalty with its definition f written out independently of the package,
// so that the prox can be checked against argmin_x f(x) + (g/2)(x - r)^2 found numerically.
type testCase struct {
	name   string
	p      Penalty
	f      func(x float64) float64
	lo, hi float64 // the domain of f when it is +Inf outside an interval, else 0, 0
}

func mustPenalty(t *testing.T, p Penalty, err error) Penalty {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func huberW(x, w float64) float64 {
	if math.Abs(x) <= w {
		return x * x / (2 * w)
	}
	return math.Abs(x) - w/2
}

func cases(t *testing.T) []testCase {
	t.Helper()
	pen := func(p Penalty, err error) Penalty { return mustPenalty(t, p, err) }
	return []testCase{
		{"l1", pen(L1(0.7)), func(x float64) float64 { return 0.7 * math.Abs(x) }, 0, 0},
		{"l1 zero", pen(L1(0)), func(x float64) float64 { return 0 }, 0, 0},
		{"ridge", pen(Ridge(1.3)), func(x float64) float64 { return 1.3 / 2 * x * x }, 0, 0},
		{"elastic-net", pen(ElasticNet(0.4, 2.5)), func(x float64) float64 { return 0.4*math.Abs(x) + 2.5/2*x*x }, 0, 0},
		{"nonneg-l1", pen(NonnegL1(0.6, 0.3)), func(x float64) float64 {
			if x < 0 {
				return math.Inf(1)
			}
			return 0.6*x + 0.3/2*x*x
		}, 0, math.Inf(1)},
		{"nonneg-l1 projection", pen(NonnegL1(0, 0)), func(x float64) float64 {
			if x < 0 {
				return math.Inf(1)
			}
			return 0
		}, 0, math.Inf(1)},
		{"box", pen(Box(0.8, 0.5)), func(x float64) float64 {
			if math.Abs(x) > 0.8 {
				return math.Inf(1)
			}
			return 0.5 / 2 * x * x
		}, -0.8, 0.8},
		{"box l2=0", pen(Box(1.5, 0)), func(x float64) float64 {
			if math.Abs(x) > 1.5 {
				return math.Inf(1)
			}
			return 0
		}, -1.5, 1.5},
		{"huber", pen(Huber(0.9, 0.5)), func(x float64) float64 { return 0.9 * huberW(x, 0.5) }, 0, 0},
		{"power q=1.5", pen(Power(0.6, 1.5)), func(x float64) float64 { return 0.6 * math.Pow(math.Abs(x), 1.5) }, 0, 0},
		{"power q=1.1", pen(Power(0.6, 1.1)), func(x float64) float64 { return 0.6 * math.Pow(math.Abs(x), 1.1) }, 0, 0},
		{"power q=1.9", pen(Power(2.0, 1.9)), func(x float64) float64 { return 2.0 * math.Pow(math.Abs(x), 1.9) }, 0, 0},
		{"power q=1", pen(Power(0.6, 1)), func(x float64) float64 { return 0.6 * math.Abs(x) }, 0, 0},
		{"power q=2", pen(Power(0.6, 2)), func(x float64) float64 { return 0.6 * x * x }, 0, 0},
	}
}

// golden minimizes the unimodal h on [a, b] by golden-section search.
func golden(h func(float64) float64, a, b float64) float64 {
	const invPhi = 0.6180339887498949
	c, d := b-invPhi*(b-a), a+invPhi*(b-a)
	hc, hd := h(c), h(d)
	for range 400 {
		if b-a <= 1e-15*(1+math.Abs(a)+math.Abs(b)) {
			break
		}
		if hc <= hd {
			b, d, hd = d, c, hc
			c = b - invPhi*(b-a)
			hc = h(c)
		} else {
			a, c, hc = c, d, hd
			d = a + invPhi*(b-a)
			hd = h(d)
		}
	}
	return (a + b) / 2
}

var (
	testRs = []float64{-7, -3.2, -1.7, -1, -0.55, -0.3, -1e-3, 0, 2e-4, 0.01, 0.2, 0.49, 0.8, 1.1, 2, 4.4, 9}
	testGs = []float64{0.05, 0.3, 1, 2.7, 40}
)

// The prox against its definition: argmin_x f(x) + (g/2)(x - r)^2 by golden-section search.
// The objective is strictly convex, so the search finds the minimizer to about sqrt(eps).
func TestProxAgainstDefinition(t *testing.T) {
	for _, c := range cases(t) {
		for _, g := range testGs {
			for _, r := range testRs {
				obj := func(x float64) float64 { return c.f(x) + g/2*(x-r)*(x-r) }
				got := c.p.Prox(r, g)
				// Every penalty here shrinks towards 0, so the minimizer lies between 0 and r,
				// and within the domain of f.
				a, b := math.Min(0, r)-1, math.Max(0, r)+1
				if c.lo != c.hi {
					a, b = math.Max(a, c.lo), math.Min(b, c.hi)
				}
				want := golden(obj, a, b)
				if math.Abs(got-want) > 2e-7*(1+math.Abs(r)) {
					t.Errorf("%s: prox(%v; %v) = %.15g, numerical argmin %.15g", c.name, r, g, got, want)
				}
				if obj(got) > obj(want)+1e-13*(1+math.Abs(obj(want))) {
					t.Errorf("%s: prox(%v; %v) objective %.17g above the numerical minimum %.17g", c.name, r, g, obj(got), obj(want))
				}
			}
		}
	}
}

func nearKink(p Penalty, r, g, d float64) bool {
	for _, k := range p.Kinks(g) {
		if math.Abs(r-k) < d {
			return true
		}
	}
	return false
}

// Deriv against central finite differences, away from the kinks (and, for the power
// penalty, away from r = 0 where the derivative is continuous but not smooth).
func TestDerivFiniteDifference(t *testing.T) {
	const h = 1e-6
	for _, c := range cases(t) {
		for _, g := range testGs {
			for _, r := range testRs {
				if nearKink(c.p, r, g, 1e-4) || (c.p.Name() == "power" && math.Abs(r) < 1e-2) {
					continue
				}
				fd := (c.p.Prox(r+h, g) - c.p.Prox(r-h, g)) / (2 * h)
				if d := c.p.Deriv(r, g); math.Abs(d-fd) > 1e-6 {
					t.Errorf("%s: Deriv(%v; %v) = %.12g, finite difference %.12g", c.name, r, g, d, fd)
				}
				if d := c.p.Deriv(r, g); d < 0 || d > 1 {
					t.Errorf("%s: Deriv(%v; %v) = %v outside [0, 1] (prox is firmly nonexpansive)", c.name, r, g, d)
				}
			}
		}
	}
}

// Pieces tile the line, the prox is continuous across them, they reproduce Prox, and Deriv
// is the slope of the piece [Lo, Hi) holding r, at a kink too (the right derivative).
func TestPiecesReproduceProx(t *testing.T) {
	for _, c := range cases(t) {
		for _, g := range testGs {
			ps, ok := c.p.Pieces(g)
			lin, lok := c.p.(LinearForm).Linear(g)
			if ok != lok {
				t.Fatalf("%s: Pieces ok = %v but Linear ok = %v", c.name, ok, lok)
			}
			if !ok {
				if c.p.Name() != "power" {
					t.Errorf("%s: Pieces not exact", c.name)
				}
				continue
			}
			lp := lin.Pieces()
			if len(ps) != len(lp) || len(ps) == 0 {
				t.Fatalf("%s: %d pieces, Linear has %d", c.name, len(ps), len(lp))
			}
			if !math.IsInf(ps[0].Lo, -1) || !math.IsInf(ps[len(ps)-1].Hi, 1) {
				t.Errorf("%s: pieces do not cover the line: %v", c.name, ps)
			}
			for i, q := range ps {
				if q != lp[i] {
					t.Errorf("%s: Pieces[%d] = %v, Linear %v", c.name, i, q, lp[i])
				}
				if i > 0 {
					if ps[i-1].Hi != q.Lo || !(q.Lo < q.Hi) {
						t.Errorf("%s: pieces %v and %v do not abut", c.name, ps[i-1], q)
					}
					left := ps[i-1].Slope*q.Lo + ps[i-1].Intercept
					right := q.Slope*q.Lo + q.Intercept
					if math.Abs(left-right) > 1e-14*(1+math.Abs(left)) {
						t.Errorf("%s: prox jumps at %v: %v vs %v", c.name, q.Lo, left, right)
					}
					if got := c.p.Deriv(q.Lo, g); got != q.Slope {
						t.Errorf("%s: Deriv at the boundary %v = %v, want the right derivative %v", c.name, q.Lo, got, q.Slope)
					}
				}
			}
			for _, r := range testRs {
				for _, q := range ps {
					if r >= q.Lo && r < q.Hi {
						want := q.Slope*r + q.Intercept
						if got := c.p.Prox(r, g); math.Abs(got-want) > 1e-14*(1+math.Abs(r)) {
							t.Errorf("%s: prox(%v; %v) = %v, piece %v gives %v", c.name, r, g, got, q, want)
						}
						if got := c.p.Deriv(r, g); got != q.Slope {
							t.Errorf("%s: Deriv(%v; %v) = %v, piece slope %v", c.name, r, g, got, q.Slope)
						}
					}
				}
			}
			kinks := c.p.Kinks(g)
			var want []float64
			for i := 1; i < len(ps); i++ {
				if ps[i].Slope != ps[i-1].Slope {
					want = append(want, ps[i].Lo)
				}
			}
			if len(kinks) != len(want) {
				t.Fatalf("%s: kinks %v, slope changes at %v", c.name, kinks, want)
			}
			for i := range kinks {
				if kinks[i] != want[i] {
					t.Errorf("%s: kinks %v, slope changes at %v", c.name, kinks, want)
				}
			}
			zero := false
			for _, q := range ps {
				zero = zero || q.Zero()
			}
			if zero != c.p.HasZeroRegion() {
				t.Errorf("%s: HasZeroRegion = %v, pieces have a zero piece: %v", c.name, c.p.HasZeroRegion(), zero)
			}
		}
	}
}

// Proximal operators of common functions as tabulated by Parikh & Boyd 2014, Proximal
// Algorithms (Found. Trends Optim. 1(3)): with lambda = 1/g,
//   - l1 norm (section 6.5.2): (v - lambda)_+ - (-v - lambda)_+;
//   - elastic net (section 6.5.3): 1/(1 + lambda l2) times the l1 prox;
//   - quadratic (l2/2) x^2 (section 6.1.1): v / (1 + lambda l2);
//   - Huber with width 1 (section 6.5.1): (1 - lambda/max(|v|, lambda + 1)) v, scaled here to
//     width w by f(x) = l1 w h_1(x/w);
//   - indicator of a box (section 6.2): the projection min(max(v, -b), b);
//   - Moreau decomposition (section 2.5): v = prox_{lambda f}(v) + lambda prox_{f*/lambda}(v/lambda);
//     for f = l1 |x| the conjugate is the indicator of [-l1, l1], so soft(v) + clamp(v) = v.
func TestParikhBoyd(t *testing.T) {
	pos := func(x float64) float64 { return math.Max(x, 0) }
	for _, g := range testGs {
		lam := 1 / g
		for _, v := range testRs {
			check := func(name string, got, want float64) {
				t.Helper()
				if math.Abs(got-want) > 1e-13*(1+math.Abs(v)) {
					t.Errorf("%s: prox(%v; g=%v) = %.16g, Parikh & Boyd %.16g", name, v, g, got, want)
				}
			}
			l1, l2 := 0.8, 1.7
			soft := pos(v-lam*l1) - pos(-v-lam*l1)
			p, _ := L1(l1)
			check("l1", p.Prox(v, g), soft)
			p, _ = ElasticNet(l1, l2)
			check("elastic-net", p.Prox(v, g), soft/(1+lam*l2))
			p, _ = Ridge(l2)
			check("ridge", p.Prox(v, g), v/(1+lam*l2))
			w := 0.6
			lh := l1 / (g * w)
			p, _ = Huber(l1, w)
			check("huber", p.Prox(v, g), w*(1-lh/math.Max(math.Abs(v/w), lh+1))*v/w)
			b := 1.2
			p, _ = Box(b, 0)
			check("box", p.Prox(v, g), math.Min(math.Max(v, -b), b))
			p, _ = L1(l1)
			q, _ := Box(l1*lam, 0)
			check("Moreau l1 + box", p.Prox(v, g)+q.Prox(v, g), v)
		}
	}
}

// For q = 3/2 the prox equation x + k sign(x) |x|^(1/2) = r is a quadratic in s = sqrt|x|:
// s = (-k + sqrt(k^2 + 4|r|))/2 (elementary algebra, common practice). This checks the Newton
// iteration to full precision, which the golden-section test cannot.
func TestPowerThreeHalvesClosedForm(t *testing.T) {
	p, _ := Power(0.9, 1.5)
	for _, g := range testGs {
		k := 1.5 * 0.9 / g
		for _, r := range append(testRs, 1e-12, -3e-9, 1e6) {
			s := 2 * math.Abs(r) / (k + math.Sqrt(k*k+4*math.Abs(r))) // the root without cancellation
			want := math.Copysign(s*s, r)
			if got := p.Prox(r, g); math.Abs(got-want) > 4e-15*math.Abs(want) {
				t.Errorf("prox(%v; %v) = %.17g, closed form %.17g", r, g, got, want)
			}
		}
	}
}

// Near q = 1 and q = 2 the power prox approaches the l1 and ridge proxes.
func TestPowerLimits(t *testing.T) {
	l1, _ := L1(0.7)
	ridge, _ := Ridge(1.4)
	near1, _ := Power(0.7, 1+1e-7)
	near2, _ := Power(0.7, 2-1e-7)
	for _, g := range testGs {
		for _, r := range testRs {
			if d := math.Abs(near1.Prox(r, g) - l1.Prox(r, g)); d > 1e-4*(1+math.Abs(r)) {
				t.Errorf("q -> 1: prox(%v; %v) differs from l1 by %v", r, g, d)
			}
			if d := math.Abs(near2.Prox(r, g) - ridge.Prox(r, g)); d > 1e-5*(1+math.Abs(r)) {
				t.Errorf("q -> 2: prox(%v; %v) differs from ridge by %v", r, g, d)
			}
		}
	}
}

func TestBadParameters(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	tests := []struct {
		name      string
		build     func() (Penalty, error)
		field     string
		nonConvex bool
	}{
		{"l1 negative", func() (Penalty, error) { return L1(-0.1) }, "l1", true},
		{"l1 NaN", func() (Penalty, error) { return L1(nan) }, "l1", false},
		{"ridge negative", func() (Penalty, error) { return Ridge(-1) }, "l2", true},
		{"ridge Inf", func() (Penalty, error) { return Ridge(inf) }, "l2", false},
		{"elastic-net l1", func() (Penalty, error) { return ElasticNet(-1, 1) }, "l1", true},
		{"elastic-net l2", func() (Penalty, error) { return ElasticNet(1, -1e-9) }, "l2", true},
		{"nonneg l1", func() (Penalty, error) { return NonnegL1(-inf, 0) }, "l1", false},
		{"nonneg l2", func() (Penalty, error) { return NonnegL1(1, -2) }, "l2", true},
		{"box bound zero", func() (Penalty, error) { return Box(0, 1) }, "bound", false},
		{"box bound Inf", func() (Penalty, error) { return Box(inf, 1) }, "bound", false},
		{"box l2", func() (Penalty, error) { return Box(1, -1) }, "l2", true},
		{"huber l1", func() (Penalty, error) { return Huber(-1, 1) }, "l1", true},
		{"huber width", func() (Penalty, error) { return Huber(1, 0) }, "width", false},
		{"huber width NaN", func() (Penalty, error) { return Huber(1, nan) }, "width", false},
		{"power q < 1", func() (Penalty, error) { return Power(1, 0.5) }, "q", true},
		{"power q > MaxPowerQ", func() (Penalty, error) { return Power(1, 2*MaxPowerQ) }, "q", false},
		{"power q NaN", func() (Penalty, error) { return Power(1, nan) }, "q", false},
		{"power weight", func() (Penalty, error) { return Power(-1, 1.5) }, "weight", true},
	}
	for _, tc := range tests {
		p, err := tc.build()
		var pe *param.Error
		if !errors.As(err, &pe) {
			t.Errorf("%s: got (%v, %v), want a *param.Error", tc.name, p, err)
			continue
		}
		if pe.Field != tc.field {
			t.Errorf("%s: field %q, want %q", tc.name, pe.Field, tc.field)
		}
		if tc.nonConvex && !strings.Contains(pe.Reason, "non-convex") {
			t.Errorf("%s: reason %q does not say non-convex", tc.name, pe.Reason)
		}
		if !strings.Contains(err.Error(), tc.field) {
			t.Errorf("%s: message %q does not name %q", tc.name, err, tc.field)
		}
	}
}

func TestStartG(t *testing.T) {
	for _, tt := range []float64{1e-6, 0.01, 1, 50} {
		p, _ := L1(0.3)
		g := p.StartG(tt)
		// docs/method.md section 3: threshold l1/g1 at two standard deviations.
		if th := 0.3 / g; math.Abs(th-2*math.Sqrt(tt)) > 1e-14*th {
			t.Errorf("l1: threshold %v at t = %v, want 2 sqrt(t) = %v", th, tt, 2*math.Sqrt(tt))
		}
		p, _ = Ridge(0)
		if g := p.StartG(tt); math.Abs(g-1/tt) > 1e-14/tt {
			t.Errorf("ridge l2=0: StartG(%v) = %v, want 1/t", tt, g)
		}
		for _, c := range cases(t) {
			if g := c.p.StartG(tt); !(g > 0) || math.IsInf(g, 0) {
				t.Errorf("%s: StartG(%v) = %v, want positive finite", c.name, tt, g)
			}
		}
	}
	for _, c := range cases(t) {
		for _, tt := range []float64{0, -1, math.NaN(), math.Inf(1)} {
			if g := c.p.StartG(tt); g != 1 {
				t.Errorf("%s: StartG(%v) = %v, want 1", c.name, tt, g)
			}
		}
	}
	// The power start is continuous in q at both ends.
	a, _ := Power(0.5, 1)
	b, _ := Power(0.5, 1+1e-9)
	if ga, gb := a.StartG(0.3), b.StartG(0.3); math.Abs(ga-gb) > 1e-8*ga {
		t.Errorf("power start jumps at q = 1: %v vs %v", ga, gb)
	}
	a, _ = Power(0.5, 2)
	b, _ = Power(0.5, 2-1e-9)
	if ga, gb := a.StartG(0.3), b.StartG(0.3); math.Abs(ga-gb) > 1e-8*ga {
		t.Errorf("power start jumps at q = 2: %v vs %v", ga, gb)
	}
}

func TestProxInfinities(t *testing.T) {
	for _, c := range cases(t) {
		for _, r := range []float64{math.Inf(1), math.Inf(-1)} {
			want := r
			if c.lo != c.hi {
				want = math.Max(c.lo, math.Min(c.hi, r))
			}
			if got := c.p.Prox(r, 1.3); got != want {
				t.Errorf("%s: Prox(%v) = %v, want %v", c.name, r, got, want)
			}
		}
		if got := c.p.Prox(math.NaN(), 1.3); !math.IsNaN(got) {
			t.Errorf("%s: Prox(NaN) = %v", c.name, got)
		}
	}
}
