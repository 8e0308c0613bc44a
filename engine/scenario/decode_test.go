package scenario

import (
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// base is a valid scenario that the error cases below change one field at a time.
const base = `{
  "kind": "hdrisk.scenario", "version": 1,
  "title": "Invented example: test base",
  "design": {"shape": "orthogonal", "alpha": 0.4, "scale": "rows"},
  "signal": {"law": "bernoulli-gauss", "density": 0.05, "variance": 1},
  "noise": {"variance": 0.01},
  "penalty": {"kind": "elastic-net", "l1": 0.05, "l2": 0}
}`

// edit replaces, in base, the first occurrence of each old text (which must be there) by
// its new text: edit(t, old1, new1, old2, new2, ...).
func edit(t *testing.T, pairs ...string) string {
	t.Helper()
	doc := base
	for i := 0; i+1 < len(pairs); i += 2 {
		if !strings.Contains(doc, pairs[i]) {
			t.Fatalf("base lacks %q", pairs[i])
		}
		doc = strings.Replace(doc, pairs[i], pairs[i+1], 1)
	}
	return doc
}

func TestDecodeBase(t *testing.T) {
	s, err := Decode([]byte(base))
	if err != nil {
		t.Fatal(err)
	}
	if s.Design.Alpha != 0.4 || s.Signal.Params["density"] != 0.05 || s.Penalty.Params["l1"] != 0.05 || s.Noise.Variance != 0.01 {
		t.Errorf("decoded %+v", s)
	}
}

func TestDecodeDefaults(t *testing.T) {
	s, err := Decode([]byte(edit(t, `, "scale": "rows"`, ``)))
	if err != nil {
		t.Fatal(err)
	}
	if s.Design.Scale != ScaleRows {
		t.Errorf("scale defaults to %q", s.Design.Scale)
	}
	// nonneg-l1 states l2 as optional with default 0 in the penalty registry.
	s, err = Decode([]byte(edit(t, `"kind": "elastic-net", "l1": 0.05, "l2": 0`, `"kind": "nonneg-l1", "l1": 0.05`)))
	if err != nil {
		t.Fatal(err)
	}
	if v, ok := s.Penalty.Params["l2"]; !ok || v != 0 {
		t.Errorf("nonneg-l1 l2 = %v, %v; want the default 0, present", v, ok)
	}
	out, err := s.Encode()
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(out), `"l2": 0`) {
		t.Errorf("the default is not written back:\n%s", out)
	}
}

