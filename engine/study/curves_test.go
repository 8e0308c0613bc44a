package study

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"math"
	"reflect"
	"strings"
	"testing"

	"hdrisk/engine/param"
	"hdrisk/engine/scenario"
)

// oneBit is an invented 1-bit scenario: a quantizer of one bit on a Bernoulli-Gauss signal.
func oneBit(t *testing.T) scenario.Scenario {
	t.Helper()
	s, err := scenario.Decode([]byte(`{"kind": "hdrisk.scenario", "version": 1, "title": "invented 1-bit case",
		"design": {"shape": "gaussian", "alpha": 2, "scale": "rows"},
		"signal": {"law": "bernoulli-gauss", "density": 0.2, "variance": 1}, "noise": {"variance": 0.01},
		"penalty": {"kind": "l1", "l1": 0.05}, "readout": {"kind": "quantize", "bits": 1, "range": 1}}`))
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// TestSweepCurvesEqualsSweeps: each curve of a curves-per-value sweep is exactly the plain
// sweep of the scenario with the second field set to its value, for a generalized model
// (bits) and for the linear one (a penalty weight over m/n), points and status alike.
func TestSweepCurvesEqualsSweeps(t *testing.T) {
	lin := scen(t, orthoDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.1))
	for _, tc := range []struct {
		name   string
		s      scenario.Scenario
		over   string
		from   float64
		to     float64
		curves string
		at     []float64
	}{
		{"bits", oneBit(t), "alpha", 0.5, 4, "bits", []float64{1, 2, 3, 4}},
		{"l1", lin, "alpha", 0.2, 1.5, "l1", []float64{0.01, 0.1, 1}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c, err := tc.s.Check()
			if err != nil {
				t.Fatal(err)
			}
			spec := CurvesSpec{SweepSpec: SweepSpec{Axis: Axis{Over: tc.over, From: tc.from, To: tc.to, Points: 12}},
				Curves: tc.curves, At: tc.at}
			calls := 0
			got, err := SweepCurves(context.Background(), c, spec, func(done, total int) {
				calls++
				if done != calls || total != 12*len(tc.at) {
					t.Errorf("progress %d/%d at call %d", done, total, calls)
				}
			})
			if err != nil {
				t.Fatal(err)
			}
			if got.Over != tc.over || got.Field != tc.curves || len(got.Curves) != len(tc.at) {
				t.Fatalf("result %s/%s with %d curves", got.Over, got.Field, len(got.Curves))
			}
			for k, v := range tc.at {
				sv, err := tc.s.With(tc.curves, v)
				if err != nil {
					t.Fatal(err)
				}
				want, err := Sweep(context.Background(), sv, spec.SweepSpec, nil)
				if err != nil {
					t.Fatal(err)
				}
				cv := got.Curves[k]
				if cv.Value != v || !reflect.DeepEqual(cv.Points, want) {
					t.Errorf("%s = %g: the curve differs from the sweep at that value", tc.curves, v)
				}
				ok := 0
				for _, p := range cv.Points {
					if p.OK() {
						ok++
					}
				}
				if ok == 0 {
					t.Errorf("%s = %g: no point of the curve converged", tc.curves, v)
				}
			}
			// The curves differ from one another: the second field was set.
			if a, b := got.Curves[0].Points[5].Result.MSE, got.Curves[len(tc.at)-1].Points[5].Result.MSE; a == b || math.IsNaN(a) {
				t.Errorf("the first and last curves have the same MSE %v at one point", a)
			}
		})
	}
}

// TestSweepCurvesRefusals: each refusal names its setting before anything is solved.
func TestSweepCurvesRefusals(t *testing.T) {
	c, err := oneBit(t).Check()
	if err != nil {
		t.Fatal(err)
	}
	ax := SweepSpec{Axis: Axis{Over: "alpha", From: 0.5, To: 4, Points: 5}}
	for _, tc := range []struct {
		curves string
		at     []float64
		field  string
	}{
		{"", []float64{1}, "curves"},
		{"bits", nil, "curves_at"},
		{"bits", make([]float64, MaxCurves+1), "curves_at"},
		{"nosuch", []float64{1}, "curves"},
		{"alpha", []float64{1, 2}, "curves"},
		{"bits", []float64{1, 0}, "curves_at[1]"},
		{"bits", []float64{1, 1.5}, "curves_at[1]"},
	} {
		_, err := SweepCurves(context.Background(), c, CurvesSpec{SweepSpec: ax, Curves: tc.curves, At: tc.at}, nil)
		var pe *param.Error
		if !errors.As(err, &pe) || !strings.HasPrefix(pe.Field, tc.field) {
			t.Errorf("curves %q at %v: %v, want a refusal naming %s", tc.curves, tc.at, err, tc.field)
		}
	}
}

