package data

import (
	"errors"
	"fmt"
	"strconv"

	"hdrisk/engine/param"
)

// LineError reports a problem with the content of a file: the line it was found on
// (counted from 1; 0 when the problem belongs to the file as a whole, such as its size or
// an early end) and the reason, in words a user can act on.
type LineError struct {
	Line   int
	Reason string
	err    error // a sentinel the error wraps (ErrBinary), or nil
}

// Unwrap returns the sentinel the error carries, if any.
func (e *LineError) Unwrap() error { return e.err }

func (e *LineError) Error() string {
	if e.Line <= 0 {
		return e.Reason
	}
	return "line " + strconv.Itoa(e.Line) + ": " + e.Reason
}

func lineErr(line int, format string, args ...any) error {
	return &LineError{Line: line, Reason: fmt.Sprintf(format, args...)}
}

// ParamError reports an argument out of its domain, naming the parameter and the reason:
// the engine's one error type.
type ParamError = param.Error

func paramErr(field, format string, args ...any) error {
	return param.Errorf(field, format, args...)
}

// ErrCanceled is returned when the context of a long computation is done before it ends.
var ErrCanceled = errors.New("data: canceled")

// Limits caps what a reader accepts. A zero field means the default of DefaultLimits.
type Limits struct {
	MaxRows    int   // rows of a matrix
	MaxCols    int   // columns of a matrix
	MaxEntries int   // stored numbers: rows*cols of a dense matrix, the stated count of a coordinate file, or the length of a list
	MaxBytes   int64 // bytes read from the input; a larger input is refused after MaxBytes+1 bytes
}

// DefaultLimits returns the caps used when a field of Limits is zero: 4000 rows, 4000
// columns, 16e6 entries (a 4000 x 4000 matrix of float64 takes 128 MB) and 512 MiB of text
// (enough for 16e6 numbers written at full precision, about 20 bytes each).
func DefaultLimits() Limits {
	return Limits{MaxRows: 4000, MaxCols: 4000, MaxEntries: 16_000_000, MaxBytes: 512 << 20}
}

func (l Limits) resolve() (Limits, error) {
	d := DefaultLimits()
	if l.MaxRows < 0 {
		return l, paramErr("MaxRows", "is negative (%d)", l.MaxRows)
	}
	if l.MaxCols < 0 {
		return l, paramErr("MaxCols", "is negative (%d)", l.MaxCols)
	}
	if l.MaxEntries < 0 {
		return l, paramErr("MaxEntries", "is negative (%d)", l.MaxEntries)
	}
	if l.MaxBytes < 0 {
		return l, paramErr("MaxBytes", "is negative (%d)", l.MaxBytes)
	}
	if l.MaxRows == 0 {
		l.MaxRows = d.MaxRows
	}
	if l.MaxCols == 0 {
		l.MaxCols = d.MaxCols
	}
	if l.MaxEntries == 0 {
		l.MaxEntries = d.MaxEntries
	}
	if l.MaxBytes == 0 {
		l.MaxBytes = d.MaxBytes
	}
	return l, nil
}
