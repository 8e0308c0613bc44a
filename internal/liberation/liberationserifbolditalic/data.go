// Package liberationserifbolditalic stands in for the "LiberationSerif-BoldItalic" TrueType font of the Liberation family,
// which hdrisk does not ship: its TTF is the data of Liberation Sans Regular, the one face
// the figures use (see the package comment of liberation).
package liberationserifbolditalic // import "codeberg.org/go-fonts/liberation/liberationserifbolditalic"

import "codeberg.org/go-fonts/liberation/liberationsansregular"

// TTF is the data of Liberation Sans Regular, standing in for "LiberationSerif-BoldItalic".
var TTF = liberationsansregular.TTF
