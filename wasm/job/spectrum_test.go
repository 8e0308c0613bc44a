package job

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"hdrisk/engine/data"

	"hdrisk/protocol"
)

// A matrix read from text has the singular values of gonum's SVD (the reference library)
// of the same entries (to the Gram route's accuracy), alpha = rows/cols, and a rank that sees an exact zero.
func TestSpectrumOfMatrixText(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	const m, n = 7, 5
	a := mat.NewDense(m, n, nil)
	var b strings.Builder
	for i := range m {
		for j := range n {
			v := rng.NormFloat64()
			a.Set(i, j, v)
			if j > 0 {
				b.WriteString(",")
			}
			fmt.Fprintf(&b, "%v", v)
		}
		b.WriteString("\n")
	}
	var svd mat.SVD
	if !svd.Factorize(a, mat.SVDNone) {
		t.Fatal("reference SVD failed")
	}
	want := svd.Values(nil)
	got, err := Spectrum(protocol.SpectrumArgs{Source: protocol.SourceMatrix, Text: b.String()}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if got.Rows != m || got.Cols != n || float64(got.Alpha) != 7.0/5 || got.Rank != n {
		t.Errorf("shape %dx%d alpha %v rank %d", got.Rows, got.Cols, got.Alpha, got.Rank)
	}
	for i := range want {
		if math.Abs(got.SingularValues[i]-want[i]) > 1e-12*want[0] {
			t.Errorf("sv[%d] = %v, gonum %v", i, got.SingularValues[i], want[i])
		}
	}
	// The Gram route's relative error is about eps (sigma_max/sigma)^2 (data.SingularValues).
	if c := want[0] / want[n-1]; math.Abs(float64(got.Condition)-c) > 1e-12*c {
		t.Errorf("condition %v, want %v", got.Condition, want[0]/want[n-1])
	}
	total := 0
	for _, c := range got.Histogram.Counts {
		total += c
	}
	if total != n {
		t.Errorf("histogram counts %d values, want %d", total, n)
	}

	// diag(3, 0) in Matrix Market coordinate form: singular values 3 and 0, rank 1, no
	// finite condition number (null in JSON).
	mm := "%%MatrixMarket matrix coordinate real general\n2 2 1\n1 1 3\n"
	r, err := Spectrum(protocol.SpectrumArgs{Source: protocol.SourceMatrix, Text: mm}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if r.SingularValues[0] != 3 || r.SingularValues[1] != 0 || r.Rank != 1 || !math.IsInf(float64(r.Condition), 1) {
		t.Errorf("diag(3, 0): %+v", r)
	}
	if _, err := runJobResult(t, "spectrum", protocol.SpectrumArgs{Source: protocol.SourceMatrix, Text: mm}); err != nil {
		t.Errorf("a singular matrix must still give a readable result: %v", err)
	}
}

func runJobResult(t *testing.T, kind string, args any) (protocol.Reply, error) {
	last, _ := runJob(t, kind, args)
	if last.Type != protocol.Result {
		return last, errors.New(last.Error)
	}
	return last, nil
}

// Eigenvalues become their square roots, sorted decreasing; a list's shape is square
// unless stated.
func TestSpectrumOfLists(t *testing.T) {
	r, err := Spectrum(protocol.SpectrumArgs{Source: protocol.SourceEigenvalues, Text: "4\n9\n1\n"}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(r.SingularValues) != "[3 2 1]" || r.Rows != 3 || r.Cols != 3 || r.Alpha != 1 {
		t.Errorf("eigenvalues 4 9 1: %+v", r)
	}
	r, err = Spectrum(protocol.SpectrumArgs{Source: protocol.SourceSingular, Text: "2, 1", Rows: 2, Cols: 8}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if r.Alpha != 0.25 || float64(r.Condition) != 2 {
		t.Errorf("2 x 8 with values 2, 1: alpha %v condition %v", r.Alpha, r.Condition)
	}
	if _, err := Spectrum(protocol.SpectrumArgs{Source: protocol.SourceSingular, Text: "2, 1", Rows: 3, Cols: 8}, nil); err == nil ||
		!strings.Contains(err.Error(), "rows, cols") {
		t.Errorf("a 3 x 8 shape for 2 values: err = %v", err)
	}
}

// Problems with the text name the line (data.LineError) and pass through the job unchanged.
func TestSpectrumErrorsNameTheLine(t *testing.T) {
	_, err := Spectrum(protocol.SpectrumArgs{Source: protocol.SourceMatrix, Text: "1,2\n3,4\n5,x\n"}, nil)
	var le *data.LineError
	if !errors.As(err, &le) || le.Line != 3 {
		t.Fatalf("a bad entry on line 3: err = %v", err)
	}
	last, _ := runJob(t, "spectrum", protocol.SpectrumArgs{Source: protocol.SourceMatrix, Text: "1,2\n3\n"})
	if last.Type != protocol.Failed || !strings.HasPrefix(last.Error, "line 2:") {
		t.Errorf("a short row on line 2: reply %+v", last)
	}
	if _, err := Spectrum(protocol.SpectrumArgs{Source: protocol.SourceSingular, Text: "1\n-2\n"}, nil); !errors.As(err, &le) || le.Line != 2 {
		t.Errorf("a negative singular value on line 2: err = %v", err)
	}
	if _, err := Spectrum(protocol.SpectrumArgs{Source: protocol.SourceMatrix, Text: strings.Repeat("1,2\n", 100), MaxBytes: 50}, nil); err == nil {
		t.Errorf("text over MaxBytes was accepted")
	}
	if _, err := Spectrum(protocol.SpectrumArgs{Source: "picture", Text: "1"}, nil); err == nil || !strings.Contains(err.Error(), "source") {
		t.Errorf("unknown source: err = %v", err)
	}
	long := strings.Repeat("1\n", protocol.MaxListValues+1)
	if _, err := Spectrum(protocol.SpectrumArgs{Source: protocol.SourceSingular, Text: long}, nil); err == nil {
		t.Errorf("a list of %d values was accepted; the page's cap is %d", protocol.MaxListValues+1, protocol.MaxListValues)
	}
}
