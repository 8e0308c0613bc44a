package scenario

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"

	"hdrisk/engine/param"
)

// randIn draws a number of p's domain: uniform on a bounded range, log-spread above the
// lower end of an unbounded one, and now and then a closed end itself.
func randIn(r *rand.Rand, p param.Param) float64 {
	for {
		var x float64
		switch {
		case r.IntN(10) == 0 && !p.MinOpen:
			x = p.Min
		case r.IntN(10) == 0 && !p.MaxOpen && !math.IsInf(p.Max, 1):
			x = p.Max
		case math.IsInf(p.Min, -1):
			x = 10 * r.NormFloat64()
		case math.IsInf(p.Max, 1):
			x = p.Min + math.Exp(3*r.NormFloat64())
		default:
			x = p.Min + (p.Max-p.Min)*r.Float64()
		}
		if p.Check("", x) == nil {
			return x
		}
	}
}

var textRunes = []rune("abcXYZ 019<>&\"'\\/#%éü中文😀\u2028\u00a0=+-_.,;:")

func randText(r *rand.Rand, max int, multiline bool) string {
	n := r.IntN(max + 1)
	if r.IntN(4) == 0 {
		n = max
	}
	var b strings.Builder
	for range n {
		if multiline && r.IntN(20) == 0 {
			b.WriteByte('\n')
			continue
		}
		b.WriteRune(textRunes[r.IntN(len(textRunes))])
	}
	return b.String()
}

func randKind(r *rand.Rand, f *family) (string, map[string]float64, map[string][]float64) {
	k := f.Kinds[r.IntN(len(f.Kinds))]
	var params map[string]float64
	var lists map[string][]float64
	n := 1 + r.IntN(6)
	for _, p := range k.Params {
		if p.List {
			if lists == nil {
				lists = map[string][]float64{}
			}
			l := make([]float64, n)
			for i := range l {
				l[i] = randIn(r, p)
			}
			lists[p.Name] = l
			continue
		}
		if params == nil {
			params = map[string]float64{}
		}
		params[p.Name] = randIn(r, p)
	}
	// A mixture's weights must sum to 1 (signal.GaussMixture); spread them accordingly.
	if w, ok := lists["weights"]; ok {
		var sum float64
		for _, x := range w {
			sum += x
		}
		for i := range w {
			if sum > 0 {
				w[i] /= sum
			} else {
				w[i] = 1 / float64(len(w))
			}
		}
	}
	return k.Name, params, lists
}

func randAxis(r *rand.Rand, s Scenario, not string) (name string, from, to float64, log bool) {
	var ts []target
	for _, t := range s.targets() {
		if t.scalar && t.full != not {
			ts = append(ts, t)
		}
	}
	t := ts[r.IntN(len(ts))]
	name = t.full
	if r.IntN(2) == 0 {
		name = shortName(t)
	}
	return name, randIn(r, t.p), randIn(r, t.p), r.IntN(2) == 0
}

// randScenario draws a scenario that is valid with good probability; the caller keeps
// those that Validate accepts.
func randScenario(r *rand.Rand) Scenario {
	s := Scenario{Kind: Kind, Version: Version, Title: randText(r, MaxTitle, false)}
	if r.IntN(2) == 0 {
		s.Notes = randText(r, MaxNotes, true)
	}
	s.Design.Shape, s.Design.Params, s.Design.Lists = randKind(r, designs())
	s.Design.Alpha = randIn(r, AlphaParam)
	s.Design.Scale = scales[r.IntN(len(scales))]
	s.Signal.Law, s.Signal.Params, s.Signal.Lists = randKind(r, signals())
	if r.IntN(2) == 0 {
		s.Noise = Noise{Variance: randIn(r, NoiseParam)}
	} else {
		s.Noise = Noise{SNRdB: randIn(r, SNRParam), SNR: true}
	}
	s.Penalty.Kind, s.Penalty.Params, _ = randKind(r, penalties())
	if r.IntN(3) == 0 {
		return s
	}
	st := &Study{View: views[r.IntN(len(views))]}
	if r.IntN(2) == 0 {
		sw := &Sweep{Points: 2 + r.IntN(MaxSweepPoints-1)}
		sw.Over, sw.From, sw.To, sw.Log = randAxis(r, s, "")
		if r.IntN(2) == 0 {
			// One curve per value of a second number: its two random ends, or one of them.
			x, _ := s.resolve(sw.Over)
			var from, to float64
			sw.Curves, from, to, _ = randAxis(r, s, x.full)
			sw.CurvesAt = []float64{from, to}[:1+r.IntN(2)]
		}
		st.Sweep = sw
	}
	if r.IntN(2) == 0 {
		m := &Map{XPoints: 2 + r.IntN(MaxMapPoints-1), YPoints: 2 + r.IntN(MaxMapPoints-1)}
		m.X, m.XFrom, m.XTo, m.XLog = randAxis(r, s, "")
		x, _ := s.resolve(m.X)
		m.Y, m.YFrom, m.YTo, m.YLog = randAxis(r, s, x.full)
		st.Map = m
	}
	if _, ok := s.Penalty.Params["l1"]; ok && r.IntN(2) == 0 {
		st.Best = &Best{Over: "l1"}
	}
	if r.IntN(2) == 0 {
		st.Plan = &Plan{TargetDB: MinTargetDB + (MaxTargetDB-MinTargetDB)*r.Float64(), AlphaMax: randIn(r, AlphaParam)}
	}
	if r.IntN(2) == 0 {
		st.Check = &Check{N: 2 + r.IntN(MaxCheckN-1), Trials: 1 + r.IntN(MaxTrials), Seed: r.Uint64N(MaxSeed + 1),
			Solver: append([]string{""}, solvers...)[r.IntN(len(solvers)+1)]}
	}
	s.Study = st
	return s
}

