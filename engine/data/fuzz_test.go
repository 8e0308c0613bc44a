package data

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// fuzzLimits keeps fuzzed inputs small, so that the fuzzer explores formats, not sizes.
var fuzzLimits = Limits{MaxRows: 50, MaxCols: 50, MaxEntries: 400, MaxBytes: 1 << 14}

// Property: ReadMatrix never panics; it returns either a *LineError or a matrix within the
// limits whose entries are finite and which reads back unchanged from a Matrix Market
// array file written from it.
func FuzzReadMatrix(f *testing.F) {
	files, _ := filepath.Glob(filepath.Join(fixtures, "*.*"))
	bad, _ := filepath.Glob(filepath.Join(fixtures, "bad", "*.*"))
	for _, name := range append(files, bad...) {
		if b, err := os.ReadFile(name); err == nil && filepath.Ext(name) != ".md" {
			f.Add(b)
		}
	}
	f.Fuzz(func(t *testing.T, in []byte) {
		a, err := ReadMatrix(bytes.NewReader(in), fuzzLimits)
		if err != nil {
			var le *LineError
			if !errors.As(err, &le) || a != nil {
				t.Fatalf("error %v (%T) with matrix %v", err, err, a)
			}
			return
		}
		r, c := a.Dims()
		if r > fuzzLimits.MaxRows || c > fuzzLimits.MaxCols || r*c > fuzzLimits.MaxEntries {
			t.Fatalf("%d x %d beyond the limits", r, c)
		}
		var out bytes.Buffer
		out.WriteString("%%MatrixMarket matrix array real general\n")
		out.WriteString(strconv.Itoa(r) + " " + strconv.Itoa(c) + "\n")
		for j := range c {
			for i := range r {
				v := a.At(i, j)
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("entry (%d, %d) is %g", i, j, v)
				}
				out.WriteString(strconv.FormatFloat(v, 'g', -1, 64) + "\n")
			}
		}
		b, err := ReadMatrix(&out, Limits{})
		if err != nil || !mat.Equal(a, b) {
			t.Fatalf("round trip: %v", err)
		}
	})
}

// Property: ReadValues never panics; it returns either a *LineError or at most MaxEntries
// finite numbers that read back unchanged when written one a line.
func FuzzReadValues(f *testing.F) {
	for _, s := range []string{"1\n2\n3\n", "1, 2;3\t4 5\r\n6", "x\n-1.5\n2e-3\n", "# c\n\n1,,2", "\xef\xbb\xbf1", `"1.5","2"`, "nan", "1e999", "1,\n"} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, in []byte) {
		v, err := ReadValues(bytes.NewReader(in), fuzzLimits)
		if err != nil {
			var le *LineError
			if !errors.As(err, &le) || v != nil {
				t.Fatalf("error %v (%T) with values %v", err, err, v)
			}
			return
		}
		if len(v) == 0 || len(v) > fuzzLimits.MaxEntries {
			t.Fatalf("%d values", len(v))
		}
		var out bytes.Buffer
		for _, x := range v {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				t.Fatalf("value %g", x)
			}
			out.WriteString(strconv.FormatFloat(x, 'g', -1, 64) + "\n")
		}
		w, err := ReadValues(&out, Limits{})
		if err != nil || len(w) != len(v) {
			t.Fatalf("round trip: %v", err)
		}
		for i := range v {
			if w[i] != v[i] {
				t.Fatalf("round trip: %g became %g", v[i], w[i])
			}
		}
	})
}
