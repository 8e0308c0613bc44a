package data

import (
	"errors"
	"io"
	"strings"
	"testing"
)

// Each file in testdata/matrices/bad must be refused with the line and the reason named.
func TestBadFiles(t *testing.T) {
	for _, c := range []struct {
		file string
		line int
		msg  string
	}{
		{"truncated_array.mtx", 0, "the input ends after 12 of 20 entries"},
		{"truncated_coordinate.mtx", 0, "the input ends after 2 of 4 entries"},
		{"extra_entries.mtx", 4, "line 4: more entries than the 1 the size line states"},
		{"complex.mtx", 1, "line 1: matrix type complex is not supported (real or integer only)"},
		{"pattern.mtx", 1, "line 1: matrix type pattern is not supported (real or integer only)"},
		{"hermitian.mtx", 1, "line 1: symmetry hermitian applies to complex matrices only, which are not supported"},
		{"nonnumber.mtx", 4, `line 4: "abc" is not a number`},
		{"index_range.mtx", 4, "line 4: the row index 0 is outside 1..2"},
		{"upper_symmetric.mtx", 3, "line 3: entry (1, 2) lies above the diagonal; a symmetric file stores the lower triangle only"},
		{"nonsquare_symmetric.mtx", 2, "line 2: a symmetric matrix must be square, this one is 2 x 3"},
		{"huge_header.mtx", 2, "line 2: 100000 rows exceed the cap of 4000"},
		{"integer_fraction.mtx", 4, `line 4: "2.5" is not an integer (the banner says integer)`},
		{"size_line.mtx", 2, "line 2: the size line must hold 3 integers (rows, columns, entries), found 2"},
		{"wrong_count.csv", 7, "line 7: expected 5 numbers, found 4"},
		{"nonnumber.txt", 3, `line 3: "abc" is not a number`},
		{"nan.tsv", 3, "line 3: NaN is not allowed"},
		{"inf.csv", 2, "line 2: Inf is not allowed"},
		{"overflow.csv", 2, `line 2: "1e400" is out of the range of float64`},
		{"empty_field.csv", 1, "line 1: a field is empty"},
		{"empty.csv", 0, "the input holds no numbers"},
	} {
		a, err := readFixture(t, "bad/"+c.file)
		var le *LineError
		switch {
		case a != nil:
			t.Errorf("%s: accepted", c.file)
		case !errors.As(err, &le):
			t.Errorf("%s: error %v is not a *LineError", c.file, err)
		case le.Line != c.line || err.Error() != c.msg:
			t.Errorf("%s: got %q (line %d), want %q", c.file, err, le.Line, c.msg)
		}
	}
}

