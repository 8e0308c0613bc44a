package data

import (
	"bytes"
	"io"
	"math"
	"strconv"

	"gonum.org/v1/gonum/mat"
)

// Matrix Market, as described by Boisvert, Pozo and Remington, "The Matrix Market Exchange
// Formats: Initial Design", NIST Interagency Report 5935 (1996): a banner line
//
//	%%MatrixMarket matrix <array|coordinate> <real|integer|complex|pattern> <general|symmetric|skew-symmetric|hermitian>
//
// then comment lines starting with '%', a size line ("M N" for array, "M N NNZ" for
// coordinate), and the entries: array entries one a line in column-major order, coordinate
// entries "i j value" with 1-based indices. Symmetric files store the lower triangle with
// the diagonal, skew-symmetric files the strict lower triangle.
//
// Choices where the description leaves room, taken here:
//   - The banner's words are matched without regard to case, as NIST's reference reader
//     mmio.c does (from memory).
//   - Blank lines and '%' comment lines are skipped anywhere after the banner.
//   - A coordinate entry listed twice is summed into the matrix: the usual meaning of the
//     triplet (coordinate) form in sparse assembly (common practice), so that a file
//     written by adding element contributions reads as intended.
//   - In symmetric and skew-symmetric coordinate files an entry above the diagonal is an
//     error rather than silently mirrored, and a skew-symmetric file may not store its
//     (zero) diagonal.

type mmFormat struct {
	coordinate bool
	integer    bool
	symmetry   string // "general", "symmetric" or "skew-symmetric"
}

func parseBanner(b []byte, line int) (mmFormat, error) {
	const usage = "expected %%MatrixMarket matrix array|coordinate real|integer general|symmetric|skew-symmetric"
	words := bytes.Fields(bytes.ToLower(b))
	if len(words) == 0 || string(words[0]) != "%%matrixmarket" {
		return mmFormat{}, lineErr(line, "not a Matrix Market banner (%s)", usage)
	}
	if len(words) != 5 {
		return mmFormat{}, lineErr(line, "the banner has %d words, not 5 (%s)", len(words), usage)
	}
	var f mmFormat
	if o := string(words[1]); o != "matrix" {
		return f, lineErr(line, "object %s is not supported (matrix only)", quoteField(words[1]))
	}
	switch string(words[2]) {
	case "array":
	case "coordinate":
		f.coordinate = true
	default:
		return f, lineErr(line, "format %s is unknown (array or coordinate)", quoteField(words[2]))
	}
	switch t := string(words[3]); t {
	case "real":
	case "integer":
		f.integer = true
	case "complex", "pattern":
		return f, lineErr(line, "matrix type %s is not supported (real or integer only)", t)
	default:
		return f, lineErr(line, "matrix type %s is unknown (real or integer)", quoteField(words[3]))
	}
	switch s := string(words[4]); s {
	case "general", "symmetric", "skew-symmetric":
		f.symmetry = s
	case "hermitian":
		return f, lineErr(line, "symmetry hermitian applies to complex matrices only, which are not supported")
	default:
		return f, lineErr(line, "symmetry %s is unknown (general, symmetric or skew-symmetric)", quoteField(words[4]))
	}
	return f, nil
}

// nextEntry returns the fields of the next line that is neither blank nor a comment.
func nextEntry(lr *lineReader, dst [][]byte) ([][]byte, error) {
	for {
		b, err := lr.next()
		if err != nil {
			return nil, err
		}
		t := bytes.TrimLeft(b, " \t")
		if len(t) == 0 || t[0] == '%' {
			continue
		}
		return splitFields(dst[:0], t, sepSpaces), nil
	}
}

func parseSize(tok []byte, what string, min, line int) (int, error) {
	n, err := strconv.Atoi(string(tok))
	if err != nil {
		return 0, lineErr(line, "the %s %s is not an integer", what, quoteField(tok))
	}
	if n < min {
		return 0, lineErr(line, "the %s %d is below %d", what, n, min)
	}
	return n, nil
}

func readMarket(lr *lineReader, banner []byte, l Limits) (*mat.Dense, error) {
	f, err := parseBanner(banner, lr.line)
	if err != nil {
		return nil, err
	}
	fields, err := nextEntry(lr, nil)
	if err == io.EOF {
		return nil, &LineError{Reason: "the input ends before the size line"}
	}
	if err != nil {
		return nil, err
	}
	want, form := 2, "rows, columns"
	if f.coordinate {
		want, form = 3, "rows, columns, entries"
	}
	if len(fields) != want {
		return nil, lineErr(lr.line, "the size line must hold %d integers (%s), found %d", want, form, len(fields))
	}
	m, err := parseSize(fields[0], "row count", 1, lr.line)
	if err != nil {
		return nil, err
	}
	n, err := parseSize(fields[1], "column count", 1, lr.line)
	if err != nil {
		return nil, err
	}
	switch {
	case m > l.MaxRows:
		return nil, lineErr(lr.line, "%d rows exceed the cap of %d", m, l.MaxRows)
	case n > l.MaxCols:
		return nil, lineErr(lr.line, "%d columns exceed the cap of %d", n, l.MaxCols)
	case m > l.MaxEntries/n:
		return nil, lineErr(lr.line, "a %d x %d matrix has more entries than the cap of %d", m, n, l.MaxEntries)
	case f.symmetry != "general" && m != n:
		return nil, lineErr(lr.line, "a %s matrix must be square, this one is %d x %d", f.symmetry, m, n)
	}
	// The work is bounded by the data, not by the size line: past earlyCheck entries (below
	// it allocating costs nothing and the entries' own message is more precise), an input too
	// short to hold the stated entries (each takes at least "0\n" in an array, "1 1 0\n" in
	// coordinates) is refused before the matrix is allocated.
	const earlyCheck = 1 << 16
	if f.coordinate {
		nnz, err := parseSize(fields[2], "entry count", 0, lr.line)
		if err != nil {
			return nil, err
		}
		if nnz > l.MaxEntries {
			return nil, lineErr(lr.line, "%d entries exceed the cap of %d", nnz, l.MaxEntries)
		}
		if left := lr.left(); left >= 0 && nnz > earlyCheck && int64(nnz)*6-1 > left {
			return nil, lineErr(lr.line, "the size line states %d entries, but the rest of the input holds only %d bytes (each entry takes at least 6)", nnz, left)
		}
		return readCoordinate(lr, f, m, n, nnz)
	}
	stored := int64(m) * int64(n)
	switch f.symmetry {
	case "symmetric":
		stored = int64(n) * int64(n+1) / 2
	case "skew-symmetric":
		stored = int64(n) * int64(n-1) / 2
	}
	if left := lr.left(); left >= 0 && stored > earlyCheck && stored*2-1 > left {
		return nil, lineErr(lr.line, "the size line states %d x %d (%d stored entries), but the rest of the input holds only %d bytes (each entry takes at least 2)", m, n, stored, left)
	}
	return readArray(lr, f, m, n)
}

