// Package liberationmonobolditalic stands in for the "LiberationMono-BoldItalic" TrueType font of the Liberation family,
// which hdrisk does not ship: its TTF is the data of Liberation Sans Regular, the one face
// the figures use (see the package comment of liberation).
package liberationmonobolditalic // import "codeberg.org/go-fonts/liberation/liberationmonobolditalic"

import "codeberg.org/go-fonts/liberation/liberationsansregular"

// TTF is the data of Liberation Sans Regular, standing in for "LiberationMono-BoldItalic".
var TTF = liberationsansregular.TTF
