package ui

import (
	"strconv"
)

// row is one line of the figure list: Value is the full-precision text for data-value,
// Shown the rounded text for people.
type row struct {
	Name, Label, Value, Shown string
}

func (c *Results) rows() []row {
	f := c.Figures
	num := func(name, label string, v float64, digits int) row {
		return row{name, label, strconv.FormatFloat(v, 'g', -1, 64), strconv.FormatFloat(v, 'g', digits, 64)}
	}
	yes := func(b bool) string {
		if b {
			return "yes"
		}
		return "no"
	}
	return []row{
		num("mse", "Mean squared error", f.MSE, 4),
		{"nmse_db", "Normalized error", strconv.FormatFloat(f.NMSEdB, 'g', -1, 64), strconv.FormatFloat(f.NMSEdB, 'f', 2, 64) + " dB"},
		num("nonzero_fraction", "Share of nonzero estimates", f.NonzeroFraction, 4),
		num("susceptibility", "Susceptibility", f.Susceptibility, 4),
		{"converged", "Solver converged", strconv.FormatBool(f.Converged), yes(f.Converged)},
		{"iterations", "Iterations", strconv.Itoa(f.Iterations), strconv.Itoa(f.Iterations)},
		{"estimate_zero", "Estimate is zero", strconv.FormatBool(f.EstimateZero), yes(f.EstimateZero)},
	}
}
