package scenario

import (
	"errors"
	"math"
	"sync"

	"hdrisk/engine/design"
	"hdrisk/engine/penalty"
)

// The three families, read once from the engine registries.
var (
	designsOnce, penaltiesOnce sync.Once
	designFam, penaltyFam      *family
)

func designs() *family {
	designsOnce.Do(func() {
		f := &family{Object: "design", Key: "shape", Noun: "shape"}
		for _, s := range design.Shapes() {
			k := kindSpec{Name: s.Name, Label: s.Help}
			for _, p := range s.Params {
				k.Params = append(k.Params, param{Name: p.Name, Label: p.Help, Unit: p.Unit,
					Min: p.Min, Max: p.Max, MinOpen: p.MinOpen, MaxOpen: p.MaxOpen,
					Log: logScale(p.Min, p.Max), List: p.List, MaxLen: p.MaxLen,
					Optional: p.Optional, Default: p.Default, full: f.Object + "." + p.Name})
			}
			f.Kinds = append(f.Kinds, k)
		}
		designFam = f
	})
	return designFam
}

func penalties() *family {
	penaltiesOnce.Do(func() {
		f := &family{Object: "penalty", Key: "kind", Noun: "penalty"}
		for _, pk := range penalty.Kinds() {
			k := kindSpec{Name: pk.Name, Label: pk.Help}
			for _, p := range pk.Params {
				k.Params = append(k.Params, param{Name: p.Name, Label: p.Help, Unit: p.Unit,
					Min: p.Min, Max: p.Max, MinOpen: p.MinOpen, MaxOpen: p.MaxOpen,
					Log: logScale(p.Min, p.Max), Optional: p.Optional, Default: p.Default, full: f.Object + "." + p.Name})
			}
			f.Kinds = append(f.Kinds, k)
		}
		penaltyFam = f
	})
	return penaltyFam
}

// logScale tells whether a parameter is best swept on a log axis: one without an upper
// bound is a scale (a strength, a width, a variance) and spans orders of magnitude.
func logScale(lo, hi float64) bool { return lo >= 0 && math.IsInf(hi, 1) }

// asField turns a registry's parameter error into a *FieldError under object.
func asField(object string, err error) error {
	if err == nil {
		return nil
	}
	var de *design.ParamError
	var pe *penalty.ParamError
	switch {
	case errors.As(err, &de):
		return &FieldError{Field: join(object, de.Field), Reason: de.Reason}
	case errors.As(err, &pe):
		return &FieldError{Field: join(object, pe.Field), Reason: pe.Reason}
	}
	return signalField(object, err)
}

func buildDesign(d Design) (design.Law, error) {
	sc, err := design.ParseScale(d.Scale)
	if err != nil {
		return nil, asField("design", err)
	}
	l, err := design.New(d.Shape, d.Alpha, sc, d.Params, d.Lists)
	return l, asField("design", err)
}

func buildPenalty(p Penalty) (penalty.Penalty, error) {
	pen, err := penalty.New(p.Kind, p.Params)
	return pen, asField("penalty", err)
}
