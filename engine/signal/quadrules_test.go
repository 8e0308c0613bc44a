package signal

import (
	"math"
	"sort"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// Gauss-Hermite nodes and weights of gonum's quad.Hermite against Abramowitz & Stegun,
// Handbook of Mathematical Functions, Table 25.10 (values from memory, confirmed by the check
// itself). Both are for the weight exp(-x^2) (gonum's doc: int e^(-x^2) f(x) dx), so no
// conversion is needed; the conversion to the standard normal (nodes x sqrt(2), weights
// / sqrt(pi)) is then checked on E[Z^2] = 1 and E[Z^4] = 3.
func TestGaussHermiteAbramowitzStegun(t *testing.T) {
	table := map[int][][2]float64{ // n: {x_i >= 0, w_i}
		2: {{0.707106781186548, 0.886226925452758}},
		3: {{0, 1.181635900603677}, {1.224744871391589, 0.295408975150919}},
		4: {{0.524647623275290, 0.804914090005513}, {1.650680123885785, 0.081312835447245}},
		5: {{0, 0.945308720482942}, {0.958572464613819, 0.393619323152241}, {2.020182870456086, 0.019953242059046}},
	}
	for n, rows := range table {
		x := make([]float64, n)
		w := make([]float64, n)
		quad.Hermite{}.FixedLocations(x, w, math.Inf(-1), math.Inf(1))
		idx := make([]int, n)
		for i := range idx {
			idx[i] = i
		}
		sort.Slice(idx, func(a, b int) bool { return x[idx[a]] < x[idx[b]] })
		for _, row := range rows {
			found := 0
			for _, i := range idx {
				if math.Abs(math.Abs(x[i])-row[0]) < 1e-12 {
					found++
					if math.Abs(w[i]-row[1]) > 1e-12 {
						t.Errorf("n=%d: weight at %v is %.15f, A&S %.15f", n, x[i], w[i], row[1])
					}
				}
			}
			if want := map[bool]int{true: 1, false: 2}[row[0] == 0]; found != want {
				t.Errorf("n=%d: node +-%v found %d times, want %d (nodes %v)", n, row[0], found, want, x)
			}
		}
		z2, z4 := 0.0, 0.0
		for i := range x {
			z, p := x[i]*math.Sqrt2, w[i]/math.Sqrt(math.Pi)
			z2 += p * z * z
			z4 += p * z * z * z * z
		}
		if math.Abs(z2-1) > 1e-14 || (n >= 3 && math.Abs(z4-3) > 1e-13) {
			t.Errorf("n=%d: standard normal moments E[Z^2] = %v, E[Z^4] = %v", n, z2, z4)
		}
	}
}
