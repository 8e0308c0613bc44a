package scenario

import (
	"maps"
	"slices"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/loss"
	"hdrisk/engine/noise"
	"hdrisk/engine/param"
	"hdrisk/engine/readout"
)

// Choice is an optional group of a generalized linear model (docs/method.md section 10): a
// readout or a loss, or the law of the noise, by its registry kind and parameters.
type Choice struct {
	Kind   string
	Params map[string]float64
}

func (c *Choice) clone() *Choice {
	if c == nil {
		return nil
	}
	return &Choice{Kind: c.Kind, Params: maps.Clone(c.Params)}
}

// The three registries of the generalized linear model, read once.
var (
	readouts = familyOf("readout", "kind", "readout", func(add adder) {
		for _, k := range readout.Kinds() {
			add(k.Name, k.Help, k.Params)
		}
	})
	losses = familyOf("loss", "kind", "loss", func(add adder) {
		for _, k := range loss.Kinds() {
			add(k.Name, k.Help, k.Params)
		}
	})
	noiseLaws = familyOf("noise", "law", "noise law", func(add adder) {
		for _, k := range noise.Kinds() {
			add(k.Name, k.Help, k.Params)
		}
	})
)

// glmLaws are the built parts of the generalized model; nil fields are the defaults.
type glmLaws struct {
	w  noise.Law
	rd readout.Readout
	ls loss.Loss
}

// GLM reports whether s asks for more than today's model: a readout, a loss or a noise law
// other than the defaults (linear, square, gauss).
func (s Scenario) GLM() bool {
	return (s.Readout != nil && s.Readout.Kind != "linear") || (s.Loss != nil && s.Loss.Kind != "square") ||
		(s.Noise.Law != nil && s.Noise.Law.Kind != "gauss")
}

// buildGLM validates and builds the readout, the loss and the noise law of s; delta is the
// typical noise entry's variance. Refusals name the field: a label loss with a readout that
// gives no labels +-1 under "loss.kind", noise with the logistic readout under
// "noise.variance".
func (s Scenario) buildGLM(delta float64) (glmLaws, error) {
	var g glmLaws
	rd := readout.Linear()
	if s.Readout != nil {
		if err := validateParams(readouts(), s.Readout.Kind, s.Readout.Params, nil); err != nil {
			return g, err
		}
		r, err := readout.New(s.Readout.Kind, s.Readout.Params)
		if err != nil {
			return g, param.Under("readout", err)
		}
		rd = r
	}
	ls := loss.Square()
	if s.Loss != nil {
		if err := validateParams(losses(), s.Loss.Kind, s.Loss.Params, nil); err != nil {
			return g, err
		}
		l, err := loss.New(s.Loss.Kind, s.Loss.Params)
		if err != nil {
			return g, param.Under("loss", err)
		}
		ls = l
	}
	law := "gauss"
	var lp map[string]float64
	if s.Noise.Law != nil {
		if err := validateParams(noiseLaws(), s.Noise.Law.Kind, s.Noise.Law.Params, nil); err != nil {
			return g, err
		}
		law, lp = s.Noise.Law.Kind, s.Noise.Law.Params
	}
	if law != "gauss" && !(delta > 0) {
		return g, fieldErr("noise.variance", "must be > 0 for the %s noise law (its shape needs a scale)", law)
	}
	w, err := noise.New(law, delta, lp)
	if err != nil {
		return g, param.Under("noise", err)
	}
	if ls.Labels() && rd.Name() != "sign" && rd.Name() != "logistic" {
		return g, fieldErr("loss.kind", "the %s loss needs labels +-1, which the %s readout does not give (choose readout sign or logistic, or a regression loss)", ls.Name(), rd.Name())
	}
	if rd.Name() == "logistic" && (delta != 0 || law != "gauss") {
		return g, fieldErr("noise.variance", "the logistic readout draws its own label noise: leave the noise out or give it variance 0")
	}
	return glmLaws{w: w, rd: rd, ls: ls}, nil
}

