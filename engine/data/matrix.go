package data

import (
	"bytes"
	"io"
	"strconv"

	"gonum.org/v1/gonum/mat"
)

// ReadMatrix reads a real matrix from r, recognising the format from the content:
//
//   - Matrix Market, when the first line that is not blank starts with %%MatrixMarket:
//     array and coordinate formats, real and integer fields, general, symmetric and
//     skew-symmetric storage (see readMarket for the conventions);
//   - otherwise delimited text, one matrix row a line: comma-separated when the first row
//     holds a comma, tab-separated when it holds a tab, else separated by runs of spaces.
//     Fields may carry spaces around them and double quotes around the number. Lines that
//     start with '#' and blank lines are skipped. The first row may be a header of column
//     names when none of its fields is a number; it sets the number of columns.
//
// Sizes are checked against limits (zero fields take DefaultLimits) before the matrix is
// allocated, and at most limits.MaxBytes+1 bytes of r are read. Every problem with the
// content is a *LineError naming the line and the reason; a bad limit is a *ParamError.
//
// Special cases are: a binary input (see Sniff) is refused from its first bytes, wrapping
// ErrBinary; an input without numbers, NaN and Inf entries, and numbers beyond
// the range of float64 are refused; complex and pattern Matrix Market files are refused
// with the type named.
func ReadMatrix(r io.Reader, limits Limits) (*mat.Dense, error) {
	l, err := limits.resolve()
	if err != nil {
		return nil, err
	}
	lr := newLineReader(r, l, maxLine(l))
	if err := sniffReader(lr.br); err != nil {
		return nil, err
	}
	for {
		b, err := lr.next()
		if err == io.EOF {
			return nil, &LineError{Reason: "the input holds no numbers"}
		}
		if err != nil {
			return nil, err
		}
		t := bytes.TrimLeft(b, " \t")
		switch {
		case len(t) == 0 || t[0] == '#':
			continue
		case len(t) >= 2 && t[0] == '%' && t[1] == '%':
			return readMarket(lr, t, l)
		}
		return readText(lr, t, l)
	}
}

// maxLine bounds a line: a row of MaxCols numbers written at full precision with
// separators and spaces, plus room for a header of column names.
func maxLine(l Limits) int {
	const perField, slack = 64, 4096
	if l.MaxCols > (1<<30)/perField {
		return 1 << 30
	}
	return perField*l.MaxCols + slack
}

type separator int

const (
	sepSpaces separator = iota
	sepComma
	sepTab
)

// splitFields appends the fields of b to dst. Comma and tab fields are trimmed of spaces
// and may be empty (an error later); runs of spaces and tabs are one separator otherwise.
func splitFields(dst [][]byte, b []byte, sep separator) [][]byte {
	if sep == sepSpaces {
		for {
			b = bytes.TrimLeft(b, " \t")
			if len(b) == 0 {
				return dst
			}
			k := bytes.IndexAny(b, " \t")
			if k < 0 {
				return append(dst, b)
			}
			dst = append(dst, b[:k])
			b = b[k:]
		}
	}
	c := byte(',')
	if sep == sepTab {
		c = '\t'
	}
	for {
		k := bytes.IndexByte(b, c)
		if k < 0 {
			return append(dst, bytes.Trim(b, " \t"))
		}
		dst = append(dst, bytes.Trim(b[:k], " \t"))
		b = b[k+1:]
	}
}

func readText(lr *lineReader, first []byte, l Limits) (*mat.Dense, error) {
	sep := sepSpaces
	switch {
	case bytes.IndexByte(first, ',') >= 0:
		sep = sepComma
	case bytes.IndexByte(first, '\t') >= 0:
		sep = sepTab
	}
	fields := splitFields(nil, first, sep)
	cols := len(fields)
	if cols > l.MaxCols {
		return nil, lineErr(lr.line, "%d columns exceed the cap of %d", cols, l.MaxCols)
	}
	var data []float64
	if header(fields) {
		first = nil
	} else if left := lr.left(); left > 0 && len(first) > 0 {
		// One allocation near the final size, from the input's length and the first row's,
		// instead of a growing slice that holds up to twice the numbers while it grows.
		rows := left/int64(len(first)+1) + 2
		data = make([]float64, 0, min(int64(l.MaxEntries), int64(cols)*rows*21/20))
	}
	rows := 0
	for {
		var b []byte
		if first != nil {
			b, first = first, nil
		} else {
			var err error
			b, err = lr.next()
			if err == io.EOF {
				break
			}
			if err != nil {
				return nil, err
			}
			if t := bytes.TrimLeft(b, " \t"); len(t) == 0 || t[0] == '#' {
				continue
			}
			fields = splitFields(fields[:0], b, sep)
		}
		if len(fields) != cols {
			return nil, lineErr(lr.line, "expected %s, found %d", numbers(cols), len(fields))
		}
		if rows == l.MaxRows {
			return nil, lineErr(lr.line, "more than the cap of %d rows", l.MaxRows)
		}
		if (rows+1)*cols > l.MaxEntries {
			return nil, lineErr(lr.line, "more than the cap of %d entries", l.MaxEntries)
		}
		for _, f := range fields {
			v, err := parseNumber(f, lr.line)
			if err != nil {
				return nil, err
			}
			data = append(data, v)
		}
		rows++
	}
	if rows == 0 {
		return nil, &LineError{Reason: "the input holds a header but no numbers"}
	}
	return mat.NewDense(rows, cols, data), nil
}

// header reports whether a first row is a row of column names: every field starts with a
// letter (or an underscore, or a character beyond ASCII) and is not a spelling of NaN or
// Inf (a row of those is bad data, not a header).
func header(fields [][]byte) bool {
	for _, f := range fields {
		if !isName(f) {
			return false
		}
	}
	return true
}

func isName(f []byte) bool {
	f = bytes.TrimLeft(f, "\"")
	if len(f) == 0 {
		return false
	}
	switch string(bytes.ToLower(bytes.TrimRight(f, "\""))) {
	case "nan", "inf", "infinity":
		return false
	}
	c := f[0]
	return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c == '_' || c >= 0x80
}

func numbers(n int) string {
	if n == 1 {
		return "1 number"
	}
	return strconv.Itoa(n) + " numbers"
}
