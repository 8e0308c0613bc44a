package ui

import (
	"hdrisk/engine/loss"
	"hdrisk/engine/noise"
	"hdrisk/engine/param"
	"hdrisk/engine/readout"
	"hdrisk/engine/scenario"
)

// The groups of a generalized linear model (docs/method.md section 10), from the engine's noise,
// readout and loss registries. Each starts at today's model (Gaussian noise, the linear
// readout, the square loss), which writes nothing into the scenario file, so that a file or
// link made before these groups existed means what it meant.
func noiseLawGroup() Group {
	g := Group{Name: "noise-law", Object: "noise", Title: "Noise law", KindKey: "law", Menu: "Law of a noise entry"}
	for _, k := range noise.Kinds() {
		g.Kinds = append(g.Kinds, registryKind("noise-law", k.Name, k.Help, k.Params))
	}
	return g
}

func glmGroups() []Group {
	rd := Group{Name: "readout", Title: "Readout", KindKey: "kind", Menu: "What is measured"}
	for _, k := range readout.Kinds() {
		rd.Kinds = append(rd.Kinds, registryKind("readout", k.Name, k.Help, k.Params))
	}
	ls := Group{Name: "loss", Title: "Loss", KindKey: "kind", Menu: "Data fit"}
	for _, k := range loss.Kinds() {
		ls.Kinds = append(ls.Kinds, registryKind("loss", k.Name, k.Help, k.Params))
	}
	return []Group{rd, ls}
}

func registryKind(group, name, help string, ps []param.Param) Kind {
	k := newKind(group, name, help, ps)
	for i, p := range k.Params {
		if p.Label == p.Name && p.Param.Label != "" {
			k.Params[i].Label = capital(p.Param.Label)
		}
	}
	return k
}

// glmDefaults are the kinds that leave a group out of the scenario file.
var glmDefaults = map[string]string{"noise-law": "gauss", "readout": "linear", "loss": "square"}

// glmKinds returns the chosen kinds of the generalized groups of s.
func glmKinds(s scenario.Scenario) map[string]string {
	k := map[string]string{}
	for g, c := range map[string]*scenario.Choice{"noise-law": s.Noise.Law, "readout": s.Readout, "loss": s.Loss} {
		k[g] = glmDefaults[g]
		if c != nil {
			k[g] = c.Kind
		}
	}
	return k
}

// glmParams returns the numbers of the generalized groups of s, by group.
func glmParams(s scenario.Scenario) map[string]map[string]float64 {
	p := map[string]map[string]float64{}
	for g, c := range map[string]*scenario.Choice{"noise-law": s.Noise.Law, "readout": s.Readout, "loss": s.Loss} {
		if c != nil {
			p[g] = c.Params
		}
	}
	return p
}

// setGLMChoices puts the chosen kinds of the generalized groups into s: nil for a default
// kind, which has no parameters.
func setGLMChoices(s *scenario.Scenario, kinds map[string]string) {
	choice := func(g string) *scenario.Choice {
		if kinds[g] == "" || kinds[g] == glmDefaults[g] {
			return nil
		}
		return &scenario.Choice{Kind: kinds[g]}
	}
	s.Noise.Law, s.Readout, s.Loss = choice("noise-law"), choice("readout"), choice("loss")
	if noiseless(kinds, "noise-law") {
		s.Noise.Law = nil
	}
}

// noiseless reports whether group g is one of the noise's while the logistic readout is
// chosen: its labels carry their own noise, so the page offers no noise inputs and writes
// the noise as variance 0.
func noiseless(kinds map[string]string, g string) bool {
	return (g == "noise" || g == "noise-law") && kinds["readout"] == "logistic"
}

// setGLMValue stores one number of a generalized group in s.
func setGLMValue(s *scenario.Scenario, group, name string, num float64) {
	var c *scenario.Choice
	switch group {
	case "noise-law":
		c = s.Noise.Law
	case "readout":
		c = s.Readout
	case "loss":
		c = s.Loss
	}
	if c == nil {
		return
	}
	if c.Params == nil {
		c.Params = map[string]float64{}
	}
	c.Params[name] = num
}

// pairLabels keeps the readout and the loss a pair the engine accepts after group g changed:
// a label loss (logistic, hinge) needs labels +-1, so choosing one with another readout picks
// the sign readout, and choosing another readout under a label loss picks the square loss.
func pairLabels(kinds map[string]string, g string) {
	labelLoss := false
	for _, k := range loss.Kinds() {
		labelLoss = labelLoss || (k.Labels && k.Name == kinds["loss"])
	}
	if !labelLoss || kinds["readout"] == "sign" || kinds["readout"] == "logistic" {
		return
	}
	switch g {
	case "loss":
		kinds["readout"] = "sign"
	case "readout":
		kinds["loss"] = glmDefaults["loss"]
	}
}
