package study

import "hdrisk/engine/param"

// SpecError reports a study specification that cannot be carried out: the engine's one
// error type, with Field naming the setting ("points", "from", "over", "target", ...).
type SpecError = param.Error

func specErr(field, format string, args ...any) *SpecError {
	return param.Errorf(field, format, args...)
}
