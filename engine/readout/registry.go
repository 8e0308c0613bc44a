package readout

import (
	"math"
	"slices"

	"hdrisk/engine/param"
)

// Kind describes one readout of the registry.
type Kind struct {
	Name   string // the scenario's readout.kind
	Help   string
	Labels bool // y takes finitely many values
	Params []param.Param
}

// entry is a readout of the registry with its constructor.
type entry struct {
	Kind
	build func(v map[string]float64) (Readout, error)
}

var kinds = []entry{
	{Kind{"linear", "y = F x0 + w: today's model", false, nil},
		func(map[string]float64) (Readout, error) { return Linear(), nil }},
	{Kind{"sign", "y = sign(F x0 + w): a 1-bit converter or a noisy label", true, nil},
		func(map[string]float64) (Readout, error) { return Sign(), nil }},
	{Kind{"quantize", "y = F x0 + w rounded to 2^bits evenly spaced levels (uniform mid-rise quantizer)", true, []param.Param{
		{Name: "bits", Label: "bits per measurement", Unit: "bits", Min: 1, Max: MaxBits, Help: "resolution of the converter"},
		{Name: "range", Label: "quantizer range", Role: param.Scale, Unit: "units of y", Max: math.Inf(1), MinOpen: true, MaxOpen: true,
			Help: "inputs beyond plus or minus range are clipped to the outer levels"}}},
		func(v map[string]float64) (Readout, error) {
			b := v["bits"]
			if b != math.Trunc(b) {
				return nil, param.Errorf("bits", "must be a whole number (got %v)", b)
			}
			return Quantize(int(b), v["range"])
		}},
	{Kind{"logistic", "labels y = +-1 with P(y = +1) = 1/(1 + exp(-(F x0)_mu)); no additive noise", true, nil},
		func(map[string]float64) (Readout, error) { return Logistic(), nil }},
}

// Kinds lists every readout of the registry, in a fixed order; a fresh copy.
func Kinds() []Kind {
	return param.List(kinds, func(e entry) Kind { k := e.Kind; k.Params = slices.Clone(k.Params); return k })
}

// New builds the readout of the given kind. An unknown kind is reported with Field "kind",
// a missing or unknown parameter with its own name.
func New(kind string, params map[string]float64) (Readout, error) {
	k, v, _, err := param.Lookup("kind", "readout", kind, kinds, func(e entry) (string, []param.Param) { return e.Name, e.Params }, params, nil)
	if err != nil {
		return nil, err
	}
	return k.build(v)
}