func TestBadInline(t *testing.T) {
	for _, c := range []struct{ in, msg string }{
		{"%%MatrixMarket matrix array real\n1 1\n1\n", "line 1: the banner has 4 words, not 5 (expected %%MatrixMarket matrix array|coordinate real|integer general|symmetric|skew-symmetric)"},
		{"%%MatrixMarket vector array real general\n", `line 1: object "vector" is not supported (matrix only)`},
		{"%%MatrixMarket matrix dense real general\n", `line 1: format "dense" is unknown (array or coordinate)`},
		{"%%MatrixMarket matrix array double general\n", `line 1: matrix type "double" is unknown (real or integer)`},
		{"%%MatrixMarket matrix array real upper\n", `line 1: symmetry "upper" is unknown (general, symmetric or skew-symmetric)`},
		{"%%MatrixMarkt matrix array real general\n", "line 1: not a Matrix Market banner (expected %%MatrixMarket matrix array|coordinate real|integer general|symmetric|skew-symmetric)"},
		{"%%MatrixMarket matrix array real general\n% only comments\n", "the input ends before the size line"},
		{"%%MatrixMarket matrix array real general\n0 3\n", "line 2: the row count 0 is below 1"},
		{"%%MatrixMarket matrix array real general\n2 x\n", `line 2: the column count "x" is not an integer`},
		{"%%MatrixMarket matrix array real general\n2 5000\n", "line 2: 5000 columns exceed the cap of 4000"},
		{"%%MatrixMarket matrix coordinate real general\n2 2 -1\n", "line 2: the entry count -1 is below 0"},
		{"%%MatrixMarket matrix coordinate real general\n2 2 20000000\n", "line 2: 20000000 entries exceed the cap of 16000000"},
		{"%%MatrixMarket matrix coordinate real general\n2 2 1\n1 1\n", "line 3: expected 3 numbers (row, column, value), found 2"},
		{"%%MatrixMarket matrix coordinate real general\n2 2 1\n1 3 1\n", "line 3: the column index 3 is outside 1..2"},
		{"%%MatrixMarket matrix coordinate real general\n2 2 1\n1.0 1 1\n", `line 3: the row index "1.0" is not an integer`},
		{"%%MatrixMarket matrix coordinate real general\n2 2 1\n1 1 nan\n", "line 3: NaN is not allowed"},
		{"%%MatrixMarket matrix coordinate real general\n1 1 2\n1 1 1e308\n1 1 1e308\n", "duplicate entries sum beyond the range of float64"},
		{"%%MatrixMarket matrix coordinate real skew-symmetric\n2 2 1\n1 1 1\n", "line 3: entry (1, 1) is not below the diagonal; a skew-symmetric file stores the strict lower triangle only"},
		{"%%MatrixMarket matrix array real general\n1 2\n1 2\n", "line 3: expected 1 number (an array file holds one entry a line), found 2"},
		{"a,b\n", "the input holds a header but no numbers"},
		{"1,2\nx,y\n", `line 2: "x" is not a number`},
		{"NaN,NaN\n1,2\n", "line 1: NaN is not allowed"},
		{"1 0x10\n", `line 1: "0x10" is not a number`},
		{"1 1_000\n", `line 1: "1_000" is not a number`},
		{"1\t\t2\n", "line 1: a field is empty"},
		{"1,2,\n", "line 1: a field is empty"},
		{"%% not a banner\n", "line 1: not a Matrix Market banner (expected %%MatrixMarket matrix array|coordinate real|integer general|symmetric|skew-symmetric)"},
		{strings.Repeat("1 ", 4001) + "\n", "line 1: 4001 columns exceed the cap of 4000"},
		{"1 2\n" + strings.Repeat("x", 300000) + "\n", "line 2: the line is longer than 260096 bytes"},
	} {
		a, err := ReadMatrix(strings.NewReader(c.in), Limits{})
		if a != nil || err == nil || err.Error() != c.msg {
			t.Errorf("%.60q:\n got %v\nwant %s", c.in, err, c.msg)
		}
	}
}

func TestMatrixCaps(t *testing.T) {
	l := Limits{MaxRows: 3, MaxCols: 4, MaxEntries: 6}
	for _, c := range []struct{ in, msg string }{
		{"1\n2\n3\n4\n", "line 4: more than the cap of 3 rows"},
		{"1 2 3\n1 2 3\n1 2 3\n", "line 3: more than the cap of 6 entries"},
		{"1 2 3 4 5\n", "line 1: 5 columns exceed the cap of 4"},
		{"%%MatrixMarket matrix array real general\n3 3\n", "line 2: a 3 x 3 matrix has more entries than the cap of 6"},
	} {
		if _, err := ReadMatrix(strings.NewReader(c.in), l); err == nil || err.Error() != c.msg {
			t.Errorf("%q: got %v, want %s", c.in, err, c.msg)
		}
	}
	if _, err := ReadMatrix(strings.NewReader("1"), Limits{MaxRows: -1}); err == nil || err.Error() != "MaxRows: is negative (-1)" {
		t.Errorf("negative limit: %v", err)
	}
}

// endless yields an unending valid matrix, "1 2 3\n" over and over, counting bytes read.
type endless struct{ n int64 }

func (e *endless) Read(p []byte) (int, error) {
	const row = "1 2 3\n"
	for i := range p {
		p[i] = row[(e.n+int64(i))%int64(len(row))]
	}
	e.n += int64(len(p))
	return len(p), nil
}

// A file far larger than the byte cap is refused after reading at most cap+1 bytes.
func TestByteCap(t *testing.T) {
	const cap = 10000
	for name, read := range map[string]func(io.Reader) error{
		"ReadMatrix": func(r io.Reader) error {
			_, err := ReadMatrix(r, Limits{MaxBytes: cap, MaxRows: 1 << 20})
			return err
		},
		"ReadValues": func(r io.Reader) error { _, err := ReadValues(r, Limits{MaxBytes: cap}); return err },
	} {
		src := &endless{}
		err := read(src)
		want := "the input is larger than the cap of 10000 bytes; it was not read whole"
		if err == nil || err.Error() != want {
			t.Errorf("%s: %v, want %s", name, err, want)
		}
		if src.n > cap+1 {
			t.Errorf("%s: read %d bytes from the source, cap %d", name, src.n, cap)
		}
	}
	// Exactly at the cap is accepted.
	in := strings.Repeat("1 2 3\n", 10)
	if _, err := ReadMatrix(strings.NewReader(in), Limits{MaxBytes: int64(len(in))}); err != nil {
		t.Errorf("input of exactly the cap: %v", err)
	}
}
