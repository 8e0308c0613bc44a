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
	designs = familyOf("design", "shape", "shape", func(add adder) {
		for _, k := range design.Shapes() {
			add(k.Name, k.Help, k.Params)
		}
	})
	signals = familyOf("signal", "law", "law", func(add adder) {
		for _, k := range signal.Laws() {
			add(k.Name, k.Help, k.Params)
		}
	})
	penalties = familyOf("penalty", "kind", "penalty", func(add adder) {
		for _, k := range penalty.Kinds() {
			add(k.Name, k.Help, k.Params)
		}
	})
)

// adder takes one entry of an engine registry into a family.
type adder func(name, help string, params []param.Param)

// familyOf returns the family of the JSON object named object, whose kind is named by key,
// read once on first use from the registry that each lists entry by entry.
func familyOf(object, key, noun string, each func(add adder)) func() *family {
	return sync.OnceValue(func() *family {
		f := &family{Object: object, Key: key, Noun: noun}
		each(f.add)
		return f
	})
}

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