// TestRoundTrip checks Decode(Encode(s)) == s, and the same through a link, for random
// valid scenarios of every shape, law and penalty kind.
func TestRoundTrip(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	seen := map[string]bool{}
	valid, tries := 0, 0
	for valid < 400 && tries < 4000 {
		tries++
		s := randScenario(r)
		if s.Validate() != nil {
			continue
		}
		valid++
		seen["design "+s.Design.Shape] = true
		seen["signal "+s.Signal.Law] = true
		seen["penalty "+s.Penalty.Kind] = true
		data, err := s.Encode()
		if err != nil {
			t.Fatal(err)
		}
		back, err := Decode(data)
		if err != nil {
			t.Fatalf("%v\n%s", err, data)
		}
		if !reflect.DeepEqual(back, s) {
			t.Fatalf("round trip changed the scenario:\n%+v\n%+v", s, back)
		}
		again, _ := back.Encode()
		if !bytes.Equal(again, data) {
			t.Fatalf("Encode is not canonical:\n%s\n%s", data, again)
		}
		code, err := EncodeLinkFits(s, 0)
		if err != nil {
			t.Fatal(err)
		}
		fromLink, err := DecodeLink(code)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(fromLink, s) {
			t.Fatalf("link round trip changed the scenario")
		}
	}
	if valid < 400 {
		t.Fatalf("only %d of %d random scenarios were valid", valid, tries)
	}
	want := len(designs().Kinds) + len(signals().Kinds) + len(penalties().Kinds)
	if len(seen) != want {
		t.Errorf("covered %d of %d kinds: %v", len(seen), want, seen)
	}
}

// Numbers are written as encoding/json writes a float64 (the reference), across the
// ranges where it switches between plain and exponent form.
func TestFloatsWrittenAsEncodingJSON(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	xs := []float64{0, 1, -1, 1e-6, 9.999999999999999e-7, 1e21, 1e20, 123456789012345678901, 1e-7, -2.5e-9, 5e-324, math.MaxFloat64, 0.1, 1.0 / 3}
	for range 2000 {
		xs = append(xs, math.Copysign(math.Exp(r.NormFloat64()*20), r.Float64()-0.5))
	}
	for _, x := range xs {
		want, _ := json.Marshal(x)
		if got := appendFloat(nil, x); string(got) != string(want) {
			t.Errorf("%v written %s, encoding/json writes %s", x, got, want)
		}
	}
}

// TestSweepCurvesRoundTrip: a sweep with one curve per bit depth keeps its curves through
// the file and the link, writes them after the axis, and a sweep without them encodes as
// before (no curves keys).
func TestSweepCurvesRoundTrip(t *testing.T) {
	doc := `{"kind": "hdrisk.scenario", "version": 1, "title": "invented 1-bit case",
		"design": {"shape": "gaussian", "alpha": 2, "scale": "rows"},
		"signal": {"law": "bernoulli-gauss", "density": 0.2, "variance": 1}, "noise": {"variance": 0.01},
		"penalty": {"kind": "l1", "l1": 0.05}, "readout": {"kind": "quantize", "bits": 1, "range": 1},
		"study": {"view": "curve", "sweep": {"over": "alpha", "from": 0.5, "to": 4, "points": 8, "curves": "bits", "curves_at": [1, 2, 3, 4]}}}`
	s, err := Decode([]byte(doc))
	if err != nil {
		t.Fatal(err)
	}
	if sw := s.Study.Sweep; sw.Curves != "bits" || !reflect.DeepEqual(sw.CurvesAt, []float64{1, 2, 3, 4}) {
		t.Fatalf("decoded sweep %+v", sw)
	}
	data, err := s.Encode()
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(data, []byte(`"points":8,"curves":"bits","curves_at":[1,2,3,4]}`)) && !bytes.Contains(data, []byte(`"curves": "bits"`)) {
		t.Errorf("encoded sweep: %s", data)
	}
	code, err := EncodeLink(s)
	if err != nil {
		t.Fatal(err)
	}
	back, err := DecodeLink(code)
	if err != nil || !reflect.DeepEqual(back, s) {
		t.Fatalf("link round trip: %v\n%+v\n%+v", err, back.Study.Sweep, s.Study.Sweep)
	}
	// bits takes whole numbers only: a value between is refused, naming its place.
	bad := strings.Replace(doc, "[1, 2, 3, 4]", "[1, 2.5]", 1)
	var fe *FieldError
	if _, err := Decode([]byte(bad)); !errors.As(err, &fe) || fe.Field != "study.sweep.curves_at[1]" {
		t.Errorf("bits 2.5: %v", err)
	}
	s.Study.Sweep.Curves, s.Study.Sweep.CurvesAt = "", nil
	plain, _ := s.Encode()
	if bytes.Contains(plain, []byte("curves")) {
		t.Errorf("a sweep without curves writes them: %s", plain)
	}
}
