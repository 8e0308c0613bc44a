package param

import (
	"errors"
	"fmt"
	"strings"
)

// Error is the engine's one error for an input it refuses: Field names the value the way
// the scenario file does ("l1", "penalty.l1", "signal.weights[3]"; empty when the problem
// concerns the input as a whole) and Reason says what is wrong, in words a user can act on.
type Error struct {
	Field  string
	Reason string
}

// Error returns "field: reason", or the reason alone when Field is empty.
func (e *Error) Error() string {
	if e.Field == "" {
		return e.Reason
	}
	return e.Field + ": " + e.Reason
}

// Errorf returns an *Error with the reason formatted as by fmt.Sprintf.
func Errorf(field, format string, args ...any) *Error {
	if len(args) == 0 {
		return &Error{Field: field, Reason: format}
	}
	return &Error{Field: field, Reason: fmt.Sprintf(format, args...)}
}

// Under places the field of err under prefix: an *Error for "l1" under "penalty" becomes
// one for "penalty.l1"; one without a field takes prefix as its field. Any other error
// becomes an *Error for prefix with the error's text as its reason. Under(prefix, nil) is
// nil.
func Under(prefix string, err error) error {
	if err == nil {
		return nil
	}
	var e *Error
	if !errors.As(err, &e) {
		return &Error{Field: prefix, Reason: err.Error()}
	}
	switch {
	case prefix == "":
		return e
	case e.Field == "":
		return &Error{Field: prefix, Reason: e.Reason}
	case e.Field[0] == '[':
		return &Error{Field: prefix + e.Field, Reason: e.Reason}
	}
	return &Error{Field: prefix + "." + e.Field, Reason: e.Reason}
}

// Find returns the index of the entry called want among n entries, whose names name
// gives, for a registry's New. Special cases are: an unknown name is an *Error under field
// saying "unknown NOUN "want" (known: ...)" with every name in the registry's order.
func Find(field, noun, want string, n int, name func(i int) string) (int, error) {
	names := make([]string, n)
	for i := range n {
		if names[i] = name(i); names[i] == want {
			return i, nil
		}
	}
	return -1, Errorf(field, "unknown %s %q (known: %s)", noun, want, strings.Join(names, ", "))
}
