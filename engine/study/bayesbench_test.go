package study

import "testing"

// BenchmarkBayesSparseLowNoise times the Bayes reference where its state evolution has
// several fixed points (the case of TestBayesSparseLowNoise at m/n = 0.25), and on a Laplace
// signal through its numerical posterior mean:
// go test ./engine/study -run XXX -bench BayesSparse
func BenchmarkBayesSparseLowNoise(b *testing.B) {
	for name, sig := range map[string]string{
		"bernoulli-rademacher": `{"law": "bernoulli-rademacher", "density": 0.15, "amplitude": 1}`,
		"laplace":              `{"law": "laplace", "scale": 1}`,
	} {
		b.Run(name, func(b *testing.B) {
			p, err := scen(b, gaussDesign(0.25, "rows"), sig, 1e-4, ridge(0.1)).Problem()
			if err != nil {
				b.Fatal(err)
			}
			for b.Loop() {
				if _, err := Bayes(p); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
