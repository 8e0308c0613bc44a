package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
)

// An invented 1-bit scenario: one bit of a quantizer on a sparse signal, Gaussian design.
const bitsScenario = `{"kind": "hdrisk.scenario", "version": 1, "title": "invented: 1-bit readout",
 "design": {"shape": "gaussian", "alpha": 2, "scale": "rows"},
 "signal": {"law": "bernoulli-gauss", "density": 0.2, "variance": 1},
 "noise": {"variance": 0.01},
 "penalty": {"kind": "l1", "l1": 0.05},
 "readout": {"kind": "quantize", "bits": 1, "range": 1}}`

// sweep --curves bits=1,2,3,4 writes one CSV with a bits column, each curve's rows equal to
// the engine's curves-per-value study, and --figure draws the four curves with a legend;
// the settings may also come from the scenario's study.sweep.
func TestSweepCurvesCommand(t *testing.T) {
	path := filepath.Join(t.TempDir(), "bits.svg")
	out, errs, code := runCmd(t, bitsScenario, "sweep", "-", "--over", "alpha", "--from", "0.5", "--to", "4", "--points", "6",
		"--curves", "bits=1,2,3,4", "--figure", path)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 1+4*6 || rows[0][0] != "bits" || rows[0][1] != "alpha" {
		t.Fatalf("header %v, %d rows", rows[0], len(rows))
	}
	s, err := scenario.Decode([]byte(bitsScenario))
	if err != nil {
		t.Fatal(err)
	}
	c, _ := s.Check()
	cs, err := study.SweepCurves(context.Background(), c, study.CurvesSpec{
		SweepSpec: study.SweepSpec{Axis: study.Axis{Over: "alpha", From: 0.5, To: 4, Points: 6}}, Curves: "bits", At: []float64{1, 2, 3, 4}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	var want bytes.Buffer
	if err := study.WriteCurvesCSV(&want, cs); err != nil {
		t.Fatal(err)
	}
	if out != want.String() {
		t.Errorf("the CSV differs from the engine's curves")
	}
	svg, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	for _, l := range []string{"bits = 1", "bits = 2", "bits = 3", "bits = 4", "against m/n"} {
		if !bytes.Contains(svg, []byte(l)) {
			t.Errorf("the figure lacks %q", l)
		}
	}

	// The generalized model's observables can be drawn too.
	cosPath := filepath.Join(filepath.Dir(path), "cos.svg")
	if _, errs, code := runCmd(t, bitsScenario, "sweep", "-", "--over", "alpha", "--from", "0.5", "--to", "4", "--points", "6",
		"--curves", "bits=1,2", "--quantity", "cosine", "--figure", cosPath); code != 0 {
		t.Fatalf("--quantity cosine: exit %d: %s", code, errs)
	}
	if svg, err := os.ReadFile(cosPath); err != nil || !bytes.Contains(svg, []byte("cosine of xhat and x0 against m/n")) {
		t.Errorf("the cosine figure: %v", err)
	}

	// The same from the scenario's study.
	withStudy := strings.Replace(bitsScenario, `"penalty":`, `"study": {"view": "curve", "sweep": {"over": "alpha", "from": 0.5, "to": 4, "points": 6, "curves": "bits", "curves_at": [1, 2, 3, 4]}}, "penalty":`, 1)
	again, errs, code := runCmd(t, withStudy, "sweep", "-")
	if code != 0 || again != out {
		t.Errorf("from study.sweep: exit %d (%s), same CSV %v", code, errs, again == out)
	}

	for _, bad := range [][]string{{"--curves", "bits"}, {"--curves", "bits=1,x"}, {"--curves", "bits=1,2", "--best", "l1"}} {
		args := append([]string{"sweep", "-", "--over", "alpha", "--from", "0.5", "--to", "4"}, bad...)
		if _, errs, code := runCmd(t, bitsScenario, args...); code != 2 || errs == "" {
			t.Errorf("%v: exit %d, %q; want a usage error", bad, code, errs)
		}
	}
	if _, errs, code := runCmd(t, bitsScenario, "sweep", "-", "--over", "alpha", "--from", "0.5", "--to", "4", "--curves", "bits=1,0"); code == 0 || !strings.Contains(errs, "curves_at[1]") {
		t.Errorf("bits 0: exit %d, %q; want the value named", code, errs)
	}
}
