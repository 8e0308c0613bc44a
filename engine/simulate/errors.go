package simulate

import "hdrisk/engine/param"

// ParamError reports an input that the simulation refuses, naming the field and the
// reason: the engine's one error type.
type ParamError = param.Error

func paramErr(field, format string, args ...any) error {
	return param.Errorf(field, format, args...)
}
