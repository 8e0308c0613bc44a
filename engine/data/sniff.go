package data

import (
	"bufio"
	"bytes"
	"errors"
	"io"
	"strconv"
	"unicode/utf8"
)

// SniffBytes is how much of an input Sniff looks at: enough to see that a file is not text
// at once, without reading it whole.
const SniffBytes = 64 << 10

// signatures are the openings of binary formats a practitioner may pick by mistake, named so
// that the message says what to do (the magic numbers are those each format's specification
// fixes; common practice).
var signatures = []struct {
	magic, what string
}{
	{"PK\x03\x04", "a ZIP archive (an .xlsx or .ods spreadsheet is one): save the sheet as CSV"},
	{"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1", "an old Office file (.xls): save the sheet as CSV"},
	{"%PDF", "a PDF document"},
	{"\x89PNG", "a PNG image"},
	{"\xff\xd8\xff", "a JPEG image"},
	{"GIF8", "a GIF image"},
	{"\x1f\x8b", "gzip-compressed: decompress it first"},
	{"\x93NUMPY", "a NumPy .npy file: write it with numpy.savetxt as text"},
	{"MATLAB 5.0 MAT-file", "a MATLAB .mat file: write the matrix with writematrix as text"},
	{"\x89HDF", "an HDF5 file: export the matrix as text"},
	{"\x7fELF", "a program, not data"},
	{"\xff\xfe", "UTF-16 text: save it as UTF-8"},
	{"\xfe\xff", "UTF-16 text: save it as UTF-8"},
}

// ErrBinary marks an input refused by Sniff; the *LineError that carries it says why.
var ErrBinary = errors.New("not a text file")

// Sniff looks at the first bytes of an input (at most SniffBytes of head are used) and refuses
// what cannot be numbers in text: a known binary format, named, or bytes no text file holds
// (a NUL byte, or a sequence that is not UTF-8). It costs a pass over head, so that a large
// binary file is refused before anything reads it whole.
func Sniff(head []byte) error {
	if len(head) > SniffBytes {
		head = head[:SniffBytes]
	}
	for _, s := range signatures {
		if bytes.HasPrefix(head, []byte(s.magic)) {
			return binaryErr("the file is " + s.what + "; the page reads numbers in text (CSV, TSV, spaces or Matrix Market)")
		}
	}
	if k := bytes.IndexByte(head, 0); k >= 0 {
		return binaryErr("the file holds a NUL byte (at byte " + itoa(k) + "): it is binary, not text; export the numbers as CSV or Matrix Market")
	}
	// A multi-byte character cut by the end of the window is not an error.
	for i := 0; i < len(head); {
		r, size := utf8.DecodeRune(head[i:])
		if r == utf8.RuneError && size == 1 && len(head)-i >= utf8.UTFMax {
			return binaryErr("the file is not UTF-8 text (byte " + itoa(i) + "): export the numbers as CSV or Matrix Market in UTF-8")
		}
		i += size
	}
	return nil
}

func binaryErr(reason string) error { return &LineError{Reason: reason, err: ErrBinary} }

func itoa(k int) string { return strconv.Itoa(k) }

// sniffReader sniffs the opening of br without consuming it.
func sniffReader(br *bufio.Reader) error {
	head, err := br.Peek(min(SniffBytes, br.Size()))
	if err != nil && err != io.EOF && err != bufio.ErrBufferFull {
		if errors.Is(err, errTooLarge) {
			return nil // the reader reports the size itself
		}
		return err
	}
	return Sniff(head)
}
