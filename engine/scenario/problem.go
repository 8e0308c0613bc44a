package scenario

import (
	"math"

	"hdrisk/engine/design"
	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/penalty"
	"hdrisk/engine/signal"
)

// laws builds the design law, the signal law and the penalty of s through the engine
// registries; their refusals come back as *FieldError under "design", "signal", "penalty".
type laws struct {
	d design.Law
	x signal.Law
	p penalty.Penalty
	g glmLaws
}

func (s Scenario) laws() (laws, error) {
	var l laws
	if err := s.validateDesign(); err != nil {
		return l, err
	}
	d, err := buildDesign(s.Design)
	if err != nil {
		return l, err
	}
	if err := validateParams(signals(), s.Signal.Law, s.Signal.Params, s.Signal.Lists); err != nil {
		return l, err
	}
	x, err := buildSignal(s.Signal)
	if err != nil {
		return l, err
	}
	if err := s.validateNoise(); err != nil {
		return l, err
	}
	if s.Noise.SNR && !(x.Second()*d.Mean() > 0) {
		return l, errNoPower()
	}
	if err := validateParams(penalties(), s.Penalty.Kind, s.Penalty.Params, nil); err != nil {
		return l, err
	}
	p, err := buildPenalty(s.Penalty)
	if err != nil {
		return l, err
	}
	l = laws{d: d, x: x, p: p}
	if l.g, err = s.buildGLM(noiseVar(s.Noise, l)); err != nil {
		return l, err
	}
	return l, nil
}

func errNoPower() error {
	return fieldErr("noise.snr_db", "the signal has no power (E[x0^2] = 0), so an SNR cannot fix the noise; state noise.variance instead")
}

// Problem returns the fixed-point problem of s, with the laws built through the engine
// registries and the noise variance Delta (derived from snr_db when the noise is stated
// that way; see Noise). Special cases are: an invalid s gives its *FieldError.
func (s Scenario) Problem() (fixedpoint.Problem, error) {
	l, err := s.check()
	if err != nil {
		return fixedpoint.Problem{}, err
	}
	return fixedpoint.Problem{Design: l.d, Signal: l.x, Penalty: l.p, Noise: noiseVar(s.Noise, l)}, nil
}

// NoiseVariance returns Delta, the variance of each noise entry. When the noise is stated
// as snr_db it is rho2 E_nu[lambda] / (alpha 10^(snr_db/10)), with rho2 = E[x0^2] and nu
// the scaled law of F^T F. Special cases are: an invalid s gives its *FieldError.
func (s Scenario) NoiseVariance() (float64, error) {
	if !s.Noise.SNR {
		return s.Noise.Variance, nil
	}
	l, err := s.laws()
	if err != nil {
		return 0, err
	}
	return noiseVar(s.Noise, l), nil
}

func noiseVar(n Noise, l laws) float64 {
	if !n.SNR {
		return n.Variance
	}
	return l.x.Second() * l.d.Mean() / (l.d.Alpha() * math.Pow(10, n.SNRdB/10))
}

// snrDB returns 10 log10 of rho2 E_nu[lambda] / (alpha Delta).
// Special cases are: Delta = 0 gives +Inf; a signal without power gives -Inf.
func (s Scenario) snrDB() (float64, error) {
	if s.Noise.SNR {
		return s.Noise.SNRdB, nil
	}
	l, err := s.laws()
	if err != nil {
		return 0, err
	}
	if s.Noise.Variance == 0 {
		return math.Inf(1), nil
	}
	return 10 * math.Log10(l.x.Second()*l.d.Mean()/(l.d.Alpha()*s.Noise.Variance)), nil
}
