// Package liberationmonobold stands in for the "LiberationMono-Bold" TrueType font of the Liberation family,
// which hdrisk does not ship: its TTF is the data of Liberation Sans Regular, the one face
// the figures use (see the package comment of liberation).
package liberationmonobold // import "codeberg.org/go-fonts/liberation/liberationmonobold"

import "codeberg.org/go-fonts/liberation/liberationsansregular"

// TTF is the data of Liberation Sans Regular, standing in for "LiberationMono-Bold".
var TTF = liberationsansregular.TTF
