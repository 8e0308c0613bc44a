package data

import (
	"bytes"
	"errors"
	"math/rand/v2"
	"strings"
	"testing"
	"time"
)

// Binary inputs are refused from their first bytes, with the format named where it is known
// (magic numbers of the formats' specifications; common practice), and text passes.
func TestSniff(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 5))
	noise := make([]byte, 1<<16)
	for i := range noise {
		noise[i] = byte(rng.UintN(256))
	}
	for _, c := range []struct {
		name string
		in   []byte
		want string
	}{
		{"xlsx", []byte("PK\x03\x04\x14\x00rest"), "ZIP archive"},
		{"png", []byte("\x89PNG\r\n\x1a\n"), "PNG image"},
		{"npy", []byte("\x93NUMPY\x01\x00"), "numpy.savetxt"},
		{"utf16", []byte("\xff\xfe1\x002\x00"), "UTF-16"},
		{"nul", []byte("1,2,3\n4,\x005\n"), "NUL byte (at byte 8)"},
		{"latin1", []byte("1,2,3 \xe9t\xe9 4,5,6, and more text to pass four bytes"), "not UTF-8"},
		{"noise", noise, "binary"},
	} {
		err := Sniff(c.in)
		if err == nil || !errors.Is(err, ErrBinary) || !strings.Contains(err.Error(), c.want) && !strings.Contains(err.Error(), "not UTF-8") {
			t.Errorf("%s: %v, want a refusal naming %q", c.name, err, c.want)
		}
	}
	for _, ok := range []string{"1,2,3\n", "\xef\xbb\xbf1 2\n", "# größe\n1\n", "%%MatrixMarket matrix array real general\n1 1\n2\n", "1,2,\xc3"} {
		if err := Sniff([]byte(ok)); err != nil {
			t.Errorf("%q refused: %v", ok, err)
		}
	}
}

// A 50 MB binary file is refused by the readers from its opening: they read only the first
// SniffBytes of it (the rest of the input is never consumed).
func TestReadersRefuseBinaryAtOnce(t *testing.T) {
	big := bytes.Repeat([]byte("PK\x03\x04\x00\x01\x02"), 50<<20/7)
	for name, read := range map[string]func(*countReader) error{
		"matrix": func(r *countReader) error { _, err := ReadMatrix(r, Limits{}); return err },
		"values": func(r *countReader) error { _, err := ReadValues(r, Limits{}); return err },
	} {
		r := &countReader{r: bytes.NewReader(big)}
		start := time.Now()
		err := read(r)
		if !errors.Is(err, ErrBinary) {
			t.Errorf("%s: %v, want ErrBinary", name, err)
		}
		if r.n > 1<<20 {
			t.Errorf("%s: read %d bytes of a binary file before refusing it", name, r.n)
		}
		t.Logf("%s: refused after %d bytes in %v", name, r.n, time.Since(start))
	}
}

type countReader struct {
	r interface{ Read([]byte) (int, error) }
	n int
}

func (c *countReader) Read(p []byte) (int, error) {
	k, err := c.r.Read(p)
	c.n += k
	return k, err
}

// A Matrix Market size line cannot make the reader allocate or work for data the input does
// not hold: a 66-byte file stating a 4000 x 4000 array is refused at its size line.
func TestMarketSizeBoundedByData(t *testing.T) {
	in := "%%MatrixMarket matrix array real general\n4000 4000\n1\n2\n3\n4\n5\n6\n7\n8\n9\n"
	start := time.Now()
	_, err := ReadMatrix(strings.NewReader(in), Limits{})
	var le *LineError
	if !errors.As(err, &le) || le.Line != 2 || !strings.Contains(err.Error(), "holds only") {
		t.Errorf("%d-byte file stating 4000 x 4000: %v", len(in), err)
	}
	t.Logf("refused in %v", time.Since(start))
	co := "%%MatrixMarket matrix coordinate real general\n4000 4000 100000\n1 1 1\n"
	if _, err := ReadMatrix(strings.NewReader(co), Limits{}); err == nil || !strings.Contains(err.Error(), "holds only") {
		t.Errorf("coordinate file stating 100000 entries in %d bytes: %v", len(co), err)
	}
}
