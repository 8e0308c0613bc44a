// Package readout holds the maps from the noiseless measurement z = (F x0)_mu and the noise
// w to the observed y of a generalized linear model (docs/method.md section 10): linear (y = z + w,
// the default), sign (y = sign(z + w)), a uniform mid-rise quantizer of z + w, and the
// logistic label (y = +-1 with P(y = +1 | z) = 1/(1 + exp(-z)), no additive noise).
//
// Every readout but linear gives finitely many values. Those of sign and quantize are cells
// of z + w: y = Levels[k] when Cuts[k-1] <= z + w < Cuts[k] (Cuts[-1] = -Inf, Cuts[K-1] = +Inf).
package readout

import (
	"hdrisk/engine/param"
	"math"
	"math/rand/v2"
)

// Readout is one readout.
type Readout interface {
	// Name is the registry kind.
	Name() string
	// Labels reports whether y takes finitely many values.
	Labels() bool
	// Observe returns y for the noiseless measurement z and the noise w; for the logistic
	// readout w is ignored and u, uniform on [0, 1), draws the label.
	Observe(z, w, u float64) float64
}

// Cells is implemented by sign and quantize: y is a cell of z + w.
type Cells interface {
	// Levels returns the K output values in increasing order and the K-1 interior cuts.
	Levels() (levels, cuts []float64)
}

type linear struct{}

// Linear returns y = z + w.
func Linear() Readout { return linear{} }

func (linear) Name() string                    { return "linear" }
func (linear) Labels() bool                    { return false }
func (linear) Observe(z, w, _ float64) float64 { return z + w }

type sign struct{}

// Sign returns y = sign(z + w) in {-1, +1} (0 maps to +1, an event of probability 0).
func Sign() Readout { return sign{} }

func (sign) Name() string { return "sign" }
func (sign) Labels() bool { return true }
func (sign) Observe(z, w, _ float64) float64 {
	if z+w < 0 {
		return -1
	}
	return 1
}
func (sign) Levels() ([]float64, []float64) { return []float64{-1, 1}, []float64{0} }

type quantize struct {
	bits  int
	rng   float64
	level []float64
	cut   []float64
}

// MaxBits is the finest quantizer.
const MaxBits = 16

// Quantize returns the uniform mid-rise quantizer of z + w with 2^bits cells (bits 1..16)
// over [-rng, rng] (rng > 0 finite): step d = 2 rng / 2^bits, outputs at the cell midpoints
// +-d/2, +-3d/2, ..., +-(rng - d/2), inputs beyond +-rng in the outer cells.
func Quantize(bits int, rng float64) (Readout, error) {
	if bits < 1 || bits > MaxBits {
		return nil, param.Errorf("bits", "must be a whole number from 1 to %d (got %d)", MaxBits, bits)
	}
	if math.IsNaN(rng) || math.IsInf(rng, 0) || !(rng > 0) {
		return nil, param.Errorf("range", "must be a finite number > 0 (got %v)", rng)
	}
	k := 1 << bits
	d := 2 * rng / float64(k)
	q := quantize{bits: bits, rng: rng, level: make([]float64, k), cut: make([]float64, k-1)}
	for i := range k {
		q.level[i] = -rng + (float64(i)+0.5)*d
		if i > 0 {
			q.cut[i-1] = -rng + float64(i)*d
		}
	}
	// The middle cut is 0 exactly, so that the sign of y is the sign of z + w.
	q.cut[k/2-1] = 0
	return q, nil
}

func (q quantize) Name() string { return "quantize" }
func (q quantize) Labels() bool { return true }
func (q quantize) Observe(z, w, _ float64) float64 {
	x := z + w
	d := 2 * q.rng / float64(len(q.level))
	i := int(math.Floor((x + q.rng) / d))
	i = max(0, min(len(q.level)-1, i))
	return q.level[i]
}
func (q quantize) Levels() ([]float64, []float64) {
	return append([]float64(nil), q.level...), append([]float64(nil), q.cut...)
}

// Bits returns the quantizer's resolution.
func (q quantize) Bits() int { return q.bits }

type logistic struct{}

// Logistic returns the label y = +1 with probability 1/(1 + exp(-z)), else -1.
func Logistic() Readout { return logistic{} }

func (logistic) Name() string { return "logistic" }
func (logistic) Labels() bool { return true }
func (logistic) Observe(z, _, u float64) float64 {
	if u < Sigmoid(z) {
		return 1
	}
	return -1
}

// Sigmoid is 1/(1 + exp(-z)), formed without overflow.
func Sigmoid(z float64) float64 {
	if z >= 0 {
		return 1 / (1 + math.Exp(-z))
	}
	e := math.Exp(z)
	return e / (1 + e)
}

// Draw returns the observations of the noiseless measurements z with noise w (same length)
// under r, drawing the uniforms of the logistic readout from rng.
func Draw(r Readout, z, w []float64, rng *rand.Rand) []float64 {
	y := make([]float64, len(z))
	for i := range z {
		y[i] = r.Observe(z[i], w[i], rng.Float64())
	}
	return y
}
