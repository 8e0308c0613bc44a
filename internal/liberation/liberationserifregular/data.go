// Package liberationserifregular stands in for the "LiberationSerif-Regular" TrueType font of the Liberation family,
// which hdrisk does not ship: its TTF is the data of Liberation Sans Regular, the one face
// the figures use (see the package comment of liberation).
package liberationserifregular // import "codeberg.org/go-fonts/liberation/liberationserifregular"

import "codeberg.org/go-fonts/liberation/liberationsansregular"

// TTF is the data of Liberation Sans Regular, standing in for "LiberationSerif-Regular".
var TTF = liberationsansregular.TTF
