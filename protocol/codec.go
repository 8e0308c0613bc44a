package protocol

import (
	"bytes"
	"encoding/json"
	"fmt"
	"reflect"
	"strconv"
	"strings"

	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
)

// Marshal encodes v as JSON the way encoding/json does (field names from json tags or the
// Go names, omitempty honoured), except that every float64 is written as a Num (NaN as null,
// infinities as "+Inf"/"-Inf") and that fields of type scenario.Scenario are left out: the
// page holds the scenario it sent, and a scenario with an own spectrum is large. This lets
// the engine's own result types (fixedpoint.Result, study.BestResult, ...) travel as they
// are, with no copy of their fields kept here.
func Marshal(v any) ([]byte, error) {
	var b bytes.Buffer
	if err := encode(&b, reflect.ValueOf(v)); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// Unmarshal decodes what Marshal wrote into v, a non-nil pointer. Unknown fields are
// ignored, as encoding/json does; fields of type scenario.Scenario are left as they are.
func Unmarshal(data []byte, v any) error {
	p := reflect.ValueOf(v)
	if p.Kind() != reflect.Pointer || p.IsNil() {
		return fmt.Errorf("protocol: Unmarshal needs a non-nil pointer, not %T", v)
	}
	return decode(bytes.TrimSpace(data), p.Elem())
}

var (
	scenarioType    = reflect.TypeFor[scenario.Scenario]()
	pointsType      = reflect.TypeFor[[]study.Point]()
	marshalerType   = reflect.TypeFor[json.Marshaler]()
	unmarshalerType = reflect.TypeFor[json.Unmarshaler]()
)

// field is one encoded field of a struct: its JSON name and its index path (embedded
// structs without a name of their own are flattened, as encoding/json does).
type field struct {
	name      string
	index     []int
	omitempty bool
}

func fields(t reflect.Type) []field {
	var out []field
	for i := range t.NumField() {
		f := t.Field(i)
		tag := f.Tag.Get("json")
		if tag == "-" || f.Type == scenarioType {
			continue
		}
		name, opts, _ := strings.Cut(tag, ",")
		if f.Anonymous && name == "" && f.Type.Kind() == reflect.Struct {
			for _, sub := range fields(f.Type) {
				sub.index = append([]int{i}, sub.index...)
				out = append(out, sub)
			}
			continue
		}
		if !f.IsExported() {
			continue
		}
		if name == "" {
			name = f.Name
		}
		out = append(out, field{name: name, index: []int{i}, omitempty: strings.Contains(","+opts+",", ",omitempty,")})
	}
	return out
}

func encode(b *bytes.Buffer, v reflect.Value) error {
	if !v.IsValid() {
		b.WriteString("null")
		return nil
	}
	if v.Type() == pointsType {
		// The points of a sweep travel packed wherever an engine result holds them (the
		// curves of study.Curves), as Points carries them.
		out, err := Points(v.Interface().([]study.Point)).MarshalJSON()
		b.Write(out)
		return err
	}
	if v.Type().Implements(marshalerType) && (v.Kind() != reflect.Pointer || !v.IsNil()) {
		out, err := v.Interface().(json.Marshaler).MarshalJSON()
		if err != nil {
			return err
		}
		b.Write(out)
		return nil
	}
	switch v.Kind() {
	case reflect.Float64, reflect.Float32:
		b.Write(appendFloat(b.AvailableBuffer(), v.Float()))
	case reflect.Struct:
		b.WriteByte('{')
		first := true
		for _, f := range fields(v.Type()) {
			fv := v.FieldByIndex(f.index)
			if f.omitempty && fv.IsZero() {
				continue
			}
			if !first {
				b.WriteByte(',')
			}
			first = false
			b.Write(strconv.AppendQuote(b.AvailableBuffer(), f.name))
			b.WriteByte(':')
			if err := encode(b, fv); err != nil {
				return fmt.Errorf("%s: %w", f.name, err)
			}
		}
		b.WriteByte('}')
	case reflect.Slice, reflect.Array:
		if v.Kind() == reflect.Slice && v.IsNil() {
			b.WriteString("null")
			return nil
		}
		if v.Type().Elem().Kind() == reflect.Uint8 {
			return plain(b, v)
		}
		b.WriteByte('[')
		for i := range v.Len() {
			if i > 0 {
				b.WriteByte(',')
			}
			if err := encode(b, v.Index(i)); err != nil {
				return err
			}
		}
		b.WriteByte(']')
	case reflect.Pointer, reflect.Interface:
		if v.IsNil() {
			b.WriteString("null")
			return nil
		}
		return encode(b, v.Elem())
	default:
		return plain(b, v)
	}
	return nil
}

func plain(b *bytes.Buffer, v reflect.Value) error {
	out, err := json.Marshal(v.Interface())
	b.Write(out)
	return err
}

func decode(data []byte, v reflect.Value) error {
	if v.Type() == scenarioType {
		return nil
	}
	if v.Type() == pointsType {
		var p Points
		if err := p.UnmarshalJSON(data); err != nil {
			return err
		}
		v.Set(reflect.ValueOf([]study.Point(p)))
		return nil
	}
	if reflect.PointerTo(v.Type()).Implements(unmarshalerType) {
		return v.Addr().Interface().(json.Unmarshaler).UnmarshalJSON(data)
	}
	switch v.Kind() {
	case reflect.Float64, reflect.Float32:
		f, err := parseFloat(data)
		if err != nil {
			return err
		}
		v.SetFloat(f)
	case reflect.Struct:
		if string(data) == "null" {
			return nil
		}
		var m map[string]json.RawMessage
		if err := json.Unmarshal(data, &m); err != nil {
			return err
		}
		for _, f := range fields(v.Type()) {
			if raw, ok := m[f.name]; ok {
				if err := decode(raw, v.FieldByIndex(f.index)); err != nil {
					return fmt.Errorf("%s: %w", f.name, err)
				}
			}
		}
	case reflect.Slice:
		if string(data) == "null" {
			v.SetZero()
			return nil
		}
		if v.Type().Elem().Kind() == reflect.Uint8 {
			return json.Unmarshal(data, v.Addr().Interface())
		}
		var items []json.RawMessage
		if err := json.Unmarshal(data, &items); err != nil {
			return err
		}
		s := reflect.MakeSlice(v.Type(), len(items), len(items))
		for i, raw := range items {
			if err := decode(raw, s.Index(i)); err != nil {
				return fmt.Errorf("[%d]: %w", i, err)
			}
		}
		v.Set(s)
	case reflect.Array:
		var items []json.RawMessage
		if err := json.Unmarshal(data, &items); err != nil {
			return err
		}
		for i := 0; i < len(items) && i < v.Len(); i++ {
			if err := decode(items[i], v.Index(i)); err != nil {
				return fmt.Errorf("[%d]: %w", i, err)
			}
		}
	case reflect.Pointer:
		if string(data) == "null" {
			v.SetZero()
			return nil
		}
		p := reflect.New(v.Type().Elem())
		if err := decode(data, p.Elem()); err != nil {
			return err
		}
		v.Set(p)
	default:
		return json.Unmarshal(data, v.Addr().Interface())
	}
	return nil
}
