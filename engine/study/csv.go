package study

import (
	"encoding/csv"
	"io"
	"strconv"

	"hdrisk/engine/fixedpoint"
)

// Observable is one number a point of a study reports.
type Observable struct {
	Name  string // column name, as the eval command names it
	Label string
	Of    func(fixedpoint.Result) float64
}

// Observables lists every observable of a fixed point (docs/method.md section 4), in the order of
// the CSV columns.
func Observables() []Observable {
	return []Observable{
		{"mse", "MSE", func(r fixedpoint.Result) float64 { return r.MSE }},
		{"nmse", "NMSE", func(r fixedpoint.Result) float64 { return r.NMSE }},
		{"nmse_db", "NMSE (dB)", func(r fixedpoint.Result) float64 { return r.NMSEdB }},
		{"susceptibility", "susceptibility V", func(r fixedpoint.Result) float64 { return r.Susceptibility }},
		{"nonzero_fraction", "fraction of nonzero entries", func(r fixedpoint.Result) float64 { return r.NonZero }},
		{"tpp", "true-positive proportion", func(r fixedpoint.Result) float64 { return r.TPP }},
		{"fdp", "false-discovery proportion", func(r fixedpoint.Result) float64 { return r.FDP }},
		{"train_error", "training error", func(r fixedpoint.Result) float64 { return r.TrainError }},
		{"g1", "g1", func(r fixedpoint.Result) float64 { return r.G1 }},
		{"t1", "t1", func(r fixedpoint.Result) float64 { return r.T1 }},
		{"g2", "g2", func(r fixedpoint.Result) float64 { return r.G2 }},
	}
}

// WriteCSV writes points as CSV: a header naming the fields (one column per name in fields:
// the swept field of a sweep, or a map's X then Y), every observable, then iterations,
// converged, estimate_zero, residual and status. Numbers are written in full precision.
// status is Point.Status, except that a converged point on the solver's floor (an error
// below -120 dB, to be read as at most that) says "floor".
//
// Special cases are: a point that did not converge or failed has its observables left empty,
// so that nothing plots it by mistake, and its status says why. fields may hold at most two
// names (X and Y).
func WriteCSV(w io.Writer, fields []string, pts []Point) error {
	if len(fields) < 1 || len(fields) > 2 {
		return specErr("fields", "a CSV needs one or two coordinate names, not %d", len(fields))
	}
	obs, head := csvColumns(fields, pts)
	cw := csv.NewWriter(w)
	if err := cw.Write(head); err != nil {
		return err
	}
	rec := make([]string, 0, len(head))
	for _, p := range pts {
		if err := cw.Write(csvRow(rec[:0], len(fields), p, obs)); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// csvColumns returns the observables WriteCSV writes for pts (the generalized model's too
// when a point has them) and its header row.
func csvColumns(fields []string, pts []Point) ([]Observable, []string) {
	obs := Observables()
	if anyGLM(pts) {
		obs = append(obs, GLMObservables()...)
	}
	head := append([]string(nil), fields...)
	for _, o := range obs {
		head = append(head, o.Name)
	}
	return obs, append(head, "iterations", "converged", "estimate_zero", "residual", "status")
}

// csvRow appends to rec the row of WriteCSV for p, with nfields coordinates.
func csvRow(rec []string, nfields int, p Point, obs []Observable) []string {
	rec = append(rec, num(p.X))
	if nfields == 2 {
		rec = append(rec, num(p.Y))
	}
	for _, o := range obs {
		v := ""
		if p.OK() {
			v = num(o.Of(p.Result))
		}
		rec = append(rec, v)
	}
	return append(rec, strconv.Itoa(p.Result.Iterations), strconv.FormatBool(p.OK()),
		strconv.FormatBool(p.OK() && p.Result.EstimateZero), num(p.Result.Residual), csvStatus(p))
}

func num(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

func csvStatus(p Point) string {
	if p.OK() && p.Result.Floor {
		return "floor"
	}
	return p.Status()
}
