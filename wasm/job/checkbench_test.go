package job

import (
	"testing"

	"hdrisk/protocol"
)

// BenchmarkCheckPage500 is the page's finite-size check of the budget (n = 500, 20 trials, the
// LASSO on an orthogonal design, cd asked) as one part; run under GOOS=js GOARCH=wasm
// (DEVELOPERS.md, "Benchmarks") it measures what one page worker pays for the same work.
func BenchmarkCheckPage500(b *testing.B) {
	args := protocol.CheckArgs{Scenario: []byte(warmScenarios[0]), N: 500, Trials: 20, Seed: 1, Solver: "cd", Factors: "fast"}
	for b.Loop() {
		if _, err := Check(args, nil); err != nil {
			b.Fatal(err)
		}
	}
}
