package main

import (
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

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

// scenarioArg declares --set on fs, parses args for exactly one scenario file ("-" is
// standard input), reads it and applies the --set values: the start of every command that
// works on one scenario.
func scenarioArg(fs *flag.FlagSet, args []string, stdin io.Reader) (scenario.Scenario, error) {
	set := setFlag(fs)
	name, err := onePositional(fs, args, "scenario file")
	if err != nil {
		return scenario.Scenario{}, err
	}
	s, err := readScenario(name, stdin)
	if err != nil {
		return s, err
	}
	return set(s)
}

// setFlag declares --set OBJECT.NAME=VALUE (repeatable), which sets numbers of the scenario
// before a command uses it; the returned function applies them in order, each checked as
// the scenario file would be (the names and ranges come from the registries; see kinds).
func setFlag(fs *flag.FlagSet) func(scenario.Scenario) (scenario.Scenario, error) {
	var sets []string
	fs.Func("set", "set a number of the scenario before the command runs, as PATH=VALUE (penalty.l1=0.1, alpha=0.5; repeatable; hdrisk kinds lists them)", func(v string) error {
		sets = append(sets, v)
		return nil
	})
	return func(s scenario.Scenario) (scenario.Scenario, error) {
		for _, kv := range sets {
			path, text, ok := strings.Cut(kv, "=")
			if !ok {
				return s, usagef("--set %s: write PATH=VALUE", kv)
			}
			v, err := strconv.ParseFloat(strings.TrimSpace(text), 64)
			if err != nil {
				return s, usagef("--set %s: %q is not a number", kv, text)
			}
			if s, err = s.With(strings.TrimSpace(path), v); err != nil {
				return s, fmt.Errorf("--set: %w", err)
			}
		}
		return s, nil
	}
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
