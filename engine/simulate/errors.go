package simulate

import "fmt"

// ParamError reports an input that the simulation refuses, naming the field and the reason.
type ParamError struct {
	Field  string
	Reason string
}

func (e *ParamError) Error() string {
	return fmt.Sprintf("simulate: %s: %s", e.Field, e.Reason)
}

func paramErr(field, format string, args ...any) error {
	return &ParamError{Field: field, Reason: fmt.Sprintf(format, args...)}
}
