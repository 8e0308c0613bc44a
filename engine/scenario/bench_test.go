package scenario

import (
	"bytes"
	"compress/flate"
	"encoding/base64"
	"os"
	"strings"
	"testing"
)

func benchScenario(b testing.TB, file string) Scenario {
	data, err := os.ReadFile("../../testdata/scenarios/" + file)
	if err != nil {
		b.Fatal(err)
	}
	s, err := Decode(data)
	if err != nil {
		b.Fatal(err)
	}
	return s
}

// BenchmarkWithProblem is the cost a sweep pays per point before the solver runs.
func BenchmarkWithProblem(b *testing.B) {
	for _, f := range []string{"sparse-survey.json", "ill-conditioned-array.json"} {
		s := benchScenario(b, f)
		b.Run(f, func(b *testing.B) {
			for i := range b.N {
				c, err := s.With("l1", 0.01+float64(i%100)*1e-3)
				if err != nil {
					b.Fatal(err)
				}
				if _, err := c.Problem(); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkDecode(b *testing.B) {
	data, _ := os.ReadFile("../../testdata/scenarios/ill-conditioned-array.json")
	for range b.N {
		if _, err := Decode(data); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkLink(b *testing.B) {
	s := benchScenario(b, "ill-conditioned-array.json")
	b.Run("encode", func(b *testing.B) {
		for range b.N {
			if _, err := EncodeLink(s); err != nil {
				b.Fatal(err)
			}
		}
	})
	code, _ := EncodeLink(s)
	b.Run("decode", func(b *testing.B) {
		for range b.N {
			if _, err := DecodeLink(code); err != nil {
				b.Fatal(err)
			}
		}
	})
}

// BenchmarkDecodeLinkHostile is the cost of refusing the worst links a page may be opened
// with: a deflate bomb (64 MB of spaces compressed) and a code over the length cap. The
// refusal must stay well under a second; it is measured here rather than timed in a test.
func BenchmarkDecodeLinkHostile(b *testing.B) {
	var bomb bytes.Buffer
	w, _ := flate.NewWriter(&bomb, flate.BestCompression)
	w.Write(bytes.Repeat([]byte(" "), 64<<20))
	w.Close()
	for name, code := range map[string]string{
		"deflate-bomb": LinkPrefix + base64.RawURLEncoding.EncodeToString(bomb.Bytes()),
		"over-the-cap": strings.Repeat("A", 10<<20),
	} {
		b.Run(name, func(b *testing.B) {
			for b.Loop() {
				if _, err := DecodeLink(code); err == nil {
					b.Fatal("accepted")
				}
			}
		})
	}
}
