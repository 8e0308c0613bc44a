package protocol

import (
	"encoding/json"
	"math"
	"testing"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/simulate"
	"hdrisk/engine/study"
)

// TestMergeChecksGLM: the parts of a generalized model's check merge into the statistics of
// all their trials (cosine, norm ratio, test error, recomputed as simulate.Mean computes them),
// keep the predictions, and refuse to join a linear part.
func TestMergeChecksGLM(t *testing.T) {
	part := func(first int, mse, cos, te []float64) CheckResult {
		r := CheckResult{GLM: true, First: first, Trials: len(mse), N: 100, M: 200, Seed: 3, Solver: "primal-dual",
			Cosine: &CheckStat{Predicted: 0.8}, NormRatio: &CheckStat{Predicted: 0.5}, TestError: &CheckStat{Predicted: 0.2}}
		for i := range mse {
			r.PerTrial = append(r.PerTrial, CheckTrial{MSE: Num(mse[i]), Cosine: Num(cos[i]), NormRatio: Num(cos[i] / 2), TestError: Num(te[i]),
				Nonzero: Num(math.NaN()), TPP: Num(math.NaN()), FDP: Num(math.NaN()), Converged: true})
		}
		return r
	}
	a := part(0, []float64{0.1, 0.2}, []float64{0.7, 0.8}, []float64{0.21, 0.19})
	b := part(2, []float64{0.3}, []float64{0.9}, []float64{0.25})
	// Every part computes the prediction and warns of it alike; a trial's warning is its own.
	pred := "the prediction did not converge: slow"
	a.Warnings, b.Warnings = []string{"trial 1: not converged", pred}, []string{pred}
	m, err := MergeChecks([]CheckResult{b, a})
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Warnings) != 2 || m.Warnings[0] != "trial 1: not converged" || m.Warnings[1] != pred {
		t.Errorf("merged warnings %q: each once, in trial order", m.Warnings)
	}
	cos := simulate.Mean([]float64{0.7, 0.8, 0.9})
	te := simulate.Mean([]float64{0.21, 0.19, 0.25})
	if m.Trials != 3 || float64(m.Cosine.Mean) != cos.Mean || float64(m.Cosine.StdErr) != cos.StdErr ||
		float64(m.TestError.Mean) != te.Mean || float64(m.TestError.StdErr) != te.StdErr || m.TestError.Predicted != 0.2 ||
		float64(m.NormRatio.Mean) != simulate.Mean([]float64{0.35, 0.4, 0.45}).Mean || !math.IsNaN(float64(m.TPP.Mean)) {
		t.Errorf("merged %+v cosine %+v test error %+v", m, *m.Cosine, *m.TestError)
	}
	if a.Cosine.Mean != 0 {
		t.Error("merging wrote into a part's statistics")
	}
	// Through the codec: the pointers and the NaN of the linear columns survive.
	data, err := Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	var back CheckResult
	if err := json.Unmarshal(data, &back); err != nil || back.TestError == nil || back.TestError.Mean != m.TestError.Mean || !math.IsNaN(float64(back.PerTrial[0].TPP)) {
		t.Errorf("codec round trip: %v %+v", err, back.TestError)
	}
	lin := b
	lin.GLM, lin.Cosine, lin.NormRatio, lin.TestError = false, nil, nil, nil
	if _, err := MergeChecks([]CheckResult{a, lin}); err == nil {
		t.Error("a linear part merged into a generalized check")
	}
}

// TestCurvesCodec: the engine's curves-per-value result crosses the codec unchanged, its
// points packed.
func TestCurvesCodec(t *testing.T) {
	in := study.Curves{Over: "alpha", Field: "bits", Curves: []study.Curve{
		{Value: 1, Points: []study.Point{{X: 0.5, Result: fixedpoint.Result{MSE: 0.3, Converged: true, TestError: math.NaN()}}, {X: 1, Failed: "no minimizer"}}},
		{Value: 2, Points: []study.Point{{X: 0.5, Result: fixedpoint.Result{MSE: 0.1, Converged: true}}, {X: 1}}},
	}}
	data, err := Marshal(in)
	if err != nil {
		t.Fatal(err)
	}
	out, err := Curves.DecodeResult(data)
	if err != nil {
		t.Fatal(err)
	}
	if out.Over != "alpha" || out.Field != "bits" || len(out.Curves) != 2 || out.Curves[1].Value != 2 ||
		out.Curves[0].Points[1].Failed != "no minimizer" || out.Curves[0].Points[0].Result.MSE != 0.3 || !math.IsNaN(out.Curves[0].Points[0].Result.TestError) {
		t.Errorf("decoded %+v", out)
	}
	var probe struct {
		Curves []struct {
			Points struct {
				N int `json:"n"`
			} `json:"points"`
		} `json:"curves"`
	}
	if err := json.Unmarshal(data, &probe); err != nil || probe.Curves[0].Points.N != 2 {
		t.Errorf("the points are not packed: %v %s", err, data)
	}
}
