// Package liberationmonoitalic stands in for the "LiberationMono-Italic" TrueType font of the Liberation family,
// which hdrisk does not ship: its TTF is the data of Liberation Sans Regular, the one face
// the figures use (see the package comment of liberation).
package liberationmonoitalic // import "codeberg.org/go-fonts/liberation/liberationmonoitalic"

import "codeberg.org/go-fonts/liberation/liberationsansregular"

// TTF is the data of Liberation Sans Regular, standing in for "LiberationMono-Italic".
var TTF = liberationsansregular.TTF
