package study

import (
	"context"
	"fmt"
	"strings"
	"testing"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/scenario"
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

// ownSpectrum is a scenario on an own spectrum of n distinct singular values (none merge
// into a shared atom), the case where rebuilding the design at every point costs most.
func ownSpectrum(b testing.TB, n int) scenario.Scenario {
	b.Helper()
	var sb strings.Builder
	for i := range n {
		if i > 0 {
			sb.WriteByte(',')
		}
		fmt.Fprintf(&sb, "%.9g", 0.2+1.8*float64(i)/float64(n-1))
	}
	return scen(b, `{"shape": "empirical-sv", "alpha": 0.6, "values": [`+sb.String()+`]}`, bgSignal(0.1, 1), 0.01, lasso(0.1))
}

// BenchmarkOwnSpectrumSweep200 is a 200-point l1 sweep over a 100000-value own spectrum
// (goal: 1 s). Its sub-benchmarks split a point into its parts: "bind-at" is what the sweep
// pays per point besides the solver (binding l1 and setting it), "with-problem" what it paid
// before the path was bound once (scenario.With, then Problem), and "solve" one warm fixed
// point. The per-point figures are reported as ns/point.
func BenchmarkOwnSpectrumSweep200(b *testing.B) {
	s := ownSpectrum(b, 100000)
	spec := SweepSpec{Axis: Axis{Over: "l1", From: 1e-3, To: 1, Points: 200, Log: true}}
	b.Run("sweep", func(b *testing.B) {
		for b.Loop() {
			pts, err := Sweep(context.Background(), s, spec, nil)
			if err != nil || len(pts) != 200 || !pts[199].OK() {
				b.Fatal(err)
			}
		}
	})
	c, err := s.Check()
	if err != nil {
		b.Fatal(err)
	}
	bind, err := c.Bind("l1")
	if err != nil {
		b.Fatal(err)
	}
	b.Run("bind-at", func(b *testing.B) {
		i := 0
		for b.Loop() {
			if _, err := bind.At(0.01 + float64(i%100)*1e-3); err != nil {
				b.Fatal(err)
			}
			i++
		}
	})
	b.Run("with-problem", func(b *testing.B) {
		i := 0
		for b.Loop() {
			w, err := s.With("l1", 0.01+float64(i%100)*1e-3)
			if err == nil {
				_, err = w.Problem()
			}
			if err != nil {
				b.Fatal(err)
			}
			i++
		}
	})
	b.Run("solve", func(b *testing.B) {
		p := c.Problem()
		r, err := fixedpoint.Solve(p, fixedpoint.Options{})
		if err != nil || !r.Converged {
			b.Fatal(err)
		}
		st := r.State()
		at, _ := bind.At(0.11)
		for b.Loop() {
			if _, err := fixedpoint.Solve(at.Problem(), fixedpoint.Options{Start: &st}); err != nil {
				b.Fatal(err)
			}
		}
	})
}
