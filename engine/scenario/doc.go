// Package scenario holds the scenario: one question put to the engine (a design, a signal
// law, a noise level, a penalty, and what was last studied), its file format (contract 1 of
// the architecture, "kind": "hdrisk.scenario", version 1) and its share links (contract 2,
// "s1." codes).
//
// Everything that comes from outside is read strictly and refused with a value that names
// the field: Decode and DecodeLink never trust their input, cap its size before the work
// that size would cost, and report a *FieldError (a JSON path and a reason) or a *LinkError.
// A decoded scenario re-encodes to a canonical form that decodes to the same value, so a
// file or a link means exactly one scenario.
//
// The shapes of the design, the laws of the signal and the penalty kinds, with their
// parameters, names, units and ranges, are read from the registries of packages design,
// signal and penalty. Adding a law there makes it readable, writable, sweepable (Paths) and
// buildable (Problem) here without an edit.
//
// Conventions are those of docs/method.md: alpha = m/n, the design's scale fixes E_nu[lambda]
// (rows: alpha), the noise variance Delta is per measurement, and the error is per entry
// of x0.
package scenario
