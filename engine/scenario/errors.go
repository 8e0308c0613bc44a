package scenario

// FieldError reports a scenario that cannot be accepted. Field is the JSON path of the
// offending value ("penalty.l1", "signal.weights[3]"); it is empty when the problem
// concerns the document as a whole (not JSON, too large, trailing data).
type FieldError struct {
	Field  string
	Reason string
}

func (e *FieldError) Error() string {
	if e.Field == "" {
		return "scenario: " + e.Reason
	}
	return e.Field + ": " + e.Reason
}

// LinkError reports a share link that cannot be read or written, before any scenario
// field is involved (an invalid scenario inside a readable link is a *FieldError).
type LinkError struct {
	Reason string
}

func (e *LinkError) Error() string { return "share link: " + e.Reason }

func fieldErr(field, format string, args ...any) *FieldError {
	if len(args) == 0 {
		return &FieldError{Field: field, Reason: format}
	}
	return &FieldError{Field: field, Reason: sprintf(format, args...)}
}
