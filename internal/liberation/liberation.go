// Copyright ©2020 The go-fonts Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package liberation holds TTF data of the Liberation fonts.
//
// This copy of codeberg.org/go-fonts/liberation v0.5.0 (the go.mod of hdrisk replaces the
// module with it) ships one face, Liberation Sans Regular: the only face the figures of
// hdrisk use (engine/plot sets every text in it). gonum/plot registers all twelve faces of
// the family at start-up, which would put eleven unused fonts (4 MB) into the page; the
// other packages here hand over the Sans Regular data under their own names instead.
package liberation // import "codeberg.org/go-fonts/liberation"
