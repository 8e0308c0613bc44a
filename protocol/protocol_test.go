package protocol

import (
	"encoding/json"
	"fmt"
	"math"
	"reflect"
	"strings"
	"testing"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/study"
)

// same is equality that counts NaN equal to NaN and tells -0 from 0.
func same(a, b float64) bool {
	return math.Float64bits(a) == math.Float64bits(b) || (math.IsNaN(a) && math.IsNaN(b))
}

func TestNumRoundTrip(t *testing.T) {
	in := []Num{Num(math.NaN()), Num(math.Inf(1)), Num(math.Inf(-1)), 1.0 / 3, Num(math.Copysign(0, -1)), 5e-324, 1e308}
	b, err := json.Marshal(in)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(string(b), `[null,"+Inf","-Inf",`) {
		t.Errorf("encoded as %s", b)
	}
	var out []Num
	if err := json.Unmarshal(b, &out); err != nil {
		t.Fatal(err)
	}
	for i := range in {
		if !same(float64(in[i]), float64(out[i])) {
			t.Errorf("%v read back as %v (from %s)", in[i], out[i], b)
		}
	}
	var x Num
	if err := json.Unmarshal([]byte(`"NaN"`), &x); err == nil {
		t.Errorf("a string other than +Inf and -Inf should be refused, read %v", x)
	}
}

// Every float64 of an engine value crosses Marshal and Unmarshal as it was, NaN included,
// through nested structs, slices and pointers; a scenario field stays behind.
func TestCodecKeepsEngineValues(t *testing.T) {
	r := fixedpoint.Result{MSE: 0.1, NMSE: math.NaN(), NMSEdB: math.Inf(-1), Susceptibility: math.Inf(1),
		G1: 1e-300, Iterations: 7, Converged: true, Residual: 2e-12, EstimateZero: true}
	in := study.PlanResult{Alpha: 0.5, Reached: true, Reason: "x", Best: study.BestResult{Over: "l1", Value: math.NaN(), Result: r}}
	b, err := Marshal(in)
	if err != nil {
		t.Fatal(err)
	}
	var out study.PlanResult
	if err := Unmarshal(b, &out); err != nil {
		t.Fatal(err)
	}
	if sprint(in) != sprint(out) || !same(out.Best.Result.NMSEdB, math.Inf(-1)) || !math.IsNaN(out.Best.Value) {
		t.Errorf("round trip:\n in %+v\nout %+v\nvia %s", in, out, b)
	}
	if strings.Contains(string(b), "Scenario") {
		t.Errorf("the scenario travelled: %s", b)
	}
	type inner struct {
		V []float64 `json:"v,omitempty"`
		P *float64  `json:"p"`
	}
	type outer struct {
		inner
		Name string `json:"name"`
		Skip int    `json:"-"`
	}
	nan := math.NaN()
	o := outer{inner: inner{V: []float64{1, nan}, P: &nan}, Name: "n", Skip: 3}
	b, err = Marshal(o)
	if err != nil {
		t.Fatal(err)
	}
	if string(b) != `{"v":[1,null],"p":null,"name":"n"}` {
		t.Errorf("embedded, tagged and pointer fields encoded as %s", b)
	}
	var back outer
	if err := Unmarshal(b, &back); err != nil {
		t.Fatal(err)
	}
	if back.Name != "n" || len(back.V) != 2 || !math.IsNaN(back.V[1]) || back.P != nil {
		t.Errorf("read back as %+v", back)
	}
	if err := Unmarshal([]byte(`{"v":"x"}`), &back); err == nil || !strings.Contains(err.Error(), "v") {
		t.Errorf("a wrong type should be an error naming the field: %v", err)
	}
}

// sprint is the encoding of v: two values print the same when every field, NaN included,
// is the same.
func sprint(v any) string { b, _ := Marshal(v); return string(b) }

