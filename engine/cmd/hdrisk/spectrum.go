package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"

	"gonum.org/v1/gonum/mat"

	"hdrisk/engine/data"
)

// spectrumResult is the output of spectrum: what the theory takes from a user's own
// matrix, the design enters as an empirical-sv law with these values and this alpha.
type spectrumResult struct {
	SingularValues []float64 `json:"singular_values"` // min(rows, cols) values, decreasing
	Rows           int       `json:"rows"`
	Cols           int       `json:"cols"`
	Alpha          number    `json:"alpha"`     // rows/cols
	Condition      number    `json:"condition"` // largest/smallest; null when the smallest is 0
	Rank           int       `json:"rank"`      // values above max(rows, cols) * largest * machine epsilon
}

// readMatrixFile reads a matrix file ("-": standard input) within the reader's default caps.
func readMatrixFile(name string, stdin io.Reader) (*mat.Dense, error) {
	r := stdin
	if name != "-" {
		f, err := os.Open(name)
		if err != nil {
			return nil, err
		}
		defer f.Close()
		r = f
	}
	a, err := data.ReadMatrix(r, data.Limits{})
	if err != nil {
		return nil, fmt.Errorf("%s: %w", displayName(name), err)
	}
	return a, nil
}

// runSpectrum reads a matrix file (Matrix Market, CSV, TSV or space-separated text) and
// prints its singular values.
func runSpectrum(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("spectrum", flag.ContinueOnError)
	name, err := onePositional(fs, args, "matrix file")
	if err != nil {
		return err
	}
	a, err := readMatrixFile(name, stdin)
	if err != nil {
		return err
	}
	sv, err := data.SingularValues(context.Background(), a, nil)
	if err != nil {
		return err
	}
	m, n := a.Dims()
	s, err := data.SummarizeComputed(sv, m, n, 0)
	if err != nil {
		return err
	}
	return writeJSON(stdout, spectrumResult{
		SingularValues: sv, Rows: m, Cols: n,
		Alpha: number(s.Alpha), Condition: number(s.Condition), Rank: s.Rank,
	})
}
