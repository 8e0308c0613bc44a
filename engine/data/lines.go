package data

import (
	"bufio"
	"bytes"
	"errors"
	"io"
	"os"
	"strconv"
)

// errTooLarge marks an input longer than Limits.MaxBytes; readers turn it into a LineError.
var errTooLarge = errors.New("input larger than the cap")

// capReader passes at most max+1 bytes of r through, then fails: an input far larger than
// the cap is refused without being read whole.
type capReader struct {
	r   io.Reader
	n   int64
	max int64
}

func (c *capReader) Read(p []byte) (int, error) {
	if c.n > c.max {
		return 0, errTooLarge
	}
	if room := c.max + 1 - c.n; int64(len(p)) > room {
		p = p[:room]
	}
	k, err := c.r.Read(p)
	c.n += int64(k)
	if c.n > c.max {
		return 0, errTooLarge
	}
	return k, err
}

// lineReader yields the lines of a capped input without their line ending, counting them
// from 1. A line longer than the buffer is an error, so memory stays bounded.
type lineReader struct {
	br      *bufio.Reader
	line    int
	maxLine int
	max     int64
	size    int64 // bytes the input holds in all, when the reader knows it; -1 otherwise
	read    int64 // bytes of lines returned so far
}

func newLineReader(r io.Reader, l Limits, maxLine int) *lineReader {
	return &lineReader{
		br:      bufio.NewReaderSize(&capReader{r: r, max: l.MaxBytes}, maxLine),
		maxLine: maxLine,
		max:     l.MaxBytes,
		size:    sizeOf(r),
	}
}

// sizeOf returns how many bytes r still holds when it can tell (a strings.Reader, a
// bytes.Reader, a file, or a reader that says its Len or Size), or -1.
func sizeOf(r io.Reader) int64 {
	switch v := r.(type) {
	case interface{ Len() int }:
		return int64(v.Len())
	case interface{ Stat() (os.FileInfo, error) }:
		if fi, err := v.Stat(); err == nil && fi.Mode().IsRegular() {
			if s, ok := r.(io.Seeker); ok {
				if at, err := s.Seek(0, io.SeekCurrent); err == nil {
					return fi.Size() - at
				}
			}
		}
	}
	return -1
}

// left returns the bytes of the input after the lines returned so far, when known; -1
// otherwise.
func (lr *lineReader) left() int64 {
	if lr.size < 0 {
		return -1
	}
	return max(0, lr.size-lr.read)
}

// next returns the next line (valid until the following call) or io.EOF after the last.
func (lr *lineReader) next() ([]byte, error) {
	b, err := lr.br.ReadSlice('\n')
	if len(b) == 0 && err == io.EOF {
		return nil, io.EOF
	}
	lr.line++
	lr.read += int64(len(b))
	switch {
	case err == bufio.ErrBufferFull:
		return nil, lineErr(lr.line, "the line is longer than %d bytes", lr.maxLine)
	case err != nil && err != io.EOF:
		return nil, lr.wrap(err)
	}
	if lr.line == 1 {
		b = bytes.TrimPrefix(b, []byte("\xef\xbb\xbf"))
	}
	b = bytes.TrimSuffix(b, []byte("\n"))
	b = bytes.TrimSuffix(b, []byte("\r"))
	return b, nil
}

func (lr *lineReader) wrap(err error) error {
	if errors.Is(err, errTooLarge) {
		return tooLarge(lr.max)
	}
	return err
}

func tooLarge(max int64) error {
	return &LineError{Reason: "the input is larger than the cap of " + strconv.FormatInt(max, 10) + " bytes; it was not read whole"}
}

// blank reports whether a line holds only spaces and tabs.
func blank(b []byte) bool {
	return len(bytes.TrimLeft(b, " \t")) == 0
}

// parseNumber reads one finite float64 in decimal notation (digits, sign, point, exponent),
// optionally inside double quotes as some spreadsheets write it. Special cases are: NaN,
// Inf and numbers beyond the range of float64 are refused, each with its own reason;
// numbers below the smallest subnormal become zero, as strconv.ParseFloat rounds them;
// hexadecimal floats and digit separators, which Go source allows, are refused because a
// data file that holds them was most likely not meant to be read as numbers.
func parseNumber(tok []byte, line int) (float64, error) {
	if len(tok) >= 2 && tok[0] == '"' && tok[len(tok)-1] == '"' {
		tok = bytes.TrimSpace(tok[1 : len(tok)-1])
	}
	if len(tok) == 0 {
		return 0, lineErr(line, "a field is empty")
	}
	for _, c := range tok {
		if (c < '0' || c > '9') && c != '+' && c != '-' && c != '.' && c != 'e' && c != 'E' {
			switch w := string(bytes.ToLower(bytes.TrimLeft(tok, "+-"))); w {
			case "nan":
				return 0, lineErr(line, "NaN is not allowed")
			case "inf", "infinity":
				return 0, lineErr(line, "Inf is not allowed")
			}
			return 0, lineErr(line, "%s is not a number", quoteField(tok))
		}
	}
	v, err := strconv.ParseFloat(string(tok), 64)
	switch {
	case err != nil && errors.Is(err, strconv.ErrRange):
		return 0, lineErr(line, "%s is out of the range of float64", quoteField(tok))
	case err != nil:
		return 0, lineErr(line, "%s is not a number", quoteField(tok))
	}
	return v, nil
}

// quoteField quotes a field for a message, shortened so that a hostile line cannot make
// the message long.
func quoteField(tok []byte) string {
	const max = 40
	if len(tok) > max {
		return strconv.Quote(string(tok[:max])) + "..."
	}
	return strconv.Quote(string(tok))
}
