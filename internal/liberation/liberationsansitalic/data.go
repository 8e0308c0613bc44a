// Package liberationsansitalic stands in for the "LiberationSans-Italic" TrueType font of the Liberation family,
// which hdrisk does not ship: its TTF is the data of Liberation Sans Regular, the one face
// the figures use (see the package comment of liberation).
package liberationsansitalic // import "codeberg.org/go-fonts/liberation/liberationsansitalic"

import "codeberg.org/go-fonts/liberation/liberationsansregular"

// TTF is the data of Liberation Sans Regular, standing in for "LiberationSans-Italic".
var TTF = liberationsansregular.TTF
