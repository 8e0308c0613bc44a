package scenario

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// maxDepth bounds the nesting of a scenario document. The deepest valid value is three
// levels down (study.sweep.over); the margin leaves room for the error to name a field.
const maxDepth = 8

type jkind int

const (
	jObject jkind = iota
	jArray
	jString
	jNumber
	jBool
	jNull
)

func (k jkind) String() string {
	return [...]string{"an object", "a list", "a string", "a number", "true or false", "null"}[k]
}

// jval is a parsed JSON value that keeps the order of object keys, so that errors can be
// reported in document order and duplicate keys can be refused (encoding/json silently
// keeps the last one).
type jval struct {
	kind jkind
	keys []string
	vals map[string]*jval
	arr  []*jval
	str  string
	num  string
	b    bool
}

func parseTree(data []byte) (*jval, error) {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	v, err := parseValue(dec, "", 0)
	if err != nil {
		return nil, err
	}
	if _, err := dec.Token(); err != io.EOF {
		return nil, fieldErr("", "not valid JSON: more data after the scenario object (at byte %d)", dec.InputOffset())
	}
	return v, nil
}

func syntaxErr(dec *json.Decoder, err error) error {
	var se *json.SyntaxError
	if errors.As(err, &se) {
		return fieldErr("", "not valid JSON: %v (at byte %d)", se, se.Offset)
	}
	if errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF) {
		return fieldErr("", "not valid JSON: the text ends early (at byte %d); is it cut off?", dec.InputOffset())
	}
	return fieldErr("", "not valid JSON: %v", err)
}

func join(path, key string) string {
	key = clip(key, 40)
	if path == "" {
		return key
	}
	return path + "." + key
}

func parseValue(dec *json.Decoder, path string, depth int) (*jval, error) {
	tok, err := dec.Token()
	if err != nil {
		return nil, syntaxErr(dec, err)
	}
	return parseFrom(dec, tok, path, depth)
}

func parseFrom(dec *json.Decoder, tok json.Token, path string, depth int) (*jval, error) {
	switch t := tok.(type) {
	case json.Delim:
		if depth >= maxDepth {
			return nil, fieldErr(path, "nested deeper than %d levels", maxDepth)
		}
		if t == '{' {
			v := &jval{kind: jObject, vals: map[string]*jval{}}
			for {
				kt, err := dec.Token()
				if err != nil {
					return nil, syntaxErr(dec, err)
				}
				if d, ok := kt.(json.Delim); ok && d == '}' {
					return v, nil
				}
				key, _ := kt.(string)
				p := join(path, key)
				if _, dup := v.vals[key]; dup {
					return nil, fieldErr(p, "given twice")
				}
				child, err := parseValue(dec, p, depth+1)
				if err != nil {
					return nil, err
				}
				v.keys = append(v.keys, key)
				v.vals[key] = child
			}
		}
		v := &jval{kind: jArray}
		for {
			et, err := dec.Token()
			if err != nil {
				return nil, syntaxErr(dec, err)
			}
			if d, ok := et.(json.Delim); ok && d == ']' {
				return v, nil
			}
			child, err := parseFrom(dec, et, fmt.Sprintf("%s[%d]", path, len(v.arr)), depth+1)
			if err != nil {
				return nil, err
			}
			v.arr = append(v.arr, child)
		}
	case string:
		return &jval{kind: jString, str: t}, nil
	case json.Number:
		return &jval{kind: jNumber, num: string(t)}, nil
	case bool:
		return &jval{kind: jBool, b: t}, nil
	case nil:
		return &jval{kind: jNull}, nil
	}
	return nil, fieldErr(path, "unexpected JSON token")
}

// float reads a finite JSON number.
func (v *jval) float(path string) (float64, error) {
	if v.kind != jNumber {
		return 0, fieldErr(path, "must be a number, not %v", v.kind)
	}
	f, err := strconv.ParseFloat(v.num, 64)
	if err != nil || math.IsInf(f, 0) {
		return 0, fieldErr(path, "the number %s is too large (not a finite 64-bit float)", clip(v.num, 40))
	}
	return f, nil
}

// integer reads a JSON number written as a whole number, within [lo, hi].
func (v *jval) integer(path string, lo, hi int64) (int64, error) {
	if v.kind != jNumber {
		return 0, fieldErr(path, "must be a whole number, not %v", v.kind)
	}
	if strings.ContainsAny(v.num, ".eE") {
		return 0, fieldErr(path, "must be a whole number written without a fraction or exponent, not %s", clip(v.num, 40))
	}
	n, err := strconv.ParseInt(v.num, 10, 64)
	if err != nil {
		return 0, fieldErr(path, "must be between %d and %d", lo, hi)
	}
	if n < lo || n > hi {
		return 0, fieldErr(path, "must be between %d and %d, not %d", lo, hi, n)
	}
	return n, nil
}

func (v *jval) text(path string) (string, error) {
	if v.kind != jString {
		return "", fieldErr(path, "must be a string, not %v", v.kind)
	}
	return v.str, nil
}

func (v *jval) boolean(path string) (bool, error) {
	if v.kind != jBool {
		return false, fieldErr(path, "must be true or false, not %v", v.kind)
	}
	return v.b, nil
}

func (v *jval) object(path string) error {
	if v.kind != jObject {
		if path == "" {
			return fieldErr("", "the document must be a JSON object, not %v", v.kind)
		}
		return fieldErr(path, "must be an object, not %v", v.kind)
	}
	return nil
}

// clip shortens text quoted back in an error message, so that a hostile input cannot make
// the message itself enormous.
func clip(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	return string(r[:n]) + "…"
}
