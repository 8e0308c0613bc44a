package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"strings"
)

// An invented scenario for the examples: the LASSO on a sparse signal.
const exampleScenario = `{"kind": "hdrisk.scenario", "version": 1, "title": "Invented example",
 "design": {"shape": "gaussian", "alpha": 0.5},
 "signal": {"law": "bernoulli-gauss", "density": 0.1, "variance": 1},
 "noise": {"variance": 0.01},
 "penalty": {"kind": "l1", "l1": 0.1}}`

// hdrisk runs the command line as a shell would, with the scenario on standard input, and
// returns its exit status and standard output.
func hdrisk(args ...string) (int, string) {
	var out bytes.Buffer
	code := run(args, strings.NewReader(exampleScenario), &out, os.Stderr)
	return code, out.String()
}

// hdrisk eval - < scenario.json: the predicted error of one fixed point, as JSON.
func Example_eval() {
	code, out := hdrisk("eval", "-")
	var r struct {
		NMSEdB    float64 `json:"nmse_db"`
		Converged bool    `json:"converged"`
	}
	err := json.Unmarshal([]byte(out), &r)
	fmt.Printf("exit %d, %v: nmse_db %.2f, converged %v\n", code, err, r.NMSEdB, r.Converged)
	// Output:
	// exit 0, <nil>: nmse_db -8.91, converged true
}

// hdrisk sweep - --over l1 --from 0.01 --to 1 --points 3 --log: one CSV row per value.
func Example_sweep() {
	code, out := hdrisk("sweep", "-", "--over", "l1", "--from", "0.01", "--to", "1", "--points", "3", "--log")
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	fmt.Println("exit", code, err, "header", rows[0][:3])
	for _, r := range rows[1:] {
		var l1, nmse float64
		fmt.Sscan(r[0], &l1)
		fmt.Sscan(r[2], &nmse)
		fmt.Printf("l1 %.3g: nmse %.4f, %s\n", l1, nmse, r[len(r)-1])
	}
	// Output:
	// exit 0 <nil> header [l1 mse nmse]
	// l1 0.01: nmse 0.1879, ok
	// l1 0.1: nmse 0.1286, ok
	// l1 1: nmse 0.8928, ok
}

// hdrisk best -: the weight with the lowest MSE; the first strength of the penalty (here
// l1) when no --over is given.
func Example_best() {
	code, out := hdrisk("best", "-")
	var b struct {
		Over    string  `json:"over"`
		Value   float64 `json:"value"`
		NMSEdB  float64 `json:"nmse_db"`
		AtBound string  `json:"at_bound"`
	}
	err := json.Unmarshal([]byte(out), &b)
	fmt.Printf("exit %d, %v: over %s, best value %.3f, nmse_db %.2f, at a bound %q\n", code, err, b.Over, b.Value, b.NMSEdB, b.AtBound)
	// Output:
	// exit 0, <nil>: over l1, best value 0.064, nmse_db -9.27, at a bound ""
}
