package fixedpoint

import (
	"fmt"
	"math"
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

// The coarse start (docs/method.md section 3.6) changes where the full iteration starts, not
// the fixed point: over a grid of designs, sampling ratios, noise levels, scale-mixture laws
// and penalties, Solve with it must give the plain cold start's result to 1e-9 relative
// (measured at most 3.7e-10, the solver's tolerance being 1e-10 in the residual), the same
// flags, and on average fewer evaluations of the full mixture.
func TestCoarseStart(t *testing.T) {
	designs := []design.Law{
		must(design.Gaussian(0.2, design.Rows)), must(design.Gaussian(0.5, design.Rows)),
		must(design.Gaussian(1, design.Rows)), must(design.Gaussian(2, design.Columns)),
		must(design.Orthogonal(0.5, design.Rows)), must(design.UniformSV(0.7, 0.5, 2, design.Rows)),
	}
	// A long Gaussian mixture of one mean: 30 variances from 1e-3 to 10, equal weights.
	w, mu, v := make([]float64, 30), make([]float64, 30), make([]float64, 30)
	for i := range w {
		w[i], v[i] = 1.0/30, 1e-3*math.Pow(1e4, float64(i)/29)
	}
	laws := []signal.Law{
		must(signal.GaussMixture(w, mu, v)), must(signal.StudentT(5, 1)), must(signal.StudentT(2.5, 3)),
		must(signal.StudentT(3, 1)), must(signal.StudentT(30, 0.01)), must(signal.StudentT(1e4, 1)),
	}
	pens := []penalty.Penalty{must(penalty.L1(0.02)), must(penalty.L1(0.3)), must(penalty.L1(2)), must(penalty.ElasticNet(0.3, 0.5))}
	const tol = 1e-9
	worst := 0.0
	itCoarse, itPlain, n := 0, 0, 0
	for _, d := range designs {
		for _, l := range laws {
			for _, pen := range pens {
				for _, noise := range []float64{0, 1e-4, 0.01, 1} {
					noise *= l.Second()
					p := Problem{Design: d, Signal: l, Penalty: pen, Noise: noise}
					name := fmt.Sprintf("alpha %g %s (%v) %v noise %g", d.Alpha(), l.Name(), l.Second(), pen, noise)
					got, err := Solve(p, Options{})
					want, errWant := Solve(p, Options{noCoarse: true})
					if (err == nil) != (errWant == nil) {
						t.Errorf("%s: error %v, plain %v", name, err, errWant)
						continue
					}
					if err != nil {
						continue
					}
					if got.Converged != want.Converged || got.EstimateZero != want.EstimateZero || got.Floor != want.Floor || got.Note != want.Note {
						t.Errorf("%s: converged %v zero %v floor %v (%q), plain %v %v %v (%q)", name, got.Converged, got.EstimateZero, got.Floor, got.Note, want.Converged, want.EstimateZero, want.Floor, want.Note)
					}
					pairs := [][3]float64{
						{got.MSE, want.MSE, 1e-12 * l.Second()}, {got.G1, want.G1, 0}, {got.T1, want.T1, 0},
						{got.G2, want.G2, 1e-12}, {got.Susceptibility, want.Susceptibility, 0},
						{got.NonZero, want.NonZero, 1e-12}, {got.TPP, want.TPP, 1e-12}, {got.FDP, want.FDP, 1e-12},
						{got.TrainError, want.TrainError, 1e-12 * l.Second()},
					}
					for k, q := range pairs {
						e := math.Abs(q[0]-q[1]) / math.Max(math.Abs(q[1]), q[2])
						worst = math.Max(worst, e)
						if !(e <= tol) {
							t.Errorf("%s: quantity %d is %.15g, plain %.15g (relative %.2g)", name, k, q[0], q[1], e)
						}
					}
					itCoarse += got.Iterations
					itPlain += want.Iterations
					n++
				}
			}
		}
	}
	t.Logf("%d problems: largest relative difference %.2g; full iterations %.2f per problem, plain %.2f", n, worst, float64(itCoarse)/float64(n), float64(itPlain)/float64(n))
	if n < len(designs)*len(laws)*len(pens)*3 {
		t.Errorf("only %d of the problems solved", n)
	}
	if !(float64(itCoarse) < 0.6*float64(itPlain)) {
		t.Errorf("the coarse start takes %d full iterations, the plain cold start %d: it no longer saves any", itCoarse, itPlain)
	}
}
