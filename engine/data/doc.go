// Package data reads what a practitioner brings: a measurement matrix, a list of its
// singular values (or of the eigenvalues of F^T F), and samples of the signal.
//
// The rotationally invariant theory of docs/method.md (sections 1 and 5) depends on the design
// only through the limiting law of the eigenvalues of F^T F, so a user's own matrix enters as
// its min(m, n) singular values together with its shape alpha = m/n (an empirical-sv design).
// A user's own signal enters as its samples (an empirical law, docs/method.md section 6), or as a
// Bernoulli-Gaussian or Gaussian-mixture law fitted to them by expectation maximization.
//
// Readers never trust the size of their input: every reader takes Limits, stops after reading
// at most Limits.MaxBytes+1 bytes, and checks a stated size against the caps before it
// allocates. Problems with the content are reported as *LineError values naming the line
// (counted from 1) and the reason.
package data
