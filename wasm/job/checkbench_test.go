package job

import (
	"os"
	"testing"

	"hdrisk/protocol"
)

// BenchmarkCheckPage500 is the page's finite-size check of the budget (n = 500, 20 trials, the
// LASSO example, cd with fast factors) run by the job as one part; under GOOS=js it measures what
// one page worker pays for the same work.
func BenchmarkCheckPage500(b *testing.B) {
	scen, err := os.ReadFile("/tmp/scen/lasso.json")
	if err != nil {
		b.Skip(err)
	}
	for b.Loop() {
		if _, err := Check(protocol.CheckArgs{Scenario: scen, N: 500, Trials: 20, Seed: 1, Solver: "cd", Factors: "fast"}, nil); err != nil {
			b.Fatal(err)
		}
	}
}

func TestCheckPage500Iterations(t *testing.T) {
	scen, err := os.ReadFile("/tmp/scen/lasso.json")
	if err != nil {
		t.Skip(err)
	}
	r, err := Check(protocol.CheckArgs{Scenario: scen, N: 500, Trials: 20, Seed: 1, Solver: "cd", Factors: "fast"}, nil)
	if err != nil {
		t.Fatal(err)
	}
	it, sec := 0, 0.0
	for _, p := range r.PerTrial {
		it += p.Iterations
		sec += float64(p.Seconds)
	}
	t.Logf("iterations %d, trial seconds %.3f, note %q, total %.3f", it, sec, r.SolverNote, float64(r.Seconds))
}
