package ui

import (
	"fmt"

	"hdrisk/engine/data"
	"hdrisk/protocol"
)

// UserMatrix is the user's own matrix as the data tab read it, kept once "Use as the design"
// made its spectrum the design: the check view runs trials with it held fixed, and the
// editor keeps m/n at its shape while Locked.
type UserMatrix struct {
	Name       string // the file's name; "" for pasted text
	Text       string // the text read, as the worker reads it again for a check
	Rows, Cols int
	MaxBytes   int64 // the cap the text was read under
	// Locked keeps m/n at Rows/Cols: the design is the matrix's own. Unlocking frees m/n for
	// a design with the same singular values at another sampling ratio, which is no longer
	// the matrix; the check with the matrix itself is then off.
	Locked bool
}

// Label names the matrix for the page: "name (m x n)".
func (u *UserMatrix) Label() string {
	name := u.Name
	if name == "" {
		name = "the pasted matrix"
	}
	return fmt.Sprintf("%s (%d × %d)", name, u.Rows, u.Cols)
}

// MatrixDesign returns the user's matrix when the design is its own (the empirical-sv design
// made from it, m/n locked to its shape); nil otherwise.
func (m *Model) MatrixDesign() *UserMatrix {
	if m == nil || m.Matrix == nil || !m.Matrix.Locked || m.Kind("design") != "empirical-sv" {
		return nil
	}
	return m.Matrix
}

// alphaLocked reports whether f is the design's m/n and the design is the user's matrix.
func (m *Model) alphaLocked(f Field) bool {
	return f.Path == "design.alpha" && m.MatrixDesign() != nil
}

// alphaLockNote is the help of a locked m/n.
func (m *Model) alphaLockNote() string {
	u := m.MatrixDesign()
	if u == nil {
		return ""
	}
	return fmt.Sprintf(" Locked: m/n follows the matrix %s; unlock it in the data tab.", u.Label())
}

// DataLimits states the limits that protect the page and the machine from what a file may
// ask for: the readers' caps, the page's file sizes and the longest list.
func DataLimits() string {
	l := data.DefaultLimits()
	return fmt.Sprintf("Limits that protect this page: a matrix of at most %d × %d (%d entries) in at most %d MB of text; lists of at most %d values in %d MB; binary files (spreadsheets, images, archives) are refused by their first bytes. A computation that reports no progress for %v, or runs %v in all, is stopped.",
		l.MaxRows, l.MaxCols, l.MaxEntries, MaxMatrixBytes>>20, protocol.MaxListValues, MaxListBytes>>20, protocol.JobStallLimit, protocol.JobRunLimit)
}
