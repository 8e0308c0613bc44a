package scenario

import (
	"errors"
	"sync"

	"hdrisk/engine/signal"
)

var (
	signalsOnce sync.Once
	signalFam   *family
)

func signals() *family {
	signalsOnce.Do(func() {
		f := &family{Object: "signal", Key: "law", Noun: "law"}
		for _, sk := range signal.Laws() {
			k := kindSpec{Name: sk.Name, Label: sk.Help}
			for _, p := range sk.Params {
				k.Params = append(k.Params, param{Name: p.Name, Label: p.Help, Unit: p.Unit,
					Min: p.Min, Max: p.Max, MinOpen: p.MinOpen, MaxOpen: p.MaxOpen,
					Log: !p.List && logScale(p.Min, p.Max), List: p.List, MaxLen: p.MaxLen, full: f.Object + "." + p.Name})
			}
			f.Kinds = append(f.Kinds, k)
		}
		signalFam = f
	})
	return signalFam
}

func buildSignal(s Signal) (signal.Law, error) {
	l, err := signal.New(s.Law, s.Params, s.Lists)
	return l, asField("signal", err)
}

func signalField(object string, err error) error {
	var se *signal.ParamError
	if errors.As(err, &se) {
		return &FieldError{Field: join(object, se.Field), Reason: se.Reason}
	}
	return &FieldError{Field: object, Reason: err.Error()}
}
