package design

// ParamError reports an invalid parameter of a design: Field names the parameter as it is
// called in a scenario file ("alpha", "min", "values", ...), Reason says what is wrong.
type ParamError struct {
	Field, Reason string
}

// Error returns "design: field: reason".
func (e *ParamError) Error() string { return "design: " + e.Field + ": " + e.Reason }
