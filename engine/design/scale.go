package design

import (
	"fmt"

	"hdrisk/engine/param"
)

// Scale fixes the overall size of F, that is the mean eigenvalue E_nu[lambda] of F^T F
// (docs/method.md section 1).
type Scale int

const (
	// Rows scales F so that E_nu[lambda] = alpha: rows have unit norm on average, a Gaussian
	// design has entries N(0, 1/n) and a row-orthogonal design has F F^T = I.
	Rows Scale = iota
	// Columns scales F so that E_nu[lambda] = 1: columns have unit norm on average and a
	// Gaussian design has entries N(0, 1/m).
	Columns
	// AsGiven uses the numbers of the shape unscaled. For the Gaussian shape it is the same as
	// Rows (entries N(0, 1/n)); for the orthogonal shape the nonzero singular values are 1.
	AsGiven
)

// String returns the name used in scenario files: "rows", "columns" or "as-given".
// Special cases are: an unknown Scale prints as "scale(k)".
func (s Scale) String() string {
	switch s {
	case Rows:
		return "rows"
	case Columns:
		return "columns"
	case AsGiven:
		return "as-given"
	}
	return fmt.Sprintf("scale(%d)", int(s))
}

// ParseScale is the inverse of Scale.String for the three valid scales.
// Special cases are: any other text gives a *param.Error for the field "scale".
func ParseScale(name string) (Scale, error) {
	switch name {
	case "rows":
		return Rows, nil
	case "columns":
		return Columns, nil
	case "as-given":
		return AsGiven, nil
	}
	return 0, &param.Error{Field: "scale", Reason: fmt.Sprintf("%q is not one of rows, columns, as-given", name)}
}

func (s Scale) valid() bool { return s == Rows || s == Columns || s == AsGiven }

// factor returns the number by which the eigenvalues of a law of mean eigenvalue mean are
// multiplied so that the scaled law meets the convention of s for the sampling ratio alpha.
func (s Scale) factor(alpha, mean float64) float64 {
	switch s {
	case Rows:
		return alpha / mean
	case Columns:
		return 1 / mean
	}
	return 1
}
