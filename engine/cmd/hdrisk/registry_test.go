package main

// This file adds a penalty the way a contributor would, in one place: a seven-piece
// penalty registered by an init-time call below, with no other file edited. The tests then
// find it in the scenario decoder, in the command line's kinds listing and --set flag, in
// the page editor's menu with its unit and domain, and sweep and tune its strengths.

import (
	"encoding/csv"
	"encoding/json"
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"

	"hdrisk/engine/param"
	"hdrisk/engine/penalty"
	"hdrisk/engine/scenario"
	"hdrisk/engine/signal"
	"hdrisk/ui"
)

// tiered is f(x) = l1 |x| + l3 max(|x| - width, 0): an l1 penalty whose slope rises from l1
// to l1 + l3 beyond the width. Its prox (a = l1/g, b = l3/g, w = width) is 0 for |r| < a,
// r - a up to w + a, flat at w up to w + a + b, and r - a - b beyond; odd in r.
type tiered struct{ l1, l3, width float64 }

func (p tiered) Name() string { return "tiered-l1" }

func (p tiered) Strengths() []penalty.Strength {
	return []penalty.Strength{{Name: "l1", Value: p.l1}, {Name: "l3", Value: p.l3}}
}

func (p tiered) Piecewise(g float64) penalty.Linear {
	a, b, w := p.l1/g, p.l3/g, p.width
	var l penalty.Linear
	l.Then(-(w + a + b), 1, a+b)
	l.Then(-(w + a), 0, -w)
	l.Then(-a, 1, a)
	l.Then(a, 0, 0)
	l.Then(w+a, 1, -a)
	l.Then(w+a+b, 0, w)
	l.Then(math.Inf(1), 1, -(a + b))
	return l
}

func (p tiered) HasZeroRegion() bool { return p.l1 > 0 }

// StartG takes the slope at two channel standard deviations, as the built-in penalties do.
func (p tiered) StartG(t float64) float64 {
	slope := p.l1
	if 2*math.Sqrt(t) > p.width {
		slope += p.l3
	}
	if g := slope / (2 * math.Sqrt(t)); g > 0 && !math.IsInf(g, 0) {
		return g
	}
	return 1
}

var tieredKind = penalty.Kind{Name: "tiered-l1", Help: "test only: l1 |x| + l3 max(|x| - width, 0)", Params: []param.Param{
	{Name: "l1", Unit: "loss per unit of |x|", Max: math.Inf(1), MaxOpen: true, Log: true, Role: param.Strength,
		Help: "slope of the penalty up to the width"},
	{Name: "l3", Unit: "loss per unit of |x| beyond the width", Max: math.Inf(1), MaxOpen: true, Log: true, Role: param.Strength,
		Help: "extra slope beyond the width"},
	{Name: "width", Unit: "units of x0", Max: math.Inf(1), MinOpen: true, MaxOpen: true, Log: true, Role: param.Scale,
		Help: "where the slope rises"},
}}

// tieredErr registers the penalty at package initialization, before any test reads a registry.
var tieredErr = penalty.Register(tieredKind, func(v map[string]float64) (penalty.Penalty, error) {
	for _, name := range []string{"l1", "l3"} {
		if !(v[name] >= 0) || math.IsInf(v[name], 0) {
			return nil, &param.Error{Field: name, Reason: "must be a finite number >= 0"}
		}
	}
	if !(v["width"] > 0) || math.IsInf(v["width"], 0) {
		return nil, &param.Error{Field: "width", Reason: "must be a finite number > 0"}
	}
	return penalty.FromPieces(tiered{v["l1"], v["l3"], v["width"]}), nil
})

// An invented scenario on the registered penalty.
const tieredScenario = `{"kind": "hdrisk.scenario", "version": 1, "title": "invented: tiered l1",
 "design": {"shape": "orthogonal", "alpha": 0.5, "scale": "rows"},
 "signal": {"law": "bernoulli-gauss", "density": 0.1, "variance": 1},
 "noise": {"variance": 0.01},
 "penalty": {"kind": "tiered-l1", "l1": 0.05, "l3": 0.2, "width": 0.5}}`

func registered(t *testing.T) {
	t.Helper()
	if tieredErr != nil {
		t.Fatal(tieredErr)
	}
}

