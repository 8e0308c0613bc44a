package protocol

import (
	"encoding/binary"
	"encoding/json"
	"fmt"
	"math"
	"reflect"
	"slices"
	"strings"

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

// column is one leaf of fixedpoint.Result as it travels: a number, a count, a flag or a text,
// reached from the Result through the field indexes in path. A pointer to a struct (the
// generalized model's observables) travels as a flag column named after the field, true
// where the pointer is set, and one column per leaf of the struct, named "Field.Leaf".
type column struct {
	name string
	path []int
	kind reflect.Kind // Float64, Int, Bool, String, or Pointer for a presence flag
}

var resultColumns = func() []column {
	var out []column
	var walk func(t reflect.Type, prefix string, path []int)
	walk = func(t reflect.Type, prefix string, path []int) {
		for k := range t.NumField() {
			f := t.Field(k)
			p := append(slices.Clone(path), k)
			name := prefix + f.Name
			switch {
			case f.Type.Kind() == reflect.Pointer && f.Type.Elem().Kind() == reflect.Struct:
				out = append(out, column{name: name, path: p, kind: reflect.Pointer})
				walk(f.Type.Elem(), name+".", p)
			case f.Type.Kind() == reflect.Struct:
				walk(f.Type, name+".", p)
			case f.Type.Kind() == reflect.Float64, f.Type.Kind() == reflect.Int,
				f.Type.Kind() == reflect.Bool, f.Type.Kind() == reflect.String:
				out = append(out, column{name: name, path: p, kind: f.Type.Kind()})
			default:
				panic(fmt.Sprintf("points: fixedpoint.Result.%s has a type (%s) the packing does not carry", name, f.Type))
			}
		}
	}
	walk(resultType, "", nil)
	return out
}()

// skipLeaf reports whether name lies under one of the pointer columns in absent.
func skipLeaf(name string, absent map[string]bool) bool {
	for prefix := range absent {
		if strings.HasPrefix(name, prefix+".") {
			return true
		}
	}
	return false
}

// at returns the leaf of c in r (a settable Result). A nil pointer on the way gives the
// invalid Value when alloc is false, and is allocated when alloc is true.
func (c column) at(r reflect.Value, alloc bool) reflect.Value {
	v := r
	for depth, k := range c.path {
		v = v.Field(k)
		if v.Kind() == reflect.Pointer && !(c.kind == reflect.Pointer && depth == len(c.path)-1) {
			if v.IsNil() {
				if !alloc {
					return reflect.Value{}
				}
				v.Set(reflect.New(v.Type().Elem()))
			}
			v = v.Elem()
		}
	}
	return v
}

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
	absent := map[string]bool{} // pointer columns nil at every point: their leaves stay home
	for _, c := range resultColumns {
		if skipLeaf(c.name, absent) {
			continue
		}
		col := func(i int) reflect.Value { return c.at(reflect.ValueOf(&p[i].Result).Elem(), false) }
		var raw []byte
		var err error
		switch c.kind {
		case reflect.Float64:
			raw, err = json.Marshal(packFloats(n, func(i int) float64 {
				if v := col(i); v.IsValid() {
					return v.Float()
				}
				return 0
			}))
		case reflect.Int:
			v := make([]int64, n)
			for i := range v {
				if x := col(i); x.IsValid() {
					v[i] = x.Int()
				}
			}
			raw, err = json.Marshal(v)
		case reflect.Bool, reflect.Pointer:
			v := make([]byte, n)
			for i := range v {
				v[i] = '0'
				x := col(i)
				if x.IsValid() && ((c.kind == reflect.Bool && x.Bool()) || (c.kind == reflect.Pointer && !x.IsNil())) {
					v[i] = '1'
				}
			}
			if c.kind == reflect.Pointer && !strings.Contains(string(v), "1") {
				absent[c.name] = true
			}
			raw, err = json.Marshal(string(v))
		case reflect.String:
			v := make([]string, n)
			for i := range v {
				if x := col(i); x.IsValid() {
					v[i] = x.String()
				}
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
	present := map[string]string{} // presence flags of pointer columns, by name
	for _, c := range resultColumns {
		raw, ok := in.Result[c.name]
		if !ok {
			continue
		}
		// A leaf under a pointer is set only where the pointer's flag says it is present.
		skip := func(i int) bool {
			for prefix, flags := range present {
				if strings.HasPrefix(c.name, prefix+".") && flags[i] != '1' {
					return true
				}
			}
			return false
		}
		col := func(i int) reflect.Value { return c.at(reflect.ValueOf(&out[i].Result).Elem(), true) }
		switch c.kind {
		case reflect.Float64:
			var bs []byte
			if err := json.Unmarshal(raw, &bs); err != nil {
				return fmt.Errorf("points: column %s: %w", c.name, err)
			}
			v, err := unpackFloats(bs, in.N, c.name)
			if err != nil {
				return err
			}
			for i := range out {
				if !skip(i) {
					col(i).SetFloat(v[i])
				}
			}
		case reflect.Int:
			var v []int64
			if err := json.Unmarshal(raw, &v); err != nil || len(v) != in.N {
				return fmt.Errorf("points: column %s: want %d integers", c.name, in.N)
			}
			for i := range out {
				if !skip(i) {
					col(i).SetInt(v[i])
				}
			}
		case reflect.Bool, reflect.Pointer:
			var v string
			if err := json.Unmarshal(raw, &v); err != nil || len(v) != in.N {
				return fmt.Errorf("points: column %s: want %d flags", c.name, in.N)
			}
			if c.kind == reflect.Pointer {
				present[c.name] = v
				continue
			}
			for i := range out {
				if !skip(i) {
					col(i).SetBool(v[i] == '1')
				}
			}
		case reflect.String:
			var v []string
			if err := json.Unmarshal(raw, &v); err != nil || len(v) != in.N {
				return fmt.Errorf("points: column %s: want %d texts", c.name, in.N)
			}
			for i := range out {
				if !skip(i) {
					col(i).SetString(v[i])
				}
			}
		}
	}
	*p = out
	return nil
}
