// Package liberationsansbolditalic stands in for the "LiberationSans-BoldItalic" TrueType font of the Liberation family,
// which hdrisk does not ship: its TTF is the data of Liberation Sans Regular, the one face
// the figures use (see the package comment of liberation).
package liberationsansbolditalic // import "codeberg.org/go-fonts/liberation/liberationsansbolditalic"

import "codeberg.org/go-fonts/liberation/liberationsansregular"

// TTF is the data of Liberation Sans Regular, standing in for "LiberationSans-BoldItalic".
var TTF = liberationsansregular.TTF
