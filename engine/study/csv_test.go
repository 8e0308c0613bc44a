package study

import (
	"bytes"
	"encoding/csv"
	"testing"

	"hdrisk/engine/fixedpoint"
)

// The status column tells a plain point from one on the solver's floor, one that did not
// converge and one that failed.
func TestCSVStatus(t *testing.T) {
	pts := []Point{
		{X: 1, Result: fixedpoint.Result{Converged: true, MSE: 0.1}},
		{X: 2, Result: fixedpoint.Result{Converged: true, MSE: 1e-14, Floor: true}},
		{X: 3, Result: fixedpoint.Result{MSE: 0.2, Residual: 1e-3}},
		{X: 4, Failed: "penalty.l1: too large"},
	}
	var buf bytes.Buffer
	if err := WriteCSV(&buf, []string{"l1"}, pts); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"ok", "floor", "not converged", "failed: penalty.l1: too large"}
	for i, r := range rows[1:] {
		if r[len(r)-1] != want[i] {
			t.Errorf("point %v: status %q, want %q", r[0], r[len(r)-1], want[i])
		}
	}
	if rows[2][1] != "1e-14" || rows[3][1] != "" {
		t.Errorf("a floor point keeps its figures (%q), an unconverged one has none (%q)", rows[2][1], rows[3][1])
	}
}
