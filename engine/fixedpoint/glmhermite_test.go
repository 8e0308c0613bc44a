package fixedpoint

import (
	"math"
	"testing"

	"hdrisk/engine/loss"
	"hdrisk/engine/noise"
	"hdrisk/engine/readout"
)

// TestLogisticHermiteAccuracy measures the Gauss-Hermite rules of the logistic readout's
// output side (outerRules, docs/method.md section 11.3) against a dense reference: the graded
// Gauss-Legendre grid of labels with sub-intervals of a quarter standard deviation (four
// times finer than the grid the solver uses), over a lattice of states covering spreads of
// p1 up to the last rule's limit and beyond. At every state where a rule is chosen, Az, muz,
// sigz and the training observables agree with the reference to 1e-8 relative (sigz and
// the training misfit relative to their scale, sigz + tau and 1); the states beyond the rules'
// reach must fall back to the grid.
func TestLogisticHermiteAccuracy(t *testing.T) {
	worst, used, back := 0.0, 0, 0
	for _, ls := range []loss.Loss{loss.Logistic(), loss.Square()} {
		o := &outSide{rd: readout.Logistic(), ls: ls, levels: []float64{-1, 1}}
		for _, rz := range []float64{0.2, 0.5, 1, 2, 5} {
			o.rhoz = rz
			for _, g := range []float64{0.01, 0.05, 0.2, 1, 5, 30} {
				for _, mu1 := range []float64{0.1, 0.5, 1, 2} {
					for _, tau := range []float64{1e-3, 0.05, 0.5, 2, 6} {
						vp := mu1*mu1*rz + tau
						beta := mu1 * rz / vp
						if hx, _ := o.outerRule(g, vp, beta); hx == nil {
							back++
							if math.Sqrt(vp)*math.Max(1, math.Abs(beta)) <= outerRules[len(outerRules)-1].maxSD {
								t.Fatalf("rz %g g %g mu1 %g tau %g: no rule chosen inside the rules' reach", rz, g, mu1, tau)
							}
							continue
						}
						used++
						for _, train := range []bool{false, true} {
							o.train = train
							h := o.labels(g, mu1, tau)
							noHermite, labelsPanel = true, 0.25
							ref := o.labels(g, mu1, tau)
							noHermite, labelsPanel = false, 1
							e := math.Max(relDiff(h.az, ref.az), relDiff(h.muz, ref.muz))
							e = math.Max(e, math.Abs(h.sigz-ref.sigz)/(ref.sigz+tau))
							if train {
								e = math.Max(e, math.Max(relDiff(h.trainErr, ref.trainErr), relDiff(h.trainLoss, ref.trainLoss)))
								e = math.Max(e, math.Abs(h.misfit-ref.misfit))
							}
							if e > 1e-8 {
								t.Errorf("%s rz %g g %g mu1 %g tau %g (sd %.3g beta %.3g) train %v: relative difference %.3g from the dense grid", ls.Name(), rz, g, mu1, tau, math.Sqrt(vp), beta, train, e)
							}
							worst = math.Max(worst, e)
						}
						o.train = false
					}
				}
			}
		}
	}
	if used == 0 || back == 0 {
		t.Fatalf("the lattice must cover both paths: %d states on a rule, %d on the grid", used, back)
	}
	t.Logf("%d states on a Gauss-Hermite rule, %d on the grid; largest difference %.3g", used, back, worst)
}

