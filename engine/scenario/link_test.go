package scenario

import (
	"bytes"
	"compress/flate"
	"encoding/base64"
	"errors"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
)

func baseScenario(t testing.TB) Scenario {
	t.Helper()
	s, err := Decode([]byte(base))
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// deflated returns a link code holding data as it is, valid or not.
func deflated(t *testing.T, data []byte) string {
	t.Helper()
	var z bytes.Buffer
	w, _ := flate.NewWriter(&z, flate.BestCompression)
	w.Write(data)
	w.Close()
	return LinkPrefix + base64.RawURLEncoding.EncodeToString(z.Bytes())
}

func TestLinkForms(t *testing.T) {
	s := baseScenario(t)
	code, err := EncodeLink(s)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(code, "s1.") || strings.ContainsAny(code[3:], "+/=#") {
		t.Fatalf("code %q is not s1. and base64url without padding", code)
	}
	half := len(code) / 2
	for _, text := range []string{
		code,
		"#" + code,
		"  https://example.org/hdrisk/index.html#" + code + "\n",
		"file:///home/user/hdrisk.html#" + code[:half] + "\n  " + code[half:],
		code + "==",
	} {
		got, err := DecodeLink(text)
		if err != nil {
			t.Fatalf("%q: %v", text, err)
		}
		if !reflect.DeepEqual(got, s) {
			t.Errorf("%q decodes to %+v", text, got)
		}
	}
}

// TestLinkErrors gives each way a link can be wrong, and checks the message names it.
func TestLinkErrors(t *testing.T) {
	s := baseScenario(t)
	code, err := EncodeLink(s)
	if err != nil {
		t.Fatal(err)
	}
	var bomb bytes.Buffer
	w, _ := flate.NewWriter(&bomb, flate.BestCompression)
	w.Write(bytes.Repeat([]byte(" "), 64<<20))
	w.Close()
	bombCode := LinkPrefix + base64.RawURLEncoding.EncodeToString(bomb.Bytes())
	corrupt := LinkPrefix + base64.RawURLEncoding.EncodeToString([]byte{0xff, 0xfe, 0xfd, 0xfc, 0xfb})
	tests := []struct {
		name, text, want string
	}{
		{"empty", "", "empty"},
		{"blank", " \n\t ", "empty"},
		{"address without fragment code", "https://example.org/hdrisk/#", "empty"},
		{"other version", "s2.AAAA", `version "s2."`},
		{"not a link", "hello world", `does not start with "s1."`},
		{"nothing after prefix", "s1.", "cut off"},
		{"standard base64", "s1.ab+c/def", "not base64url"},
		{"non-ASCII", "s1.abcé", "not base64url"},
		{"not deflate", corrupt, "not deflate"},
		{"cut off mid byte", code[:len(code)-1-(len(code)-4)%4], "cut off"},
		{"cut off stream", code[:len(code)/2-(len(code)/2-3)%4], "cut off"},
		{"deflate bomb", bombCode, "inflates to more than 4194304 bytes (4 MB)"},
		{"stray bytes", code + base64.RawURLEncoding.EncodeToString([]byte("xyz"))[:4], "stray"},
		{"over the length cap", strings.Repeat("A", 10<<20), "4 MB"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := DecodeLink(tc.text)
			var le *LinkError
			if !errors.As(err, &le) {
				t.Fatalf("error %v (%T), want a *LinkError", err, err)
			}
			if le.Reason == "" || !strings.Contains(le.Reason, tc.want) {
				t.Errorf("got %q, want it to name %q", le.Reason, tc.want)
			}
		})
	}
}

func TestLinkBadScenario(t *testing.T) {
	_, err := DecodeLink(deflated(t, []byte("this is not JSON")))
	var fe *FieldError
	if !errors.As(err, &fe) || !strings.Contains(fe.Reason, "not valid JSON") {
		t.Errorf("JSON that does not decode: %v", err)
	}
	bad := strings.Replace(base, `"l1": 0.05`, `"l1": -1`, 1)
	_, err = DecodeLink(deflated(t, []byte(bad)))
	if !errors.As(err, &fe) || fe.Field != "penalty.l1" {
		t.Errorf("invalid scenario: %v, want the *FieldError of penalty.l1", err)
	}
	hostile := strings.Replace(base, `Invented example: test base`, `<img src=x onerror=alert(1)>`, 1)
	got, err := DecodeLink(deflated(t, []byte(hostile)))
	if err != nil {
		t.Fatal(err)
	}
	if got.Title != `<img src=x onerror=alert(1)>` {
		t.Errorf("title %q", got.Title)
	}
	code, _ := EncodeLink(got)
	if strings.ContainsAny(code, "<>") {
		t.Errorf("link %q carries markup characters", code)
	}
}

func TestLinkTooLong(t *testing.T) {
	s := baseScenario(t)
	r := rand.New(rand.NewPCG(3, 4))
	vals := make([]float64, 5000)
	for i := range vals {
		vals[i] = r.Float64() + 0.1
	}
	s.Design = Design{Shape: "empirical-sv", Alpha: 0.4, Scale: ScaleRows, Lists: map[string][]float64{"values": vals}}
	_, err := EncodeLink(s)
	var le *LinkError
	if !errors.As(err, &le) || !strings.Contains(le.Reason, "8000") || !strings.Contains(le.Reason, "file") {
		t.Fatalf("got %v, want a *LinkError saying the link is too long and suggesting a file", err)
	}
	code, err := EncodeLinkFits(s, 0)
	if err != nil {
		t.Fatal(err)
	}
	back, err := DecodeLink(code)
	if err != nil || !reflect.DeepEqual(back, s) {
		t.Errorf("a long link without a cap does not read back: %v", err)
	}
}
