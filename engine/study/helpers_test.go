package study

import (
	"fmt"
	"math"
	"testing"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/scenario"
)

// scen builds an invented scenario from the JSON objects of its parts.
func scen(t testing.TB, design, sig string, noise float64, pen string) scenario.Scenario {
	t.Helper()
	doc := fmt.Sprintf(`{"kind": "hdrisk.scenario", "version": 1, "title": "invented test case",
		"design": %s, "signal": %s, "noise": {"variance": %v}, "penalty": %s}`, design, sig, noise, pen)
	s, err := scenario.Decode([]byte(doc))
	if err != nil {
		t.Fatalf("scenario %s: %v", doc, err)
	}
	return s
}

func gaussDesign(alpha float64, scale string) string {
	return fmt.Sprintf(`{"shape": "gaussian", "alpha": %v, "scale": %q}`, alpha, scale)
}

func orthoDesign(alpha float64, scale string) string {
	return fmt.Sprintf(`{"shape": "orthogonal", "alpha": %v, "scale": %q}`, alpha, scale)
}

func bgSignal(density, variance float64) string {
	return fmt.Sprintf(`{"law": "bernoulli-gauss", "density": %v, "variance": %v}`, density, variance)
}

func gaussSignal(variance float64) string {
	return fmt.Sprintf(`{"law": "gauss", "variance": %v}`, variance)
}

func lasso(l1 float64) string { return fmt.Sprintf(`{"kind": "l1", "l1": %v}`, l1) }

func ridge(l2 float64) string { return fmt.Sprintf(`{"kind": "ridge", "l2": %v}`, l2) }

func relDiff(a, b float64) float64 {
	return math.Abs(a-b) / math.Max(math.Abs(b), 1e-300)
}

// solveCold solves s from the solver's own start.
func solveCold(t testing.TB, s scenario.Scenario) fixedpoint.Result {
	t.Helper()
	p, err := s.Problem()
	if err != nil {
		t.Fatal(err)
	}
	r, err := fixedpoint.Solve(p, fixedpoint.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return r
}