// GLM returns the generalized problem of the checked scenario and true when the scenario
// asks for it (Scenario.GLM); otherwise false, and Problem is the one to solve.
func (c Checked) GLM() (fixedpoint.GLM, bool) {
	if !c.s.GLM() {
		return fixedpoint.GLM{}, false
	}
	return fixedpoint.GLM{Design: c.l.d, Signal: c.l.x, Penalty: c.l.p, Noise: c.l.g.w, Readout: c.l.g.rd, Loss: c.l.g.ls}, true
}

// readChoice reads the optional group key ("readout", "loss") of the top object.
func readChoice(top *reader, f *family) (*Choice, error) {
	if _, ok := top.v.vals[f.Object]; !ok {
		return nil, nil
	}
	_, k, params, _, err := readKind(top, f, nil)
	if err != nil {
		return nil, err
	}
	return &Choice{Kind: k.Name, Params: params}, nil
}

// readNoiseLaw reads noise.law and its parameters, and returns the keys they take.
func readNoiseLaw(r *reader) (*Choice, []string, error) {
	lv, ok := r.get("law")
	if !ok {
		return nil, nil, nil
	}
	name, err := lv.text("noise.law")
	if err != nil {
		return nil, nil, err
	}
	f := noiseLaws()
	k, ok := f.find(name)
	if !ok {
		return nil, nil, fieldErr("noise.law", "unknown noise law %q (known: %s)", clip(name, 40), f.names())
	}
	c := &Choice{Kind: k.Name}
	keys := []string{"law"}
	for _, p := range k.Params {
		keys = append(keys, p.Name)
		x, _, err := r.float(p.Name, true)
		if err != nil {
			if _, has := r.v.vals[p.Name]; !has {
				return nil, nil, missing(f, k, p.Name)
			}
			return nil, nil, err
		}
		if c.Params == nil {
			c.Params = map[string]float64{}
		}
		c.Params[p.Name] = x
	}
	return c, keys, nil
}

// noiseMayLack reports whether the document may leave the noise group out: with the
// logistic readout, whose labels carry their own noise.
func noiseMayLack(top *reader) bool {
	v, ok := top.v.vals["readout"]
	if !ok || v.kind != jObject {
		return false
	}
	k, ok := v.vals["kind"]
	return ok && k.kind == jString && k.str == "logistic"
}

// glmTree adds the optional groups to the canonical tree.
func (s Scenario) glmTree(t *node) {
	for _, c := range []struct {
		f *family
		v *Choice
	}{{readouts(), s.Readout}, {losses(), s.Loss}} {
		if c.v == nil {
			continue
		}
		n := obj()
		n.set(c.f.Key, str(c.v.Kind))
		addParams(&n, c.f, c.v.Kind, c.v.Params, nil)
		t.set(c.f.Object, n)
	}
}

// noiseLawTree adds noise.law and its parameters to the noise object.
func (n Noise) lawTree(z *node) {
	if n.Law == nil {
		return
	}
	z.set("law", str(n.Law.Kind))
	addParams(z, noiseLaws(), n.Law.Kind, n.Law.Params, nil)
}

// glmTargets calls fn with the numbers of the optional groups, as eachTarget does.
func (s Scenario) glmTargets(fn func(t target) bool, kind func(object string, f *family, name string) bool) bool {
	if s.Noise.Law != nil && !kind("noise", noiseLaws(), s.Noise.Law.Kind) {
		return false
	}
	if s.Readout != nil && !kind("readout", readouts(), s.Readout.Kind) {
		return false
	}
	return s.Loss == nil || kind("loss", losses(), s.Loss.Kind)
}

// choiceOf returns the group that holds a number of the given object, or nil.
func (s *Scenario) choiceOf(object string) *Choice {
	switch object {
	case "readout":
		return s.Readout
	case "loss":
		return s.Loss
	case "noise":
		return s.Noise.Law
	}
	return nil
}

// isGLMObject reports whether object is one of the optional groups' numbers.
func isGLMObject(object string) bool {
	return slices.Contains([]string{"readout", "loss", "noise"}, object)
}
