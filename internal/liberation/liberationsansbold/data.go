// Package liberationsansbold stands in for the "LiberationSans-Bold" TrueType font of the Liberation family,
// which hdrisk does not ship: its TTF is the data of Liberation Sans Regular, the one face
// the figures use (see the package comment of liberation).
package liberationsansbold // import "codeberg.org/go-fonts/liberation/liberationsansbold"

import "codeberg.org/go-fonts/liberation/liberationsansregular"

// TTF is the data of Liberation Sans Regular, standing in for "LiberationSans-Bold".
var TTF = liberationsansregular.TTF
