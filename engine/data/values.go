package data

import (
	"bufio"
	"errors"
	"io"
	"math"
	"slices"
)

// maxToken bounds one field of a list; a longer run of non-separators is refused.
const maxToken = 512

// ReadValues reads a list of numbers: one or many a line, separated by commas, semicolons,
// tabs or spaces, in the order they appear. Lines that start with '#' (after spaces) and
// blank lines are skipped, and the first line may be a header of names when none of its
// fields is a number. Use it for signal samples, singular values or eigenvalues.
//
// At most limits.MaxEntries numbers are accepted and at most limits.MaxBytes+1 bytes are
// read (zero fields take DefaultLimits). Problems with the content are *LineError values.
//
// Special cases are: a binary input (see Sniff) is refused from its first bytes; an empty
// list, an empty field between two commas, NaN, Inf and numbers beyond the range of float64
// are refused.
func ReadValues(r io.Reader, limits Limits) ([]float64, error) {
	v, _, err := readList(r, limits)
	return v, err
}

// ReadSpectrum reads a list as ReadValues does and returns singular values in decreasing
// order. With eigenvalues false the numbers are singular values of F; with eigenvalues
// true they are eigenvalues of F^T F (or F F^T) and their square roots are returned.
//
// Special cases are: a negative singular value is refused, naming its line; a negative
// eigenvalue is refused too, except one no larger in magnitude than 1e-12 times the
// largest eigenvalue, which an eigenvalue solver returns for an exact zero through
// rounding and which is read as 0.
func ReadSpectrum(r io.Reader, eigenvalues bool, limits Limits) ([]float64, error) {
	v, lines, err := readList(r, limits)
	if err != nil {
		return nil, err
	}
	tol := 0.0
	what := "singular value"
	if eigenvalues {
		tol = 1e-12 * slices.Max(v)
		what = "eigenvalue"
	}
	for i, x := range v {
		switch {
		case x < -tol:
			return nil, lineErr(lines[i], "the %s %g is negative", what, x)
		case x < 0:
			v[i] = 0
		case eigenvalues:
			v[i] = math.Sqrt(x)
		}
	}
	slices.Sort(v)
	slices.Reverse(v)
	return v, nil
}

// readList tokenizes r byte by byte, so that a single long line (a pasted row of samples)
// costs no more memory than the numbers it holds. It returns the line of every number too.
func readList(r io.Reader, limits Limits) ([]float64, []int, error) {
	l, err := limits.resolve()
	if err != nil {
		return nil, nil, err
	}
	br := bufio.NewReader(&capReader{r: r, max: l.MaxBytes})
	if err := sniffReader(br); err != nil {
		return nil, nil, err
	}
	var (
		vals     []float64
		lines    []int
		tok      = make([]byte, 0, 64)
		line     = 1
		atStart  = true // nothing but spaces so far on this line
		comment  = false
		comma    = false // a comma or semicolon with no field after it yet
		headerAt = 0     // the line of names skipped, if any
		pending  []string
	)
	flush := func() error {
		if len(tok) == 0 {
			return nil
		}
		defer func() { tok = tok[:0] }()
		comma = false
		if len(vals) == 0 && (headerAt == 0 || headerAt == line) && isName(tok) {
			headerAt = line
			pending = append(pending, string(tok))
			return nil
		}
		if headerAt == line {
			return lineErr(line, "%s is not a number", quoteField([]byte(pending[0])))
		}
		v, err := parseNumber(tok, line)
		if err != nil {
			return err
		}
		if len(vals) == l.MaxEntries {
			return lineErr(line, "more than the cap of %d numbers", l.MaxEntries)
		}
		vals = append(vals, v)
		lines = append(lines, line)
		return nil
	}
	for {
		c, err := br.ReadByte()
		if err == io.EOF {
			break
		}
		if err != nil {
			if errors.Is(err, errTooLarge) {
				return nil, nil, tooLarge(l.MaxBytes)
			}
			return nil, nil, err
		}
		if line == 1 && len(vals) == 0 && len(tok) == 0 && atStart && c == 0xef {
			if b, err := br.Peek(2); err == nil && b[0] == 0xbb && b[1] == 0xbf {
				br.Discard(2)
				continue
			}
		}
		switch {
		case c == '\n':
			if err := flush(); err != nil {
				return nil, nil, err
			}
			if comma {
				return nil, nil, lineErr(line, "the line ends with a separator and no number after it")
			}
			line++
			atStart, comment = true, false
		case comment:
		case c == '#' && atStart:
			comment = true
		case c == ' ' || c == '\t' || c == '\r':
			if err := flush(); err != nil {
				return nil, nil, err
			}
		case c == ',' || c == ';':
			if comma && len(tok) == 0 || atStart {
				return nil, nil, lineErr(line, "a field is empty")
			}
			if err := flush(); err != nil {
				return nil, nil, err
			}
			comma = true
		default:
			if len(tok) == maxToken {
				return nil, nil, lineErr(line, "a field is longer than %d characters", maxToken)
			}
			tok = append(tok, c)
			atStart = false
		}
	}
	if err := flush(); err != nil {
		return nil, nil, err
	}
	if comma {
		return nil, nil, lineErr(line, "the line ends with a separator and no number after it")
	}
	if len(vals) == 0 {
		return nil, nil, &LineError{Reason: "the input holds no numbers"}
	}
	return vals, lines, nil
}
