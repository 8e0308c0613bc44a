package main

import (
	"encoding/json"
	"math"
	"testing"
)

type spectrumOut struct {
	SingularValues []float64 `json:"singular_values"`
	Rows, Cols     int
	Alpha          *float64
	Condition      *float64
	Rank           int
}

// The symmetric fixture [2 1 0; 1 2 0; 0 0 5] has singular values 5, 3, 1 (its
// eigenvalues; stated in the file, written by hand from NIST IR 5935's description).
func TestSpectrumCommand(t *testing.T) {
	code, out, errs := call(t, "", "spectrum", "../../../testdata/matrices/symmetric_coordinate.mtx")
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	var r spectrumOut
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	want := []float64{5, 3, 1}
	for i, v := range r.SingularValues {
		if math.Abs(v-want[i]) > 1e-14 {
			t.Errorf("singular values %v, want %v", r.SingularValues, want)
			break
		}
	}
	if len(r.SingularValues) != 3 || r.Rows != 3 || r.Cols != 3 || r.Alpha == nil || *r.Alpha != 1 ||
		r.Condition == nil || math.Abs(*r.Condition-5) > 1e-13 || r.Rank != 3 {
		t.Errorf("output %s", out)
	}
	// From standard input, a wide CSV matrix with a zero row: alpha 2/3, condition null.
	code, out, errs = call(t, "0,0,0\n1,2,2\n", "spectrum", "-")
	if code != 0 {
		t.Fatalf("stdin: status %d: %s", code, errs)
	}
	r = spectrumOut{}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if r.Rows != 2 || r.Cols != 3 || math.Abs(*r.Alpha-2.0/3) > 1e-15 || r.Condition != nil || r.Rank != 1 ||
		math.Abs(r.SingularValues[0]-3) > 1e-14 || r.SingularValues[1] != 0 {
		t.Errorf("stdin output %s", out)
	}
}

func TestSpectrumCommandErrors(t *testing.T) {
	failing(t, "standard input: line 2: expected 2 numbers, found 1", "1 2\n3\n", "spectrum", "-")
	failing(t, "line 1: matrix type complex is not supported", "", "spectrum", "../../../testdata/matrices/bad/complex.mtx")
	failing(t, "no such file", "", "spectrum", "missing.mtx")
	failing(t, "missing matrix file", "", "spectrum")
}
