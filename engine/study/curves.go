package study

import (
	"context"
	"encoding/csv"
	"io"
	"strconv"

	"hdrisk/engine/param"
	"hdrisk/engine/scenario"
)

// MaxCurves is the number of values a curves-per-value sweep takes at most: the page draws
// eight curves on one figure (its palette has eight colours).
const MaxCurves = 8

// CurvesSpec is a sweep drawn once per value of a second field: the curve over Axis with
// Curves set to each value of At in turn ("how many measurements with 1, 2, 3 or 4 bits":
// Axis over alpha, Curves "bits", At 1, 2, 3, 4).
type CurvesSpec struct {
	SweepSpec
	Curves string    // the second field, as scenario.Scenario.Get names it
	At     []float64 // its values, one curve each, 1 to MaxCurves of them
	// PointFrom and PointTo, when PointTo > 0, ask for the points PointFrom <= k < PointTo
	// of each curve only (SweepBlock), so that the curves can be shared out in blocks.
	PointFrom, PointTo int
}

// Curve is one curve of a curves-per-value sweep: the second field's value and the points
// of the sweep at it, exactly as SweepChecked returns them for the scenario with that value.
type Curve struct {
	Value  float64 `json:"value"`
	Points []Point `json:"points"`
}

// Curves is the result of SweepCurves: the two fields (Over along each curve, Field from
// curve to curve) and the curves in the order of CurvesSpec.At.
type Curves struct {
	Over   string  `json:"over"`
	Field  string  `json:"field"`
	Curves []Curve `json:"curves"`
}

// SweepCurves sweeps spec.Axis once per value of spec.Curves: the second field is bound once
// (scenario.Checked.Bind) and set for each curve (Binding.At), and each curve is then the
// plain SweepChecked of that scenario, warm-started along its own axis (or, with a block of
// points asked, its SweepBlock).
//
// Special cases are: a second field that is the swept one, an empty or too long value list,
// and a value the field refuses are errors (*param.Error) naming "curves" or "curves_at[k]",
// before anything is solved; the sweep's own errors are those of SweepChecked. On
// cancellation the curves done so far are returned with ctx.Err(). progress counts points
// over all curves.
func SweepCurves(ctx context.Context, c scenario.Checked, spec CurvesSpec, progress Progress) (Curves, error) {
	out := Curves{Over: spec.Over, Field: spec.Curves}
	if spec.Curves == "" {
		return out, specErr("curves", "name the field that sets each curve (%s)", fieldList(c.Paths()))
	}
	if len(spec.At) < 1 || len(spec.At) > MaxCurves {
		return out, specErr("curves_at", "give 1 to %d values, not %d", MaxCurves, len(spec.At))
	}
	b, err := c.Bind(spec.Curves)
	if err != nil {
		return out, param.Under("curves", err)
	}
	if sb, err := c.Bind(spec.Over); err == nil && sb.Info().Path == b.Info().Path {
		return out, specErr("curves", "names the swept field (%s); choose another field for the curves", spec.Over)
	}
	at := make([]scenario.Checked, len(spec.At))
	for k, v := range spec.At {
		if at[k], err = b.At(v); err != nil {
			return out, param.Under("curves_at["+strconv.Itoa(k)+"]", err)
		}
	}
	from, to := 0, spec.Points
	if spec.PointTo > 0 {
		from, to = spec.PointFrom, spec.PointTo
	}
	total := len(spec.At) * (to - from)
	for k, ck := range at {
		var pr Progress
		if progress != nil {
			done := k * (to - from)
			pr = func(d, _ int) { progress(done+d, total) }
		}
		pts, err := SweepBlock(ctx, ck, spec.SweepSpec, from, to, pr)
		if err != nil && len(pts) == 0 {
			return out, err
		}
		out.Curves = append(out.Curves, Curve{Value: spec.At[k], Points: pts})
		if err != nil {
			return out, err
		}
	}
	return out, nil
}

// WriteCurvesCSV writes the curves as WriteCSV writes one sweep, under one header with a
// first column holding each row's value of the second field (named by cs.Field).
func WriteCurvesCSV(w io.Writer, cs Curves) error {
	cw := csv.NewWriter(w)
	width := 0
	var rec []string
	for k, c := range cs.Curves {
		obs, head := csvColumns([]string{cs.Over}, c.Points)
		if k == 0 {
			width = len(head)
			if err := cw.Write(append([]string{cs.Field}, head...)); err != nil {
				return err
			}
		} else if len(head) != width {
			// Only a curve with no generalized-model point at all lacks those columns.
			return specErr("curves", "the curve at %s = %s has other columns than the first", cs.Field, num(c.Value))
		}
		for _, p := range c.Points {
			rec = csvRow(append(rec[:0], num(c.Value)), 1, p, obs)
			if err := cw.Write(rec); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}
