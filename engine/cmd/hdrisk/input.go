package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"

	"hdrisk/engine/scenario"
)

// readLimited reads at most limit+1 bytes from name ("-" is stdin), so that an oversized
// input is reported by the decoder without being read in full.
func readLimited(name string, stdin io.Reader, limit int64) ([]byte, error) {
	r := stdin
	if name != "-" {
		f, err := os.Open(name)
		if err != nil {
			return nil, err
		}
		defer f.Close()
		r = f
	}
	return io.ReadAll(io.LimitReader(r, limit+1))
}

// readScenario reads and decodes the scenario file name ("-" is stdin). Errors name the
// file and the field.
func readScenario(name string, stdin io.Reader) (scenario.Scenario, error) {
	data, err := readLimited(name, stdin, scenario.MaxBytes)
	if err != nil {
		return scenario.Scenario{}, err
	}
	s, err := scenario.Decode(data)
	if err != nil {
		return s, fmt.Errorf("%s: %w", displayName(name), err)
	}
	return s, nil
}

func displayName(name string) string {
	if name == "-" {
		return "standard input"
	}
	return name
}

// number is a float64 that encodes as JSON at full precision (as encoding/json writes a
// float64), and as null when it is NaN or infinite, which JSON cannot hold.
type number float64

func (x number) MarshalJSON() ([]byte, error) {
	f := float64(x)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return json.Marshal(f)
}

// writeJSON writes v as indented JSON and a newline.
func writeJSON(w io.Writer, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return err
	}
	_, err = w.Write(append(b, '\n'))
	return err
}
