package protocol

import (
	"bytes"
	"encoding/base64"
	"encoding/binary"
	"encoding/json"
	"fmt"
	"math"
	"reflect"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/study"
)

// Points are the points of a sweep or the cells of a map, as the engine computes them
// (study.Point), packed by column: each number of the fixed point travels as one array of
// float64 in little-endian bytes (base64 in JSON), so that NaN and infinities keep their
// bits, and a 100 x 100 map is a few hundred kilobytes decoded without parsing a number.
// The columns are the fields of fixedpoint.Result, found by reflection: a field added there
// travels with no change here.
type Points []study.Point

// packed is the JSON form of Points.
type packed struct {
	N      int                        `json:"n"`
	X      []byte                     `json:"x"`
	Y      []byte                     `json:"y"`
	Failed []string                   `json:"failed,omitempty"` // absent when no point failed
	Result map[string]json.RawMessage `json:"result"`           // column by field name
}

var resultType = reflect.TypeFor[fixedpoint.Result]()

// column is one field of fixedpoint.Result as it travels: a number, a count, a flag or a
// text. Any other type of field is a programming error found when the package starts.
type column struct {
	name  string
	index int
	kind  reflect.Kind // Float64, Int, Bool or String
}

var resultColumns = func() []column {
	out := make([]column, resultType.NumField())
	for k := range out {
		f := resultType.Field(k)
		switch f.Type.Kind() {
		case reflect.Float64, reflect.Int, reflect.Bool, reflect.String:
		default:
			panic(fmt.Sprintf("points: fixedpoint.Result.%s has a type (%s) the packing does not carry", f.Name, f.Type))
		}
		out[k] = column{name: f.Name, index: k, kind: f.Type.Kind()}
	}
	return out
}()

func packFloats(n int, at func(i int) float64) []byte {
	b := make([]byte, 8*n)
	for i := range n {
		binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(at(i)))
	}
	return b
}

func unpackFloats(b []byte, n int, name string) ([]float64, error) {
	if len(b) != 8*n {
		return nil, fmt.Errorf("points: column %s holds %d bytes, want %d", name, len(b), 8*n)
	}
	out := make([]float64, n)
	for i := range out {
		out[i] = math.Float64frombits(binary.LittleEndian.Uint64(b[8*i:]))
	}
	return out, nil
}

// MarshalJSON implements json.Marshaler.
func (p Points) MarshalJSON() ([]byte, error) {
	n := len(p)
	out := packed{N: n, Result: map[string]json.RawMessage{},
		X: packFloats(n, func(i int) float64 { return p[i].X }),
		Y: packFloats(n, func(i int) float64 { return p[i].Y })}
	for i := range p {
		if p[i].Failed != "" {
			out.Failed = make([]string, n)
			for j := range p {
				out.Failed[j] = p[j].Failed
			}
			break
		}
	}
	for _, c := range resultColumns {
		col := func(i int) reflect.Value { return reflect.ValueOf(&p[i].Result).Elem().Field(c.index) }
		// A column that is zero at every point (the generalized model's numbers of a
		// linear one, say) is left out: UnmarshalJSON leaves a missing column zero, and a
		// block of a map is taken in on the page's main thread, where every byte costs.
		// A float is zero by its bits, so that -0 and NaN still come back.
		zero := true
		for i := range p {
			v := col(i)
			if (c.kind == reflect.Float64 && math.Float64bits(v.Float()) != 0) || (c.kind != reflect.Float64 && !v.IsZero()) {
				zero = false
				break
			}
		}
		if zero {
			continue
		}
		var raw []byte
		var err error
		switch c.kind {
		case reflect.Float64:
			raw, err = json.Marshal(packFloats(n, func(i int) float64 { return col(i).Float() }))
		case reflect.Int:
			v := make([]int64, n)
			for i := range v {
				v[i] = col(i).Int()
			}
			raw, err = json.Marshal(v)
		case reflect.Bool:
			v := make([]byte, n)
			for i := range v {
				v[i] = '0'
				if col(i).Bool() {
					v[i] = '1'
				}
			}
			raw, err = json.Marshal(string(v))
		case reflect.String:
			v := make([]string, n)
			for i := range v {
				v[i] = col(i).String()
			}
			raw, err = json.Marshal(v)
		}
		if err != nil {
			return nil, err
		}
		out.Result[c.name] = raw
	}
	return json.Marshal(out)
}

// base64Column decodes a float column, a JSON string of standard base64. Marshal never
// escapes a base64 character, so the text between the quotes is decoded directly: a second
// pass of the JSON scanner over every column cost the page most of the time it took to take
// in a block of a map. Text with an escape goes through encoding/json.
func base64Column(raw json.RawMessage) ([]byte, error) {
	if len(raw) >= 2 && raw[0] == '"' && raw[len(raw)-1] == '"' && !bytes.ContainsRune(raw[1:len(raw)-1], '\\') {
		inner := raw[1 : len(raw)-1]
		out := make([]byte, base64.StdEncoding.DecodedLen(len(inner)))
		n, err := base64.StdEncoding.Decode(out, inner)
		return out[:n], err
	}
	var bs []byte
	err := json.Unmarshal(raw, &bs)
	return bs, err
}

// UnmarshalJSON implements json.Unmarshaler. Special cases are: a column of the wrong
// length is an error naming it; a column missing from the text leaves its field zero.
func (p *Points) UnmarshalJSON(b []byte) error {
	if string(b) == "null" {
		*p = nil
		return nil
	}
	var in packed
	if err := json.Unmarshal(b, &in); err != nil {
		return err
	}
	if in.N < 0 || (in.Failed != nil && len(in.Failed) != in.N) {
		return fmt.Errorf("points: %d failures for %d points", len(in.Failed), in.N)
	}
	xs, err := unpackFloats(in.X, in.N, "x")
	if err != nil {
		return err
	}
	ys, err := unpackFloats(in.Y, in.N, "y")
	if err != nil {
		return err
	}
	out := make(Points, in.N)
	for i := range out {
		out[i].X, out[i].Y = xs[i], ys[i]
		if in.Failed != nil {
			out[i].Failed = in.Failed[i]
		}
	}
	for _, c := range resultColumns {
		raw, ok := in.Result[c.name]
		if !ok {
			continue
		}
		col := func(i int) reflect.Value { return reflect.ValueOf(&out[i].Result).Elem().Field(c.index) }
		switch c.kind {
		case reflect.Float64:
			bs, err := base64Column(raw)
			if err != nil {
				return fmt.Errorf("points: column %s: %w", c.name, err)
			}
			v, err := unpackFloats(bs, in.N, c.name)
			if err != nil {
				return err
			}
			for i := range out {
				col(i).SetFloat(v[i])
			}
		case reflect.Int:
			var v []int64
			if err := json.Unmarshal(raw, &v); err != nil || len(v) != in.N {
				return fmt.Errorf("points: column %s: want %d integers", c.name, in.N)
			}
			for i := range out {
				col(i).SetInt(v[i])
			}
		case reflect.Bool:
			var v string
			if err := json.Unmarshal(raw, &v); err != nil || len(v) != in.N {
				return fmt.Errorf("points: column %s: want %d flags", c.name, in.N)
			}
			for i := range out {
				col(i).SetBool(v[i] == '1')
			}
		case reflect.String:
			var v []string
			if err := json.Unmarshal(raw, &v); err != nil || len(v) != in.N {
				return fmt.Errorf("points: column %s: want %d texts", c.name, in.N)
			}
			for i := range out {
				col(i).SetString(v[i])
			}
		}
	}
	*p = out
	return nil
}
