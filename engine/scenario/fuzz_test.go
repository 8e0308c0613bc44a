package scenario

import (
	"bytes"
	"errors"
	"reflect"
	"testing"
)

// The seed corpora live in testdata/fuzz/<FuzzName>: valid examples, truncations, hostile
// titles, and every input a fuzzing run found interesting enough to keep.

// FuzzDecode checks that Decode never panics, that every refusal is a *FieldError with a
// reason, and that an accepted document re-encodes to a canonical form that decodes to the
// same scenario.
func FuzzDecode(f *testing.F) {
	f.Add([]byte(base))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := Decode(data)
		if err != nil {
			var fe *FieldError
			if !errors.As(err, &fe) || fe.Reason == "" {
				t.Fatalf("error %v (%T) is not a *FieldError with a reason", err, err)
			}
			return
		}
		out, err := s.Encode()
		if err != nil {
			t.Fatalf("Encode of a decoded scenario: %v", err)
		}
		back, err := Decode(out)
		if err != nil {
			t.Fatalf("the canonical form does not decode: %v\n%s", err, out)
		}
		if !reflect.DeepEqual(back, s) {
			t.Fatalf("round trip changed the scenario:\n%+v\n%+v", s, back)
		}
		again, _ := back.Encode()
		if !bytes.Equal(again, out) {
			t.Fatalf("Encode is not canonical:\n%s\n%s", out, again)
		}
	})
}

// FuzzDecodeLink checks that DecodeLink never panics, that every refusal is a *LinkError
// or a *FieldError with a reason, and that an accepted link's scenario survives a new link.
func FuzzDecodeLink(f *testing.F) {
	f.Add("s1.")
	f.Fuzz(func(t *testing.T, text string) {
		s, err := DecodeLink(text)
		if err != nil {
			var fe *FieldError
			var le *LinkError
			switch {
			case errors.As(err, &le):
				if le.Reason == "" {
					t.Fatal("a *LinkError without a reason")
				}
			case errors.As(err, &fe):
				if fe.Reason == "" {
					t.Fatal("a *FieldError without a reason")
				}
			default:
				t.Fatalf("error %v (%T) is neither a *LinkError nor a *FieldError", err, err)
			}
			return
		}
		code, err := EncodeLinkFits(s, 0)
		if err != nil {
			t.Fatalf("EncodeLink of a decoded scenario: %v", err)
		}
		back, err := DecodeLink(code)
		if err != nil {
			t.Fatalf("a fresh link does not decode: %v", err)
		}
		if !reflect.DeepEqual(back, s) {
			t.Fatalf("link round trip changed the scenario")
		}
	})
}
