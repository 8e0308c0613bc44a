package ui

import (
	"fmt"
	"strconv"
	"strings"
)

// row is one headline figure: Value is the full-precision text for data-value, Shown the
// rounded text for people, Applies "false" when the number is defined but says nothing for
// this scenario (TPP of a dense signal).
type row struct {
	Name, Label, Value, Shown, Unit, Help, Applies, Kind string
}

func (c *Results) staleText() string { return strconv.FormatBool(c.Stale) }

func (c *Results) convergedText() string {
	if !c.Have {
		return ""
	}
	return strconv.FormatBool(c.Figures.Converged)
}

func (c *Results) problemText() string {
	if c.Have {
		return "The inputs are not a valid scenario, so the figures below are those of the last valid one. " + c.Problem
	}
	return "Cannot compute this scenario: " + c.Problem
}

func (c *Results) summaryText() string {
	if c.Stale {
		return "Last valid scenario — " + c.Summary
	}
	return c.Summary
}

func (c *Results) unconvergedText() string {
	return fmt.Sprintf("Not converged: the solver stopped after %d iterations without settling (last relative change %.2g). "+
		"These numbers are not a prediction; change the regularization or the noise and look again.", c.Figures.Iterations, c.Figures.Residual)
}

func (c *Results) floorText() string {
	return strconv.FormatBool(c.Have && c.Figures.Floor)
}

// greyed is the class of figures that are not a plain prediction: unconverged, or on the
// solver's floor (an upper bound, not a value).
func (c *Results) greyed() string {
	if c.Have && (!c.Figures.Converged || c.Figures.Floor) {
		return "figures greyed"
	}
	return "figures"
}

// noteText is the solver's note, unless a paragraph of its own already says it (the zero
// estimate, the unconverged warning with its residual).
func (c *Results) noteText() string {
	f := c.Figures
	if !c.Have || f.EstimateZero || (!f.Converged && strings.HasPrefix(f.Note, "not converged")) {
		return ""
	}
	return f.Note
}

func (c *Results) rows() []row {
	f := c.Figures
	full := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	num := func(name, label string, v float64, unit, help string) row {
		return row{Name: name, Label: label, Value: full(v), Shown: strconv.FormatFloat(v, 'g', 4, 64),
			Unit: unit, Help: help, Applies: "true", Kind: "number"}
	}
	flag := func(name, label string, b bool, yes, no, help string) row {
		shown := no
		if b {
			shown = yes
		}
		return row{Name: name, Label: label, Value: strconv.FormatBool(b), Shown: shown, Help: help, Applies: "true", Kind: "flag"}
	}
	support := func(r row) row {
		if !c.Support {
			r.Applies, r.Shown = "false", "n/a"
			r.Unit = "sparse signals only"
			r.Help += "; defined for a signal with entries exactly zero and a penalty that sets entries to zero"
		}
		return r
	}
	nmse := num("nmse_db", "Normalized error", f.NMSEdB, "relative to E[x0²]", "10 log₁₀(MSE / E[x0²]): the error relative to the signal's power; lower is better")
	nmse.Shown = strconv.FormatFloat(f.NMSEdB, 'f', 2, 64) + " dB"
	if f.Floor {
		nmse.Shown, nmse.Unit = "≤ −120 dB", "the solver's floor: at most this"
	}
	nz := num("nonzero_fraction", "Nonzero estimates", f.NonzeroFraction, "share of entries", "the share of entries the estimate does not set to zero")
	if !c.Zeroes {
		nz.Unit = "this penalty zeroes none"
	}
	conv := flag("converged", "Converged", f.Converged, "yes", "NO", "whether the solver of the fixed point settled")
	if !f.Converged {
		conv.Kind = "warning"
	}
	head := []row{
		num("mse", "Mean squared error", f.MSE, "per entry, in x0²", "(1/n)‖x̂ − x0‖² in the large-size limit"),
		nmse,
	}
	if f.GLM {
		head = append(head, num("cosine", "Cosine with x0", f.Cosine, "⟨x̂, x0⟩ / (‖x̂‖ ‖x0‖)",
			"the alignment of the estimate with the signal, the figure to read when the readout loses the scale"))
	}
	if f.Labels {
		head = append(head, num("test_error", "Test error", f.TestError, "share of fresh labels",
			"the probability that the sign of a fresh row's prediction differs from its fresh label"))
	}
	return append(head, []row{
		nz,
		support(num("tpp", "True positives", f.TPP, "of nonzero x0 found", "P(x̂ ≠ 0 | x0 ≠ 0): the share of nonzero entries of x0 that the estimate keeps")),
		support(num("fdp", "False discoveries", f.FDP, "of nonzero estimates", "P(x0 = 0 | x̂ ≠ 0): the share of nonzero estimates that are wrong")),
		num("train_error", "Training error", f.TrainError, "(1/m)‖y − F x̂‖²", "the mean squared residual on the measurements"),
		num("susceptibility", "Susceptibility", f.Susceptibility, "V = E[prox′] / g₁", "how strongly the estimate responds to a change in the data"),
		conv,
		{Name: "iterations", Label: "Iterations", Value: strconv.Itoa(f.Iterations), Shown: strconv.Itoa(f.Iterations),
			Unit: "of the fixed point", Help: "iterations the solver took", Applies: "true", Kind: "number"},
		flag("estimate_zero", "Estimate is zero", f.EstimateZero, "yes", "no", "the penalty sets every entry to zero"),
	}...)
}