// The prox the pieces state is the minimizer of f(x) + (g/2)(x - r)^2, checked against a
// fine grid search, and the closed-form moments of package signal match its quadrature
// path, which reads Prox and Deriv only.
func TestRegisteredPenaltyIsAProx(t *testing.T) {
	registered(t)
	p, err := penalty.New("tiered-l1", map[string]float64{"l1": 0.3, "l3": 0.5, "width": 0.7})
	if err != nil {
		t.Fatal(err)
	}
	f := func(x float64) float64 { return 0.3*math.Abs(x) + 0.5*math.Max(math.Abs(x)-0.7, 0) }
	for _, g := range []float64{0.5, 2} {
		for r := -3.0; r <= 3; r += 0.173 {
			best, bestX := math.Inf(1), 0.0
			for x := -4.0; x <= 4; x += 1e-4 {
				if v := f(x) + g/2*(x-r)*(x-r); v < best {
					best, bestX = v, x
				}
			}
			if got := p.Prox(r, g); math.Abs(got-bestX) > 2e-4 {
				t.Errorf("prox(%v; %v) = %v, grid minimizer %v", r, g, got, bestX)
			}
		}
	}
	law, err := signal.BernoulliGauss(0.2, 1)
	if err != nil {
		t.Fatal(err)
	}
	exact, quad := signal.Expect(law, p, 1.3, 0.4), signal.ExpectQuad(law, p, 1.3, 0.4)
	if math.Abs(exact.MSE-quad.MSE) > 1e-7 || math.Abs(exact.A-quad.A) > 1e-7 {
		t.Errorf("closed form %+v, quadrature %+v", exact, quad)
	}
}

func TestRegisteredPenaltyInDecoder(t *testing.T) {
	registered(t)
	s, err := scenario.Decode([]byte(tieredScenario))
	if err != nil {
		t.Fatal(err)
	}
	if v, err := s.Get("l3"); err != nil || v != 0.2 {
		t.Errorf("Get(l3) = %v, %v", v, err)
	}
	var strengths []string
	for _, p := range s.Paths() {
		if p.Object == "penalty" && p.Role == param.Strength {
			strengths = append(strengths, p.Name)
		}
	}
	if strings.Join(strengths, ",") != "l1,l3" {
		t.Errorf("strengths %v, want l1, l3", strengths)
	}
	for _, c := range []struct{ old, new, field, reason string }{
		{`"l3": 0.2`, `"l3": -1`, "penalty.l3", "must be in [0, +Inf), not -1"},
		{`"width": 0.5`, `"width": 0`, "penalty.width", "must be in (0, +Inf), not 0"},
		{`"l3": 0.2`, `"l3": 0.2, "q": 2`, "penalty.q", "not a parameter of penalty tiered-l1 (it takes l1, l3, width)"},
		{`, "width": 0.5`, ``, "penalty.width", "missing: penalty tiered-l1 needs l1, l3, width"},
	} {
		_, err := scenario.Decode([]byte(strings.Replace(tieredScenario, c.old, c.new, 1)))
		var fe *param.Error
		if !errors.As(err, &fe) || fe.Field != c.field || fe.Reason != c.reason {
			t.Errorf("%s: error %v, want %s: %s", c.new, err, c.field, c.reason)
		}
	}
}

func TestRegisteredPenaltyOnTheCommandLine(t *testing.T) {
	registered(t)
	out, errs, code := runCmd(t, "", "kinds")
	if code != 0 {
		t.Fatalf("kinds: exit %d: %s", code, errs)
	}
	for _, want := range []string{
		"  tiered-l1: test only: l1 |x| + l3 max(|x| - width, 0)\n",
		"      l3 (loss per unit of |x| beyond the width): ≥ 0 [strength]. extra slope beyond the width\n",
		"      width (units of x0): > 0 [scale]. where the slope rises\n",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("kinds does not list %q:\n%s", want, out)
		}
	}
	base := evalMSE(t, "eval", "-")
	more := evalMSE(t, "eval", "-", "--set", "penalty.l3=3")
	if base == more {
		t.Errorf("--set penalty.l3=3 left the MSE at %v", base)
	}
	_, errs, code = runCmd(t, tieredScenario, "eval", "-", "--set", "l3=-1")
	if code != 1 || !strings.Contains(errs, "penalty.l3: must be in [0, +Inf), not -1") {
		t.Errorf("--set l3=-1: exit %d, %q", code, errs)
	}
}

