package study_test

import (
	"context"
	"fmt"

	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
)

// A sweep of the LASSO's weight: each point is warm-started from the last, and the lowest
// error along the sweep is where Best would start its search.
func ExampleSweep() {
	s, err := scenario.Decode([]byte(`{"kind": "hdrisk.scenario", "version": 1,
		"title": "Invented example: a sweep",
		"design": {"shape": "gaussian", "alpha": 0.5},
		"signal": {"law": "bernoulli-gauss", "density": 0.1, "variance": 1},
		"noise": {"variance": 0.01},
		"penalty": {"kind": "l1", "l1": 0.1}}`))
	if err != nil {
		fmt.Println(err)
		return
	}
	spec := study.SweepSpec{Axis: study.Axis{Over: "l1", From: 0.01, To: 1, Points: 5, Log: true}}
	pts, err := study.Sweep(context.Background(), s, spec, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, p := range pts {
		fmt.Printf("l1 %-6.3g NMSE %6.2f dB  %s\n", p.X, p.Result.NMSEdB, p.Status())
	}
	// Output:
	// l1 0.01   NMSE  -7.26 dB  ok
	// l1 0.0316 NMSE  -8.71 dB  ok
	// l1 0.1    NMSE  -8.91 dB  ok
	// l1 0.316  NMSE  -4.70 dB  ok
	// l1 1      NMSE  -0.49 dB  ok
}
