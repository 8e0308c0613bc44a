package scenario

import (
	"maps"
	"math"

	"hdrisk/engine/fixedpoint"
)

// Checked is a scenario that Check accepted, together with the laws built on the way: its
// problem is ready to solve, and Bind varies one of its numbers without checking or
// rebuilding the rest. A Checked never changes; the page checks a scenario once per edit
// and hands the Checked on.
type Checked struct {
	s     Scenario
	l     laws
	noise float64
}

// Check validates s as Validate does and keeps the result. The Checked holds its own copy
// of s, so that later changes to s do not show through. Special cases are: an invalid s
// gives its *FieldError.
func (s Scenario) Check() (Checked, error) {
	l, err := s.check()
	if err != nil {
		return Checked{}, err
	}
	return Checked{s: s.clone(), l: l, noise: noiseVar(s.Noise, l)}, nil
}

// Scenario returns a copy of the checked scenario.
func (c Checked) Scenario() Scenario { return c.s.clone() }

// Problem returns the fixed-point problem of the scenario (as Scenario.Problem would,
// without building anything).
func (c Checked) Problem() fixedpoint.Problem {
	return fixedpoint.Problem{Design: c.l.d, Signal: c.l.x, Penalty: c.l.p, Noise: c.noise}
}

// Paths lists the numbers of the scenario, as Scenario.Paths does.
func (c Checked) Paths() []PathInfo { return c.s.Paths() }

// Get returns the number at path, as Scenario.Get does; a derived noise variance or SNR is
// read from the laws already built.
func (c Checked) Get(path string) (float64, error) {
	t, err := c.s.resolve(path)
	if err != nil {
		return 0, err
	}
	switch {
	case t.full == "noise.variance" && c.s.Noise.SNR:
		return c.noise, nil
	case t.full == "noise.snr_db" && !c.s.Noise.SNR:
		if c.s.Noise.Variance == 0 {
			return math.Inf(1), nil
		}
		return 10 * math.Log10(c.l.x.Second()*c.l.d.Mean()/(c.l.d.Alpha()*c.s.Noise.Variance)), nil
	}
	return c.s.Get(path)
}

// Binding is one number of a checked scenario, resolved once, so that a study can set it
// to many values without looking the path up again.
type Binding struct {
	c Checked
	t target
}

// Bind resolves path (a full path or a short name, see Paths) in c. Special cases are: an
// unknown or ambiguous path, a list and a word give a *FieldError.
func (c Checked) Bind(path string) (Binding, error) {
	t, err := c.s.resolve(path)
	if err != nil {
		return Binding{}, err
	}
	if !t.scalar {
		return Binding{}, fieldErr(t.full, "is a list, not a number")
	}
	return Binding{c: c, t: t}, nil
}

// Info describes the bound number: its name, path, label, unit, domain and role.
func (b Binding) Info() PathInfo {
	for _, p := range b.c.s.Paths() {
		if p.Path == b.t.full {
			return p
		}
	}
	return PathInfo{Path: b.t.full}
}

// At returns the checked scenario with the bound number set to v. Only the part that holds
// it is rebuilt: the penalty for a penalty parameter, the signal law for a signal
// parameter, the design law for alpha or a shape parameter, nothing but Delta for the
// noise. The result and the refusals are those of With followed by Check: v out of range,
// or a value its constructor refuses (for example min > max), gives the *FieldError
// naming the field. Setting "noise" states the noise as a variance and setting "snr_db"
// states it as an SNR.
func (b Binding) At(v float64) (Checked, error) {
	t := b.t
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return Checked{}, fieldErr(t.full, "must be a finite number")
	}
	c := b.c
	var err error
	switch t.full {
	case "design.alpha":
		if err = AlphaParam.Check(t.full, v); err != nil {
			return Checked{}, err
		}
		c.s.Design.Alpha = v
		c.l.d, err = buildDesign(c.s.Design)
	case "noise.variance":
		c.s.Noise = Noise{Variance: v, Law: c.s.Noise.Law}
		err = c.s.validateNoise()
	case "noise.snr_db":
		c.s.Noise = Noise{SNRdB: v, SNR: true, Law: c.s.Noise.Law}
		err = c.s.validateNoise()
	default:
		if err = t.p.Check(t.full, v); err != nil {
			return Checked{}, err
		}
		switch t.object {
		case "design":
			c.s.Design.Params = withValue(c.s.Design.Params, t.p.Name, v)
			c.l.d, err = buildDesign(c.s.Design)
		case "signal":
			c.s.Signal.Params = withValue(c.s.Signal.Params, t.p.Name, v)
			c.l.x, err = buildSignal(c.s.Signal)
		case "readout", "loss", "noise":
			ch := c.s.choiceOf(t.object).clone()
			ch.Params = withValue(ch.Params, t.p.Name, v)
			switch t.object {
			case "readout":
				c.s.Readout = ch
			case "loss":
				c.s.Loss = ch
			default:
				c.s.Noise.Law = ch
			}
		default:
			c.s.Penalty.Params = withValue(c.s.Penalty.Params, t.p.Name, v)
			c.l.p, err = buildPenalty(c.s.Penalty)
		}
	}
	if err != nil {
		return Checked{}, err
	}
	if c.s.Noise.SNR && !(c.l.x.Second()*c.l.d.Mean() > 0) {
		return Checked{}, errNoPower()
	}
	c.noise = noiseVar(c.s.Noise, c.l)
	if c.l.g, err = c.s.buildGLM(c.noise); err != nil {
		return Checked{}, err
	}
	return c, nil
}

// withValue returns a copy of m with m[name] = v; m itself is shared with other Checked
// values and never written.
func withValue(m map[string]float64, name string, v float64) map[string]float64 {
	c := maps.Clone(m)
	if c == nil {
		c = map[string]float64{}
	}
	c[name] = v
	return c
}
