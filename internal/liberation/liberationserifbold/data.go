// Package liberationserifbold stands in for the "LiberationSerif-Bold" TrueType font of the Liberation family,
// which hdrisk does not ship: its TTF is the data of Liberation Sans Regular, the one face
// the figures use (see the package comment of liberation).
package liberationserifbold // import "codeberg.org/go-fonts/liberation/liberationserifbold"

import "codeberg.org/go-fonts/liberation/liberationsansregular"

// TTF is the data of Liberation Sans Regular, standing in for "LiberationSerif-Bold".
var TTF = liberationsansregular.TTF
