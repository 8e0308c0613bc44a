package study

import "fmt"

// SpecError reports a study specification that cannot be carried out. Field names the
// setting ("points", "from", "over", "target", ...) and Reason says why.
type SpecError struct {
	Field  string
	Reason string
}

func (e *SpecError) Error() string { return "study: " + e.Field + ": " + e.Reason }

func specErr(field, format string, args ...any) *SpecError {
	return &SpecError{Field: field, Reason: fmt.Sprintf(format, args...)}
}