func (f mmFormat) value(tok []byte, line int) (float64, error) {
	if !f.integer {
		return parseNumber(tok, line)
	}
	v, err := strconv.ParseInt(string(tok), 10, 64)
	if err != nil {
		return 0, lineErr(line, "%s is not an integer (the banner says integer)", quoteField(tok))
	}
	return float64(v), nil
}

func readArray(lr *lineReader, f mmFormat, m, n int) (*mat.Dense, error) {
	skip := 0 // rows above the stored part of each column
	switch f.symmetry {
	case "symmetric":
		skip = 1
	case "skew-symmetric":
		skip = 2
	}
	total := m * n
	switch skip {
	case 1:
		total = n * (n + 1) / 2
	case 2:
		total = n * (n - 1) / 2
	}
	a := mat.NewDense(m, n, nil)
	var fields [][]byte
	k := 0
	for j := 0; j < n; j++ {
		i0 := 0
		if skip > 0 {
			i0 = j + skip - 1
		}
		for i := i0; i < m; i++ {
			var err error
			fields, err = nextEntry(lr, fields)
			if err == io.EOF {
				return nil, &LineError{Reason: "the input ends after " + strconv.Itoa(k) + " of " + strconv.Itoa(total) + " entries"}
			}
			if err != nil {
				return nil, err
			}
			if len(fields) != 1 {
				return nil, lineErr(lr.line, "expected 1 number (an array file holds one entry a line), found %d", len(fields))
			}
			v, err := f.value(fields[0], lr.line)
			if err != nil {
				return nil, err
			}
			a.Set(i, j, v)
			switch skip {
			case 1:
				a.Set(j, i, v)
			case 2:
				a.Set(j, i, -v)
			}
			k++
		}
	}
	if err := trailing(lr, total); err != nil {
		return nil, err
	}
	return a, nil
}

func readCoordinate(lr *lineReader, f mmFormat, m, n, nnz int) (*mat.Dense, error) {
	a := mat.NewDense(m, n, nil)
	var fields [][]byte
	for k := 0; k < nnz; k++ {
		var err error
		fields, err = nextEntry(lr, fields)
		if err == io.EOF {
			return nil, &LineError{Reason: "the input ends after " + strconv.Itoa(k) + " of " + strconv.Itoa(nnz) + " entries"}
		}
		if err != nil {
			return nil, err
		}
		if len(fields) != 3 {
			return nil, lineErr(lr.line, "expected 3 numbers (row, column, value), found %d", len(fields))
		}
		i, err := index(fields[0], "row", m, lr.line)
		if err != nil {
			return nil, err
		}
		j, err := index(fields[1], "column", n, lr.line)
		if err != nil {
			return nil, err
		}
		v, err := f.value(fields[2], lr.line)
		if err != nil {
			return nil, err
		}
		switch {
		case f.symmetry == "symmetric" && i < j:
			return nil, lineErr(lr.line, "entry (%d, %d) lies above the diagonal; a symmetric file stores the lower triangle only", i+1, j+1)
		case f.symmetry == "skew-symmetric" && i <= j:
			return nil, lineErr(lr.line, "entry (%d, %d) is not below the diagonal; a skew-symmetric file stores the strict lower triangle only", i+1, j+1)
		}
		a.Set(i, j, a.At(i, j)+v)
		switch {
		case f.symmetry == "symmetric" && i != j:
			a.Set(j, i, a.At(j, i)+v)
		case f.symmetry == "skew-symmetric":
			a.Set(j, i, a.At(j, i)-v)
		}
	}
	if err := trailing(lr, nnz); err != nil {
		return nil, err
	}
	for _, v := range a.RawMatrix().Data {
		if math.IsInf(v, 0) {
			return nil, &LineError{Reason: "duplicate entries sum beyond the range of float64"}
		}
	}
	return a, nil
}

func index(tok []byte, what string, max, line int) (int, error) {
	i, err := strconv.Atoi(string(tok))
	if err != nil {
		return 0, lineErr(line, "the %s index %s is not an integer", what, quoteField(tok))
	}
	if i < 1 || i > max {
		return 0, lineErr(line, "the %s index %d is outside 1..%d", what, i, max)
	}
	return i - 1, nil
}

// trailing refuses entries after the stated count.
func trailing(lr *lineReader, count int) error {
	_, err := nextEntry(lr, nil)
	switch {
	case err == io.EOF:
		return nil
	case err != nil:
		return err
	}
	return lineErr(lr.line, "more entries than the %d the size line states", count)
}