func TestDecodeErrors(t *testing.T) {
	long := strings.Repeat("a", MaxTitle+1)
	tests := []struct {
		name, doc, field, reason string
	}{
		{"unknown top field", edit(t, `"version": 1,`, `"version": 1, "colour": "red",`), "colour", "unknown field"},
		{"unknown design field", edit(t, `"scale": "rows"`, `"scale": "rows", "colour": 1`), "design.colour", "unknown field"},
		{"unknown noise field", edit(t, `{"variance": 0.01}`, `{"variance": 0.01, "color": 2}`), "noise.color", "unknown field"},
		{"param of another shape", edit(t, `"scale": "rows"`, `"scale": "rows", "min": 1`), "design.min", "not a parameter of shape orthogonal"},
		{"param of another law", edit(t, `"law": "bernoulli-gauss", "density": 0.05, "variance": 1`, `"law": "gauss", "variance": 1, "density": 0.5`), "signal.density", "not a parameter of law gauss"},
		{"param of another penalty", edit(t, `"kind": "elastic-net", "l1": 0.05, "l2": 0`, `"kind": "l1", "l1": 0.05, "l2": 0`), "penalty.l2", "not a parameter of penalty l1"},
		{"unknown shape", edit(t, `"shape": "orthogonal"`, `"shape": "circulant"`), "design.shape", "unknown shape"},
		{"unknown law", edit(t, `"law": "bernoulli-gauss"`, `"law": "cauchy"`), "signal.law", "unknown law"},
		{"unknown penalty", edit(t, `"kind": "elastic-net"`, `"kind": "scad"`), "penalty.kind", "unknown penalty"},
		{"missing shape param", edit(t, `"shape": "orthogonal"`, `"shape": "uniform-sv", "max": 2`), "design.min", "missing"},
		{"missing penalty param", edit(t, `"l1": 0.05, "l2": 0`, `"l2": 0`), "penalty.l1", "missing"},
		{"missing alpha", edit(t, `"alpha": 0.4, `, ``), "design.alpha", "missing"},
		{"missing design", edit(t, `"design": {"shape": "orthogonal", "alpha": 0.4, "scale": "rows"},`, ``), "design", "missing"},
		{"missing title", edit(t, `"title": "Invented example: test base",`, ``), "title", "missing"},
		{"alpha zero", edit(t, `"alpha": 0.4`, `"alpha": 0`), "design.alpha", "(0, 100]"},
		{"alpha too large", edit(t, `"alpha": 0.4`, `"alpha": 100.5`), "design.alpha", "(0, 100]"},
		{"alpha as text", edit(t, `"alpha": 0.4`, `"alpha": "0.4"`), "design.alpha", "must be a number"},
		{"alpha overflow", edit(t, `"alpha": 0.4`, `"alpha": 1e999`), "design.alpha", "too large"},
		{"alpha null", edit(t, `"alpha": 0.4`, `"alpha": null`), "design.alpha", "must be a number, not null"},
		{"bad scale", edit(t, `"scale": "rows"`, `"scale": "diagonal"`), "design.scale", "rows, columns, as-given"},
		{"density above 1", edit(t, `"density": 0.05`, `"density": 1.5`), "signal.density", "1.5"},
		{"density zero", edit(t, `"density": 0.05`, `"density": 0`), "signal.density", "0"},
		{"negative signal variance", edit(t, `"density": 0.05, "variance": 1`, `"density": 0.05, "variance": -1`), "signal.variance", "-1"},
		{"negative l1", edit(t, `"l1": 0.05`, `"l1": -0.05`), "penalty.l1", "-0.05"},
		{"q below 1", edit(t, `"kind": "elastic-net", "l1": 0.05, "l2": 0`, `"kind": "power", "weight": 1, "q": 0.5`), "penalty.q", "0.5"},
		{"min above max", edit(t, `"shape": "orthogonal"`, `"shape": "uniform-sv", "min": 3, "max": 2`), "design.min", "max"},
		{"negative noise", edit(t, `{"variance": 0.01}`, `{"variance": -0.01}`), "noise.variance", "[0, 1e+06]"},
		{"noise both ways", edit(t, `{"variance": 0.01}`, `{"variance": 0.01, "snr_db": 20}`), "noise", "variance or snr_db, not both"},
		{"noise neither", edit(t, `{"variance": 0.01}`, `{}`), "noise.variance", "missing"},
		{"snr out of range", edit(t, `{"variance": 0.01}`, `{"snr_db": 1000}`), "noise.snr_db", "dB"},
		{"snr of a zero signal", edit(t, `"law": "bernoulli-gauss", "density": 0.05, "variance": 1`, `"law": "gauss", "variance": 0`,
			`{"variance": 0.01}`, `{"snr_db": 10}`), "noise.snr_db", "no power"},
		{"wrong kind", edit(t, `"kind": "hdrisk.scenario"`, `"kind": "hdrisk.result"`), "kind", `must be "hdrisk.scenario"`},
		{"missing kind", edit(t, `"kind": "hdrisk.scenario", `, ``), "kind", "missing"},
		{"version 2", edit(t, `"version": 1`, `"version": 2`), "version", "reads version 1, not 2"},
		{"version 1.0", edit(t, `"version": 1`, `"version": 1.0`), "version", "whole number"},
		{"duplicate key", edit(t, `"alpha": 0.4`, `"alpha": 0.4, "alpha": 0.5`), "design.alpha", "given twice"},
		{"title too long", edit(t, `"Invented example: test base"`, `"`+long+`"`), "title", "the limit is 200"},
		{"title control character", edit(t, `"Invented example: test base"`, `"bell\u0007"`), "title", "control character"},
		{"title not text", edit(t, `"Invented example: test base"`, `{"html": "<b>"}`), "title", "must be a string"},
		{"notes too long", edit(t, `"version": 1,`, `"version": 1, "notes": "`+strings.Repeat("n", MaxNotes+1)+`",`), "notes", "the limit is 4000"},
		{"empty values", edit(t, `"shape": "orthogonal"`, `"shape": "empirical-sv", "values": []`), "design.values", "at least one"},
		{"negative value in list", edit(t, `"shape": "orthogonal"`, `"shape": "empirical-sv", "values": [1, 2, -3]`), "design.values[2]", "-3"},
		{"text in list", edit(t, `"shape": "orthogonal"`, `"shape": "empirical-sv", "values": [1, "2"]`), "design.values[1]", "must be a number"},
		{"list not a list", edit(t, `"shape": "orthogonal"`, `"shape": "empirical-sv", "values": 3`), "design.values", "list of numbers"},
		{"values list too long", edit(t, `"shape": "orthogonal"`, `"shape": "empirical-sv", "values": [`+strings.Repeat("1,", 100000)+`1]`), "design.values", "limit is 100000"},
		{"mixture lengths differ", edit(t, `"law": "bernoulli-gauss", "density": 0.05, "variance": 1`, `"law": "gauss-mixture", "weights": [0.5, 0.5], "means": [0, 1], "variances": [1]`), "signal.variances", ""},
		{"not JSON", "kind: hdrisk.scenario", "", "not valid JSON"},
		{"cut off", base[:len(base)/2], "", "ends early"},
		{"trailing data", base + `{}`, "", "more data after"},
		{"a list", `[1, 2]`, "", "must be a JSON object"},
		{"empty", ``, "", "not valid JSON"},
		{"not UTF-8", edit(t, `test base`, "test \xff base"), "", "not UTF-8"},
		{"too large", base + strings.Repeat(" ", MaxBytes), "", "limit is 4194304 bytes (4 MB)"},
		{"deep nesting", edit(t, `"version": 1,`, `"version": 1, "x": `+strings.Repeat("[", 50)+strings.Repeat("]", 50)+`,`), "x[0][0][0][0][0][0][0]", "nested deeper than 8 levels"},
		{"study without view", edit(t, `"penalty": {`, `"study": {}, "penalty": {`), "study.view", "missing"},
		{"study bad view", edit(t, `"penalty": {`, `"study": {"view": "table"}, "penalty": {`), "study.view", "curve, map, plan, check"},
		{"study unknown", edit(t, `"penalty": {`, `"study": {"view": "curve", "zoom": 2}, "penalty": {`), "study.zoom", "unknown field"},
		{"sweep over unknown", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "colour", "from": 1, "to": 2, "points": 10}}, "penalty": {`), "study.sweep.over", "not a number of this scenario"},
		{"sweep over a word", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "design.scale", "from": 1, "to": 2, "points": 10}}, "penalty": {`), "study.sweep.over", "a word"},
		{"sweep one point", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "l1", "from": 1, "to": 2, "points": 1}}, "penalty": {`), "study.sweep.points", "between 2 and 10000"},
		{"sweep out of range", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "alpha", "from": 0.1, "to": 200, "points": 10}}, "penalty": {`), "study.sweep.to", "(0, 100]"},
		{"sweep log from 0", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "l1", "from": 0, "to": 2, "points": 10, "log": true}}, "penalty": {`), "study.sweep.from", "log axis"},
		{"curves unknown", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "alpha", "from": 1, "to": 2, "points": 10, "curves": "colour", "curves_at": [1]}}, "penalty": {`), "study.sweep.curves", "not a number of this scenario"},
		{"curves the swept value", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "alpha", "from": 1, "to": 2, "points": 10, "curves": "design.alpha", "curves_at": [1]}}, "penalty": {`), "study.sweep.curves", "swept value"},
		{"curves without values", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "alpha", "from": 1, "to": 2, "points": 10, "curves": "l2"}}, "penalty": {`), "study.sweep.curves_at", "1 to 8 values"},
		{"values without curves", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "alpha", "from": 1, "to": 2, "points": 10, "curves_at": [1, 2]}}, "penalty": {`), "study.sweep.curves_at", "without study.sweep.curves"},
		{"curves value out of range", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "alpha", "from": 1, "to": 2, "points": 10, "curves": "l2", "curves_at": [1, -2]}}, "penalty": {`), "study.sweep.curves_at[1]", "-2"},
		{"curves value repeated", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "alpha", "from": 1, "to": 2, "points": 10, "curves": "l2", "curves_at": [1, 2, 1]}}, "penalty": {`), "study.sweep.curves_at[2]", "repeats 1"},
		{"curves values too many", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "alpha", "from": 1, "to": 2, "points": 10, "curves": "l2", "curves_at": [1, 2, 3, 4, 5, 6, 7, 8, 9]}}, "penalty": {`), "study.sweep.curves_at", "limit is 8"},
		{"curves values not a list", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "alpha", "from": 1, "to": 2, "points": 10, "curves": "l2", "curves_at": 1}}, "penalty": {`), "study.sweep.curves_at", "list of numbers"},
		{"curves a word", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "alpha", "from": 1, "to": 2, "points": 10, "curves": 3, "curves_at": [1]}}, "penalty": {`), "study.sweep.curves", "must be a string"},
		{"sweep same ends", edit(t, `"penalty": {`, `"study": {"view": "curve", "sweep": {"over": "l1", "from": 1, "to": 1, "points": 10}}, "penalty": {`), "study.sweep.to", "two different ends"},
		{"map same axes", edit(t, `"penalty": {`, `"study": {"view": "map", "map": {"x": "l1", "x_from": 0.1, "x_to": 1, "x_points": 5, "y": "penalty.l1", "y_from": 0.1, "y_to": 1, "y_points": 5}}, "penalty": {`), "study.map.y", "same value"},
		{"map missing y", edit(t, `"penalty": {`, `"study": {"view": "map", "map": {"x": "l1", "x_from": 0.1, "x_to": 1, "x_points": 5}}, "penalty": {`), "study.map.y", "missing"},
		{"best over absent l2", edit(t, `"kind": "elastic-net", "l1": 0.05, "l2": 0`, `"kind": "l1", "l1": 0.05}, "study": {"view": "curve", "best": {"over": "l2"}`), "study.best.over", "penalty l1 has no l2 (its strengths: l1)"},
		{"plan target", edit(t, `"penalty": {`, `"study": {"view": "plan", "plan": {"target_db": -1000}}, "penalty": {`), "study.plan.target_db", "dB"},
		{"check seed too large", edit(t, `"penalty": {`, `"study": {"view": "check", "check": {"n": 100, "trials": 5, "seed": 9007199254740992}}, "penalty": {`), "study.check.seed", "between 0 and 9007199254740991"},
		{"check n fraction", edit(t, `"penalty": {`, `"study": {"view": "check", "check": {"n": 100.5, "trials": 5, "seed": 1}}, "penalty": {`), "study.check.n", "whole number"},
		{"check solver", edit(t, `"penalty": {`, `"study": {"view": "check", "check": {"n": 100, "trials": 5, "seed": 1, "solver": "newton"}}, "penalty": {`), "study.check.solver", "cd, prox, vamp"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Decode([]byte(tc.doc))
			var fe *FieldError
			if !errors.As(err, &fe) {
				t.Fatalf("error %v (%T), want a *FieldError", err, err)
			}
			if fe.Field != tc.field || !strings.Contains(fe.Reason, tc.reason) || fe.Reason == "" {
				t.Errorf("got %q: %q; want field %q, reason containing %q", fe.Field, fe.Reason, tc.field, tc.reason)
			}
			if len(fe.Error()) > 600 {
				t.Errorf("message of %d bytes is too long to show", len(fe.Error()))
			}
		})
	}
}

// TestExamples reads the invented example scenarios of the repository, checks their titles
// say they are invented, and that each survives a round trip through a file and a link.
func TestExamples(t *testing.T) {
	files, err := filepath.Glob("../../testdata/scenarios/*.json")
	if err != nil || len(files) < 3 {
		t.Fatalf("examples: %v, %v", files, err)
	}
	for _, f := range files {
		data, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		s, err := Decode(data)
		if err != nil {
			t.Fatalf("%s: %v", f, err)
		}
		if !strings.HasPrefix(s.Title, "Invented example: ") {
			t.Errorf("%s: title %q does not say it is invented", f, s.Title)
		}
		out, err := s.Encode()
		if err != nil {
			t.Fatal(err)
		}
		if string(out) != string(data) {
			t.Errorf("%s is not in canonical form; Encode gives\n%s", f, out)
		}
		code, err := EncodeLink(s)
		if err != nil {
			t.Fatal(err)
		}
		back, err := DecodeLink(code)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(back, s) {
			t.Errorf("%s: the link gives back %+v", f, back)
		}
		if _, err := s.Problem(); err != nil {
			t.Errorf("%s: %v", f, err)
		}
		t.Logf("%s: link of %d characters", filepath.Base(f), len(code))
	}
}
