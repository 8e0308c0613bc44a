// Package liberationserifitalic stands in for the "LiberationSerif-Italic" TrueType font of the Liberation family,
// which hdrisk does not ship: its TTF is the data of Liberation Sans Regular, the one face
// the figures use (see the package comment of liberation).
package liberationserifitalic // import "codeberg.org/go-fonts/liberation/liberationserifitalic"

import "codeberg.org/go-fonts/liberation/liberationsansregular"

// TTF is the data of Liberation Sans Regular, standing in for "LiberationSerif-Italic".
var TTF = liberationsansregular.TTF
