// Package liberationmonoregular stands in for the "LiberationMono-Regular" TrueType font of the Liberation family,
// which hdrisk does not ship: its TTF is the data of Liberation Sans Regular, the one face
// the figures use (see the package comment of liberation).
package liberationmonoregular // import "codeberg.org/go-fonts/liberation/liberationmonoregular"

import "codeberg.org/go-fonts/liberation/liberationsansregular"

// TTF is the data of Liberation Sans Regular, standing in for "LiberationMono-Regular".
var TTF = liberationsansregular.TTF
