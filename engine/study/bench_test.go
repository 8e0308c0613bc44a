package study

import (
	"context"
	"testing"
)

// The budgets (architecture.md): a 200-point regularization sweep within 50 ms and a 100 x 100
// map within 1 s on two cores, both on the closed-form path (a Gaussian-mixture signal and a
// piecewise-linear prox). Measured here, not asserted in a timed test.

func BenchmarkSweep200(b *testing.B) {
	s := scen(b, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.1))
	spec := SweepSpec{Axis: Axis{Over: "l1", From: 1e-3, To: 10, Points: 200, Log: true}}
	for b.Loop() {
		pts, err := Sweep(context.Background(), s, spec, nil)
		if err != nil || len(pts) != 200 {
			b.Fatal(err)
		}
	}
}

func BenchmarkMap100x100TwoWorkers(b *testing.B) {
	s := scen(b, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.1))
	spec := MapSpec{
		X: Axis{Over: "l1", From: 1e-3, To: 10, Points: 100, Log: true},
		Y: Axis{Over: "alpha", From: 0.1, To: 2, Points: 100},
	}
	for b.Loop() {
		g, err := Map(context.Background(), s, spec, 2, nil)
		if err != nil || len(g.Cells) != 10000 {
			b.Fatal(err)
		}
	}
}

func BenchmarkBest(b *testing.B) {
	s := scen(b, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.1))
	for b.Loop() {
		if _, err := Best(context.Background(), s, BestSpec{}); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkBayes(b *testing.B) {
	p, err := scen(b, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.1)).Problem()
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, err := Bayes(p); err != nil {
			b.Fatal(err)
		}
	}
}
