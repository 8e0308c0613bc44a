// Package engine holds what belongs to the engine as a whole rather than to one of its
// packages: its version, which reports and saved results carry so that a figure can be traced
// to the code that computed it.
package engine

// Version is the engine's release, in semantic versioning (https://semver.org). It changes
// whenever a computed figure may change for the same scenario.
const Version = "0.1.0"