func evalMSE(t *testing.T, args ...string) float64 {
	t.Helper()
	out, errs, code := runCmd(t, tieredScenario, args...)
	if code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, errs)
	}
	var r struct {
		MSE       float64 `json:"mse"`
		Converged bool    `json:"converged"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil || !r.Converged {
		t.Fatalf("%v: %v, %s", args, err, out)
	}
	return r.MSE
}

func TestRegisteredPenaltyInTheEditor(t *testing.T) {
	registered(t)
	g, ok := ui.FindGroup("penalty")
	if !ok {
		t.Fatal("no penalty group")
	}
	var kind *ui.Kind
	for i := range g.Kinds {
		if g.Kinds[i].Name == "tiered-l1" {
			kind = &g.Kinds[i]
		}
	}
	if kind == nil || kind.Help != tieredKind.Help || len(kind.Params) != 3 {
		t.Fatalf("the editor's penalty menu lacks tiered-l1 with its three parameters: %+v", kind)
	}
	for i, p := range kind.Params {
		want := tieredKind.Params[i]
		if p.Name != want.Name || p.Unit != want.Unit || p.Range() != want.Range() || p.Help != want.Help {
			t.Errorf("editor parameter %+v, registry %+v", p, want)
		}
	}
	m := ui.NewModel()
	if err := m.SetKind("penalty", "tiered-l1"); err != nil {
		t.Fatal(err)
	}
	_ = m.SetText("in-penalty-tiered-l1-l3", "-2")
	if msg := m.Check().Invalid["in-penalty-tiered-l1-l3"]; msg != "penalty.l3: -2 is out of range: must be ≥ 0" {
		t.Errorf("l3 = -2 marked %q", msg)
	}
	_ = m.SetText("in-penalty-tiered-l1-l3", "0.4")
	c := m.Check()
	if c.Err != nil || c.Scenario.Penalty.Kind != "tiered-l1" || c.Scenario.Penalty.Params["l3"] != 0.4 {
		t.Errorf("editor scenario %+v, %v", c.Scenario.Penalty, c.Err)
	}
}

// Its strengths are swept and tuned like the built-in ones: best picks l1 (the first
// strength) unless told, and the best l3 is no worse than any point of a sweep over l3.
func TestRegisteredPenaltySweptAndTuned(t *testing.T) {
	registered(t)
	out, errs, code := runCmd(t, tieredScenario, "sweep", "-", "--over", "l3", "--from", "0.01", "--to", "10", "--points", "13", "--log")
	if code != 0 {
		t.Fatalf("sweep: exit %d: %s", code, errs)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil || len(rows) != 14 || rows[0][0] != "l3" || rows[0][1] != "mse" {
		t.Fatalf("sweep CSV %v, %v", rows, err)
	}
	lowest := math.Inf(1)
	for _, r := range rows[1:] {
		v, err := strconv.ParseFloat(r[1], 64)
		if err != nil || r[len(r)-1] != "ok" {
			t.Fatalf("sweep row %v", r)
		}
		lowest = math.Min(lowest, v)
	}
	var b struct {
		Over    string             `json:"over"`
		Value   float64            `json:"value"`
		MSE     float64            `json:"mse"`
		AtBound string             `json:"at_bound"`
		Penalty map[string]float64 `json:"penalty"`
	}
	out, errs, code = runCmd(t, tieredScenario, "best", "-", "--over", "l3", "--lo", "0.01", "--hi", "10")
	if code != 0 || json.Unmarshal([]byte(out), &b) != nil {
		t.Fatalf("best --over l3: exit %d: %s %s", code, errs, out)
	}
	if b.Over != "l3" || b.MSE > lowest*(1+1e-9) || b.Penalty["l3"] != b.Value || b.Penalty["l1"] != 0.05 {
		t.Errorf("best over l3: %+v; the sweep's lowest MSE is %v", b, lowest)
	}
	out, errs, code = runCmd(t, tieredScenario, "best", "-")
	if code != 0 || json.Unmarshal([]byte(out), &b) != nil || b.Over != "l1" {
		t.Errorf("best with no --over: exit %d, over %q: %s", code, b.Over, errs)
	}
}
