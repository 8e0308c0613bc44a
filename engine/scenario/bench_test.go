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

// BenchmarkOwnSpectrumCheck is what the page pays per edit of a scenario on a 100000-value
// own spectrum: "check" is Scenario.Check, "encode" Scenario.Encode (which checks again),
// "checked-encode" writing the file from the Checked, "checked-link" finding that it is too
// long for a link.
func BenchmarkOwnSpectrumCheck(b *testing.B) {
	s := baseScenario(b)
	vals := make([]float64, 100000)
	for i := range vals {
		vals[i] = 0.2 + 1.8*float64(i)/float64(len(vals)-1)
	}
	s.Design = Design{Shape: "empirical-sv", Alpha: 0.6, Scale: ScaleRows, Lists: map[string][]float64{"values": vals}}
	c, err := s.Check()
	if err != nil {
		b.Fatal(err)
	}
	b.Run("check", func(b *testing.B) {
		for b.Loop() {
			if _, err := s.Check(); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("encode", func(b *testing.B) {
		for b.Loop() {
			if _, err := s.Encode(); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("checked-encode", func(b *testing.B) {
		for b.Loop() {
			c.Encode()
		}
	})
	b.Run("checked-link", func(b *testing.B) {
		for b.Loop() {
			if _, err := c.EncodeLink(MaxLinkLen); err == nil {
				b.Fatal("a link of 100000 numbers was accepted")
			}
		}
	})
}
