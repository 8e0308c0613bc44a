package scenario

import (
	"bytes"
	"errors"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
)

// randKept returns a valid scenario whose study holds 1 to MaxKept kept curves, each over
// a random valid scenario of its own.
func randKept(r *rand.Rand) Scenario {
	for {
		s := randScenario(r)
		if s.Study == nil || s.Validate() != nil {
			continue
		}
		for len(s.Study.Kept) < 1+r.IntN(MaxKept) {
			ks := randScenario(r)
			ks.Study = nil
			if ks.Validate() != nil {
				continue
			}
			k := Kept{Label: randText(r, MaxTitle, false), Scenario: ks, Sweep: Sweep{Points: 2 + r.IntN(MaxSweepPoints-1)}}
			k.Sweep.Over, k.Sweep.From, k.Sweep.To, k.Sweep.Log = randAxis(r, ks, "")
			s.Study.Kept = append(s.Study.Kept, k)
		}
		if s.Validate() == nil {
			return s
		}
		s.Study.Kept = nil
	}
}

// TestKeptRoundTrip checks that kept curves come back unchanged from a file and a link.
func TestKeptRoundTrip(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	for range 60 {
		s := randKept(r)
		data, err := s.Encode()
		if err != nil {
			t.Fatal(err)
		}
		back, err := Decode(data)
		if err != nil {
			t.Fatalf("%v\n%s", err, data)
		}
		if !reflect.DeepEqual(back, s) {
			t.Fatalf("round trip changed the kept curves:\n%+v\n%+v", s.Study.Kept, back.Study.Kept)
		}
		if again, _ := back.Encode(); !bytes.Equal(again, data) {
			t.Fatalf("Encode is not canonical:\n%s\n%s", data, again)
		}
		code, err := EncodeLinkFits(back, 0)
		if err != nil {
			t.Fatal(err)
		}
		fromLink, err := DecodeLink(code)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(fromLink, s) {
			t.Fatalf("link round trip changed the kept curves")
		}
	}
}

// TestKeptRefused checks that a study's kept curves are refused, naming the field, when
// there are too many, when one holds a study or an unknown key, and when its own scenario
// or axis is invalid.
func TestKeptRefused(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	s := randKept(r)
	data, err := s.Encode()
	if err != nil {
		t.Fatal(err)
	}
	k0 := s.Study.Kept[0]
	for _, c := range []struct {
		name, field string
		edit        func(*Study)
	}{
		{"too many", "study.kept", func(st *Study) {
			for len(st.Kept) <= MaxKept {
				st.Kept = append(st.Kept, k0)
			}
		}},
		{"nested study", "study.kept[0].scenario.study", func(st *Study) {
			st.Kept[0].Scenario.Study = &Study{View: "curve"}
		}},
		{"invalid scenario", "study.kept[0].scenario.design.alpha", func(st *Study) {
			st.Kept[0].Scenario.Design.Alpha = -1
		}},
		{"unknown axis", "study.kept[0].over", func(st *Study) {
			st.Kept[0].Sweep.Over = "no_such_number"
		}},
		{"control character", "study.kept[0].label", func(st *Study) {
			st.Kept[0].Label = "a\x01b"
		}},
	} {
		bad := s.clone()
		c.edit(bad.Study)
		err := bad.Validate()
		var fe *FieldError
		if !errors.As(err, &fe) || fe.Field != c.field {
			t.Errorf("%s: Validate gives %v, want an error on %s", c.name, err, c.field)
		}
	}
	unknown := bytes.Replace(data, []byte(`"label":`), []byte(`"colour": "red", "label":`), 1)
	_, err = Decode(unknown)
	var fe *FieldError
	if !errors.As(err, &fe) || !strings.HasPrefix(fe.Field, "study.kept[0]") {
		t.Errorf("an unknown key in a kept curve gives %v, want an error under study.kept[0]", err)
	}
}
