package plot

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
)

// WriteCurves writes the series of a line figure as CSV, one row per point: series name,
// x, y, the error-bar half-width (empty when there is none) and a status ("ok", or
// "no value" for a Missing point or a gap). Header: series, xName, yName, error, status.
// Numbers are written in full precision (shortest form that reads back exactly).
//
// Special cases are: series of unequal lengths are an error naming the series; a Missing
// x is written with an empty y.
func WriteCurves(w io.Writer, xName, yName string, series []Series) error {
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"series", xName, yName, "error", "status"}); err != nil {
		return err
	}
	for i, s := range series {
		if len(s.X) != len(s.Y) || (s.Err != nil && len(s.Err) != len(s.X)) {
			return fmt.Errorf("series %d (%s): x, y and error lengths differ", i+1, s.Name)
		}
		for k := range s.X {
			e := ""
			if s.Err != nil {
				e = cell(s.Err[k])
			}
			y, status := cell(s.Y[k]), "ok"
			if y == "" {
				status = "no value"
			}
			if err := cw.Write([]string{s.Name, cell(s.X[k]), y, e, status}); err != nil {
				return err
			}
		}
		for _, x := range s.Missing {
			if err := cw.Write([]string{s.Name, cell(x), "", "", "no value"}); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

// WriteGrid writes a grid as CSV in long form, one row per cell in the order of z (x
// fastest): xName, yName, zName. A cell without a value (NaN) has an empty z.
//
// Special cases are: len(z) != len(x)*len(y) is an error.
func WriteGrid(w io.Writer, xName, yName, zName string, x, y, z []float64) error {
	if len(z) != len(x)*len(y) {
		return fmt.Errorf("z: %d values for a %d x %d grid", len(z), len(x), len(y))
	}
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{xName, yName, zName}); err != nil {
		return err
	}
	for j := range y {
		for i := range x {
			if err := cw.Write([]string{cell(x[i]), cell(y[j]), cell(z[j*len(x)+i])}); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

// cell formats a number in full precision; NaN and infinities are written as empty cells.
func cell(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}