// TestWriteCurvesCSV: one header with the second field first, then each curve's rows with
// its value in that column, the rest as WriteCSV writes them.
func TestWriteCurvesCSV(t *testing.T) {
	c, err := oneBit(t).Check()
	if err != nil {
		t.Fatal(err)
	}
	cs, err := SweepCurves(context.Background(), c, CurvesSpec{SweepSpec: SweepSpec{Axis: Axis{Over: "alpha", From: 1, To: 3, Points: 3}},
		Curves: "bits", At: []float64{1, 3}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := WriteCurvesCSV(&b, cs); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 7 || rows[0][0] != "bits" || rows[0][1] != "alpha" || !strings.Contains(strings.Join(rows[0], ","), "cosine") {
		t.Fatalf("rows %v", rows)
	}
	for i, want := range []string{"1", "1", "1", "3", "3", "3"} {
		if rows[i+1][0] != want || rows[i+1][1] != []string{"1", "2", "3"}[i%3] {
			t.Errorf("row %d: %v", i+1, rows[i+1][:2])
		}
	}
	var one bytes.Buffer
	if err := WriteCSV(&one, []string{"alpha"}, cs.Curves[1].Points); err != nil {
		t.Fatal(err)
	}
	plain, _ := csv.NewReader(&one).ReadAll()
	if !reflect.DeepEqual(rows[4][1:], plain[1]) {
		t.Errorf("row of the second curve %v, WriteCSV %v", rows[4][1:], plain[1])
	}
}

// TestSweepCurvesBlocks: a curves-per-value sweep shared out in blocks of points gives, block
// after block, the unsplit curves at exactly the same values, to the fixed point's tolerance:
// a block starts cold where the whole curve is warm-started (linear and generalized models
// alike); relative change of the state below 1e-10, fixedpoint.Options.Tol, so 1e-9 relative
// on the MSE is the bound.
func TestSweepCurvesBlocks(t *testing.T) {
	lin := scen(t, orthoDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.1))
	for _, tc := range []struct {
		name   string
		s      scenario.Scenario
		curves string
		at     []float64
	}{
		{"bits", oneBit(t), "bits", []float64{1, 3}},
		{"l1", lin, "l1", []float64{0.01, 0.1}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c, err := tc.s.Check()
			if err != nil {
				t.Fatal(err)
			}
			spec := CurvesSpec{SweepSpec: SweepSpec{Axis: Axis{Over: "alpha", From: 0.3, To: 3, Points: 21, Log: true}}, Curves: tc.curves, At: tc.at}
			whole, err := SweepCurves(context.Background(), c, spec, nil)
			if err != nil {
				t.Fatal(err)
			}
			worst := 0.0
			for _, b := range [][2]int{{0, 7}, {7, 8}, {8, 21}} {
				bs := spec
				bs.PointFrom, bs.PointTo = b[0], b[1]
				calls := 0
				part, err := SweepCurves(context.Background(), c, bs, func(done, total int) {
					calls++
					if done != calls || total != len(tc.at)*(b[1]-b[0]) {
						t.Errorf("block %v: progress %d/%d at call %d", b, done, total, calls)
					}
				})
				if err != nil {
					t.Fatal(err)
				}
				for k, cv := range part.Curves {
					if cv.Value != tc.at[k] || len(cv.Points) != b[1]-b[0] {
						t.Fatalf("block %v curve %d: value %g, %d points", b, k, cv.Value, len(cv.Points))
					}
					for i, p := range cv.Points {
						w := whole.Curves[k].Points[b[0]+i]
						if p.X != w.X || p.OK() != w.OK() || !w.OK() {
							t.Fatalf("block %v curve %d point %d: x %v (%s), whole %v (%s)", b, k, i, p.X, p.Status(), w.X, w.Status())
						}
						d := math.Abs(p.Result.MSE-w.Result.MSE) / w.Result.MSE
						worst = math.Max(worst, d)
						if d > 1e-9 {
							t.Errorf("block %v curve %d point %d: MSE %v, whole %v", b, k, i, p.Result.MSE, w.Result.MSE)
						}
					}
				}
			}
			t.Logf("largest relative difference of the MSE, blocks against the whole curves: %.3g", worst)
		})
	}
	c, _ := lin.Check()
	for _, b := range [][2]int{{-1, 3}, {3, 3}, {5, 22}} {
		spec := CurvesSpec{SweepSpec: SweepSpec{Axis: Axis{Over: "alpha", From: 0.3, To: 3, Points: 21}}, Curves: "l1", At: []float64{0.1}, PointFrom: b[0], PointTo: b[1]}
		var pe *param.Error
		if _, err := SweepCurves(context.Background(), c, spec, nil); !errors.As(err, &pe) || pe.Field != "points" {
			t.Errorf("block %v: %v, want an error naming points", b, err)
		}
	}
}