func TestPointsPackedRoundTrip(t *testing.T) {
	in := Points{
		{X: 0.1, Y: 2, Result: fixedpoint.Result{MSE: 0.3, NMSEdB: math.Inf(-1), NonZero: math.NaN(), Iterations: 12, Converged: true}},
		{X: 0.2, Y: 2, Failed: "penalty.l1: no fixed point", Result: fixedpoint.Result{MSE: math.NaN(), Residual: 1e-3}},
		{X: 0.3, Y: 2, Result: fixedpoint.Result{MSE: 0.2, GLM: true, Labels: true, Cosine: 0.9, TestError: math.NaN(), Note: "a note"}},
	}
	b, err := json.Marshal(in)
	if err != nil {
		t.Fatal(err)
	}
	var out Points
	if err := json.Unmarshal(b, &out); err != nil {
		t.Fatal(err)
	}
	if len(out) != len(in) {
		t.Fatalf("%d points, want %d", len(out), len(in))
	}
	for i := range in {
		a, c := reflect.ValueOf(in[i].Result), reflect.ValueOf(out[i].Result)
		for k := range a.NumField() {
			fa, fc := a.Field(k), c.Field(k)
			ok := fa.Interface() == fc.Interface()
			if fa.Kind() == reflect.Float64 {
				ok = same(fa.Float(), fc.Float())
			}
			if !ok {
				t.Errorf("point %d field %s: %v read back as %v", i, a.Type().Field(k).Name, fa, fc)
			}
		}
		if in[i].X != out[i].X || in[i].Y != out[i].Y || in[i].Failed != out[i].Failed {
			t.Errorf("point %d: %+v read back as %+v", i, in[i], out[i])
		}
	}
	// A cell costs a fixed number of bytes, not a JSON object of named numbers (about 11
	// bytes per number of fixedpoint.Result, which now includes the generalized model's).
	big := make(Points, 10000)
	bb, _ := json.Marshal(big)
	if per := len(bb) / len(big); per > 240 {
		t.Errorf("%d bytes a cell packed", per)
	}
	// A column is read straight from its base64 text; one written with JSON escapes (a
	// legal encoding of the same string) still reads back the same.
	var cols map[string]json.RawMessage
	if err := json.Unmarshal(b, &cols); err != nil {
		t.Fatal(err)
	}
	var res map[string]json.RawMessage
	if err := json.Unmarshal(cols["result"], &res); err != nil {
		t.Fatal(err)
	}
	esc := strings.Replace(string(b), string(res["MSE"]), `"\u00`+fmt.Sprintf("%x", res["MSE"][1])+string(res["MSE"][2:]), 1)
	var back Points
	if err := json.Unmarshal([]byte(esc), &back); err != nil {
		t.Fatal(err)
	}
	for i := range in {
		if !same(back[i].Result.MSE, in[i].Result.MSE) {
			t.Errorf("escaped column: point %d MSE %v read back as %v", i, in[i].Result.MSE, back[i].Result.MSE)
		}
	}
	// A column zero at every point is left out and reads back zero; -0 is not zero.
	if _, ok := res["Cosine"]; !ok {
		t.Error("a column with a value was left out")
	}
	if _, ok := res["TrainLoss"]; ok {
		t.Error("a column zero at every point was written")
	}
	neg := Points{{X: 1, Result: fixedpoint.Result{TrainLoss: math.Copysign(0, -1)}}, {X: 2}}
	nb, err := json.Marshal(neg)
	if err != nil {
		t.Fatal(err)
	}
	var negBack Points
	if err := json.Unmarshal(nb, &negBack); err != nil {
		t.Fatal(err)
	}
	if len(negBack) != 2 || !math.Signbit(negBack[0].Result.TrainLoss) || math.Signbit(negBack[1].Result.TrainLoss) {
		t.Errorf("a column of -0 and 0 read back as %+v", negBack)
	}
	bad := strings.Replace(string(b), `"n":3`, `"n":4`, 1)
	if err := json.Unmarshal([]byte(bad), &out); err == nil {
		t.Error("columns shorter than n should be refused")
	}
}

func TestKindDecodeArgsNamesKind(t *testing.T) {
	_, err := Sweep.DecodeArgs([]byte(`{"axis":{"Points":"many"}}`))
	if err == nil || !strings.HasPrefix(err.Error(), "sweep arguments: axis: ") {
		t.Errorf("err = %v", err)
	}
}
