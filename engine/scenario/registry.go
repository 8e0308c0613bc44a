package scenario

import (
	"sync"

	"hdrisk/engine/design"
	"hdrisk/engine/param"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

// The three families, read once from the engine registries.
var (
	designs = sync.OnceValue(func() *family {
		f := &family{Object: "design", Key: "shape", Noun: "shape"}
		for _, s := range design.Shapes() {
			f.add(s.Name, s.Help, s.Params)
		}
		return f
	})
	signals = sync.OnceValue(func() *family {
		f := &family{Object: "signal", Key: "law", Noun: "law"}
		for _, k := range signal.Laws() {
			f.add(k.Name, k.Help, k.Params)
		}
		return f
	})
	penalties = sync.OnceValue(func() *family {
		f := &family{Object: "penalty", Key: "kind", Noun: "penalty"}
		for _, k := range penalty.Kinds() {
			f.add(k.Name, k.Help, k.Params)
		}
		return f
	})
)

func buildDesign(d Design) (design.Law, error) {
	sc, err := design.ParseScale(d.Scale)
	if err != nil {
		return nil, param.Under("design", err)
	}
	l, err := design.New(d.Shape, d.Alpha, sc, d.Params, d.Lists)
	return l, param.Under("design", err)
}

func buildSignal(s Signal) (signal.Law, error) {
	l, err := signal.New(s.Law, s.Params, s.Lists)
	return l, param.Under("signal", err)
}

func buildPenalty(p Penalty) (penalty.Penalty, error) {
	pen, err := penalty.New(p.Kind, p.Params)
	return pen, param.Under("penalty", err)
}
