package scenario

import (
	"bytes"
	"math"
	"strings"
	"testing"
)

// bindCases are scenarios with every family of number: an empirical spectrum (design
// parameters as a list), a uniform-sv design (parameters tied by min <= max), a
// Bernoulli-Gauss signal, both forms of the noise, an elastic net.
func bindCases(t *testing.T) []Scenario {
	t.Helper()
	var out []Scenario
	for _, f := range []string{"sparse-survey.json", "ill-conditioned-array.json", "ridge-threshold.json"} {
		out = append(out, benchScenario(t, f))
	}
	s := baseScenario(t)
	out = append(out, s)
	snr, err := s.With("snr_db", 20)
	if err != nil {
		t.Fatal(err)
	}
	out = append(out, snr)
	u, err := Decode([]byte(`{"kind": "hdrisk.scenario", "version": 1, "title": "uniform-sv",
		"design": {"shape": "uniform-sv", "alpha": 0.7, "min": 0.5, "max": 2},
		"signal": {"law": "student-t", "dof": 5, "scale": 1}, "noise": {"snr_db": 10},
		"penalty": {"kind": "huber", "l1": 0.1, "width": 0.3}}`))
	if err != nil {
		t.Fatal(err)
	}
	return append(out, u)
}

// Binding a path and setting it gives what With and Check give: the same scenario, the same
// problem, and the same refusal for values out of range or refused by a constructor.
func TestBindingAtMatchesWith(t *testing.T) {
	for _, s := range bindCases(t) {
		c, err := s.Check()
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range s.Paths() {
			b, err := c.Bind(p.Name)
			if err != nil {
				t.Fatalf("%s: Bind(%s): %v", s.Title, p.Name, err)
			}
			if got := b.Info(); got != p {
				t.Errorf("%s: Info = %+v, want %+v", s.Title, got, p)
			}
			old, _ := s.Get(p.Name)
			for _, v := range []float64{old * 1.5, old + 0.25, -old - 1, 3, 0, math.NaN(), p.Max, p.Min} {
				want, werr := s.With(p.Name, v)
				got, gerr := b.At(v)
				if (werr == nil) != (gerr == nil) || (werr != nil && werr.Error() != gerr.Error()) {
					t.Errorf("%s: %s = %v: With gives %v, At gives %v", s.Title, p.Name, v, werr, gerr)
					continue
				}
				if werr != nil {
					continue
				}
				sameScenario(t, s.Title+" "+p.Name, got.Scenario(), want)
				wp, err := want.Problem()
				if err != nil {
					t.Fatal(err)
				}
				gp := got.Problem()
				for _, g := range []float64{0.1, 1, 7} {
					if gp.Design.At(g) != wp.Design.At(g) {
						t.Errorf("%s: %s = %v: design at %v differs", s.Title, p.Name, v, g)
					}
					if gp.Penalty.Prox(0.8, g) != wp.Penalty.Prox(0.8, g) {
						t.Errorf("%s: %s = %v: prox differs", s.Title, p.Name, v)
					}
				}
				if gp.Noise != wp.Noise || gp.Signal.Second() != wp.Signal.Second() {
					t.Errorf("%s: %s = %v: noise %v vs %v, signal %v vs %v", s.Title, p.Name, v, gp.Noise, wp.Noise, gp.Signal.Second(), wp.Signal.Second())
				}
				for _, q := range s.Paths() {
					gv, gerr := got.Get(q.Name)
					wv, werr := want.Get(q.Name)
					if gerr != nil || werr != nil || math.Abs(gv-wv) > 1e-12*math.Abs(wv) {
						t.Errorf("%s: %s = %v: Get(%s) = %v, %v; want %v, %v", s.Title, p.Name, v, q.Name, gv, gerr, wv, werr)
					}
				}
			}
		}
	}
}

// A Checked is not changed by the values set through its bindings, nor by later edits to
// the scenario it was checked from.
func TestCheckedDoesNotChange(t *testing.T) {
	s := benchScenario(t, "sparse-survey.json")
	c, err := s.Check()
	if err != nil {
		t.Fatal(err)
	}
	before, _ := c.Scenario().Encode()
	b, _ := c.Bind("l1")
	if _, err := b.At(0.3); err != nil {
		t.Fatal(err)
	}
	a, _ := c.Bind("alpha")
	if _, err := a.At(0.9); err != nil {
		t.Fatal(err)
	}
	s.Penalty.Params["l1"] = 7
	for k := range s.Design.Lists {
		s.Design.Lists[k][0] = 1e9
	}
	after, _ := c.Scenario().Encode()
	if !bytes.Equal(before, after) {
		t.Errorf("the checked scenario changed:\n%s\n%s", before, after)
	}
	if _, err := c.Bind("design.values"); err == nil && len(s.Design.Lists) > 0 {
		t.Error("a list was bound as a number")
	}
}

func sameScenario(t *testing.T, what string, got, want Scenario) {
	t.Helper()
	g, err1 := got.Encode()
	w, err2 := want.Encode()
	if err1 != nil || err2 != nil || !bytes.Equal(g, w) {
		t.Errorf("%s: scenario differs (%v, %v):\n%s\nwant\n%s", what, err1, err2, g, w)
	}
}

// A checked scenario writes the same file and link as the scenario it came from, and
// DecodeChecked reads what Decode reads, refusing what it refuses.
func TestCheckedEncodesAsScenario(t *testing.T) {
	for _, s := range bindCases(t) {
		c, err := s.Check()
		if err != nil {
			t.Fatal(err)
		}
		want, _ := s.Encode()
		if got := c.Encode(); !bytes.Equal(got, want) {
			t.Errorf("%s: Checked.Encode differs:\n%s\nwant\n%s", s.Title, got, want)
		}
		wl, werr := EncodeLinkFits(s, 0)
		gl, gerr := c.EncodeLink(0)
		if gl != wl || gerr != nil || werr != nil {
			t.Errorf("%s: Checked.EncodeLink %q, %v; want %q, %v", s.Title, gl, gerr, wl, werr)
		}
		d, err := DecodeChecked(want)
		if err != nil {
			t.Fatal(err)
		}
		sameScenario(t, s.Title+" DecodeChecked", d.Scenario(), s)
	}
	bad := []byte(strings.Replace(base, `"l1": 0.05`, `"l1": -1`, 1))
	_, werr := Decode(bad)
	_, gerr := DecodeChecked(bad)
	if werr == nil || gerr == nil || werr.Error() != gerr.Error() {
		t.Errorf("invalid document: Decode %v, DecodeChecked %v", werr, gerr)
	}
	if _, err := DecodeChecked([]byte("{")); err == nil {
		t.Error("DecodeChecked accepted a broken document")
	}
}
