package scenario

import "hdrisk/engine/param"

// FieldError reports a scenario that cannot be accepted: the engine's one error type,
// whose Field is here the JSON path of the offending value ("penalty.l1",
// "signal.weights[3]"), empty when the problem concerns the document as a whole (not
// JSON, too large, trailing data).
type FieldError = param.Error

// LinkError reports a share link that cannot be read or written, before any scenario
// field is involved (an invalid scenario inside a readable link is a *FieldError).
type LinkError struct {
	Reason string
}

func (e *LinkError) Error() string { return "share link: " + e.Reason }

func fieldErr(field, format string, args ...any) *FieldError {
	return param.Errorf(field, format, args...)
}