// TestCellsSquareTrain: the training observables of a cell readout with the square loss in
// closed form (cellsSquareTrain) agree with labels' dense graded grid (sub-intervals of a
// quarter standard deviation) for the sign and a 2-bit readout, Gaussian and outlier noise.
func TestCellsSquareTrain(t *testing.T) {
	q2, err := readout.Quantize(2, 1.5)
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for _, rd := range []readout.Readout{readout.Sign(), q2} {
		for _, nz := range [][]noise.Component{{{Weight: 1, Var: 0.01}}, {{Weight: 0.9, Var: 0.01}, {Weight: 0.1, Var: 4}}} {
			o := &outSide{rd: rd, ls: loss.Square(), nz: nz, train: true}
			if c, ok := rd.(readout.Cells); ok {
				o.levels, o.cuts = c.Levels()
			} else {
				o.levels = []float64{-1, 1}
			}
			for _, rz := range []float64{0.1, 1, 3} {
				o.rhoz = rz
				for _, g := range []float64{0.05, 0.5, 5} {
					for _, mu1 := range []float64{0.3, 1} {
						for _, tau := range []float64{1e-3, 0.1, 1} {
							h := o.labels(g, mu1, tau)
							noHermite, labelsPanel = true, 0.25
							ref := o.labels(g, mu1, tau)
							noHermite, labelsPanel = false, 1
							e := math.Max(relDiff(h.trainErr, ref.trainErr), relDiff(h.trainLoss, ref.trainLoss))
							e = math.Max(e, math.Abs(h.misfit-ref.misfit))
							if e > 1e-9 {
								t.Errorf("%s rz %g g %g mu1 %g tau %g: %+v, dense grid %+v", rd.Name(), rz, g, mu1, tau, h, ref)
							}
							worst = math.Max(worst, e)
						}
					}
				}
			}
		}
	}
	t.Logf("largest difference %.3g", worst)
}

// TestLogisticTestErrorRule: the test error of the logistic readout (testError, sub-intervals
// of at most two standard deviations and 3) agrees with the same rule on sub-intervals eight
// times finer to 1e-12, over signal strengths and estimates from poor to sharp.
func TestLogisticTestErrorRule(t *testing.T) {
	o := &outSide{rd: readout.Logistic(), ls: loss.Logistic(), levels: []float64{-1, 1}}
	for _, rz := range []float64{0.05, 0.5, 2, 10, 50} {
		o.rhoz = rz
		for _, q := range []float64{0.01, 0.3, 1, 5, 40} {
			for _, corr := range []float64{-0.5, 0, 0.3, 0.9, 0.999} {
				c := corr * math.Sqrt(q*rz)
				e := o.testError(q, c)
				labelsPanel = 0.125
				ref := o.testError(q, c)
				labelsPanel = 1
				if math.Abs(e-ref) > 1e-12 {
					t.Errorf("rhoz %g q %g corr %g: test error %.15g, finer rule %.15g", rz, q, corr, e, ref)
				}
			}
		}
	}
}

// TestInnerRules: each inner Gauss-Hermite rule of P(y | p1) (innerRules) is within its stated
// accuracy of a 200-node rule over |m| <= 8 at every s it serves, relative to P, to 1 - P and
// to E[sigmoid'] (the tails keep their relative accuracy).
func TestInnerRules(t *testing.T) {
	rx, rw := hermiteNormal(200)
	mom := func(x, w []float64, m, s float64) (p, d float64) {
		for i := range x {
			sg := readout.Sigmoid(m + math.Sqrt(s)*x[i])
			p += w[i] * sg
			d += w[i] * sg * (1 - sg)
		}
		return p, d
	}
	worst := 0.0
	for _, s := range []float64{1e-4, 0.01, 0.05, 0.1, 0.2, 0.3, 0.4, 0.5, 0.75, 1} {
		r := innerRuleFor(s)
		tol := 2e-10
		if s > 0.5 {
			tol = 5e-10
		}
		for m := -8.0; m <= 8; m += 0.05 {
			p, d := mom(r.x, r.w, m, s)
			pr, dr := mom(rx, rw, m, s)
			e := math.Max(math.Abs(p-pr)/math.Min(pr, 1-pr), math.Abs(d-dr)/dr)
			if e > tol {
				t.Fatalf("s %g m %g: the %d-node rule is %.3g from the 200-node rule (tolerance %g)", s, m, r.n, e, tol)
			}
			worst = math.Max(worst, e)
		}
	}
	t.Logf("largest relative difference %.3g", worst)
}
