package protocol

import (
	"encoding/json"
	"math"
	"strconv"
)

// Num is a float64 that travels as JSON null when it is NaN (the engine's "undefined") and
// as the strings "+Inf" and "-Inf" when it is infinite, and reads each back as it was. JSON
// has no such numbers; without this a whole result would be unreadable, or null would read
// back as 0. Finite values are written in the shortest form that reads back exactly. Marshal
// treats every float64 of a value this way, so Num is only needed where a type must encode
// itself with encoding/json.
type Num float64

// MarshalJSON implements json.Marshaler.
func (x Num) MarshalJSON() ([]byte, error) { return appendFloat(nil, float64(x)), nil }

// UnmarshalJSON implements json.Unmarshaler.
func (x *Num) UnmarshalJSON(b []byte) error {
	f, err := parseFloat(b)
	*x = Num(f)
	return err
}

func appendFloat(b []byte, f float64) []byte {
	switch {
	case math.IsNaN(f):
		return append(b, "null"...)
	case math.IsInf(f, 1):
		return append(b, `"+Inf"`...)
	case math.IsInf(f, -1):
		return append(b, `"-Inf"`...)
	}
	return strconv.AppendFloat(b, f, 'g', -1, 64)
}

func parseFloat(b []byte) (float64, error) {
	switch string(b) {
	case "null":
		return math.NaN(), nil
	case `"+Inf"`:
		return math.Inf(1), nil
	case `"-Inf"`:
		return math.Inf(-1), nil
	}
	var f float64
	err := json.Unmarshal(b, &f)
	return f, err
}
