package simulate

import (
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/dsp/fourier"
)

// Fast is a structured n x n orthogonal matrix whose products cost O(n log n): a few rounds of
// random signs, a random permutation and an orthonormal type-I discrete cosine transform,
//
//	Q = C P_R D_R ... C P_1 D_1.
//
// Such randomized transforms are used in place of Haar matrices in compressed sensing and message
// passing because estimators run on them show the errors of Haar designs at large n (common
// practice; the package tests compare the two within error bars). The transform is done by
// gonum's FFTPACK port, fast when its length minus one has only small prime factors, so the
// cosine transform acts on a block of the first k coordinates, k - 1 a power of two times a
// small odd factor, with k >= 8n/9;
// the permutations of later rounds move every coordinate through the block.
type Fast struct {
	n, k  int
	signs [][]float64
	perms [][]int
	dct   *fourier.DCT
	buf   []float64
	w     []float64 // the orthonormal weights of the type-I transform
}

// DefaultRounds is the number of sign-permute-transform rounds of a Fast matrix.
const DefaultRounds = 3

// NewFast draws a Fast orthogonal matrix of order n with the given number of rounds (at least 1;
// DefaultRounds mixes well in the package tests).
//
// Special cases are: n < 3 has no useful cosine transform and gives a random signed permutation.
func NewFast(rng *rand.Rand, n, rounds int) *Fast {
	if rounds < 1 {
		rounds = 1
	}
	f := &Fast{n: n, k: smoothBlock(n), buf: make([]float64, n)}
	for r := 0; r < rounds; r++ {
		s := make([]float64, n)
		for i := range s {
			s[i] = 1
			if rng.Uint64()&1 == 1 {
				s[i] = -1
			}
		}
		f.signs = append(f.signs, s)
		f.perms = append(f.perms, rng.Perm(n))
	}
	if f.k >= 3 {
		f.mixAll()
		f.dct = fourier.NewDCT(f.k)
		f.w = make([]float64, f.k)
		// FFTPACK's cost: y_j = x_0 + (-1)^j x_{k-1} + 2 sum_{i=1}^{k-2} x_i cos(pi i j/(k-1)).
		// The orthonormal type-I transform is sqrt(2/(k-1)) w_j sum_i w_i x_i cos(.), with
		// w = 1/sqrt(2) at both ends and 1 inside; it is symmetric and its own inverse.
		for i := range f.w {
			f.w[i] = 1
		}
		f.w[0], f.w[f.k-1] = math.Sqrt2/2, math.Sqrt2/2
	}
	return f
}

// mixAll makes every coordinate pass through the cosine block in at least one round. Left to
// chance, a share (1 - k/n)^rounds of them never would (a few at n = 1e4): Q then holds a
// signed column of the identity, the design a column along one singular vector, and VAMP
// stalls on it. Such coordinates are swapped, in the last round's permutation, with ones
// already mixed that the last round puts into the block; the rest of the draw is unchanged.
// With one round there is nothing mixed to swap with, and the matrix is left as drawn.
func (f *Fast) mixAll() {
	at := make([]int, f.n) // at[i]: the original coordinate now at position i
	for i := range at {
		at[i] = i
	}
	mixed := make([]bool, f.n)
	next := make([]int, f.n)
	last := len(f.perms) - 1
	for r, p := range f.perms {
		for i, pi := range p {
			next[i] = at[pi]
		}
		at, next = next, at
		if r == last {
			break
		}
		for _, c := range at[:f.k] {
			mixed[c] = true
		}
	}
	p := f.perms[last]
	j := 0
	for i := f.k; i < f.n; i++ {
		if mixed[at[i]] {
			continue
		}
		for j < f.k && !mixed[at[j]] {
			j++
		}
		if j == f.k {
			return // one round: nothing was mixed before the last
		}
		// Positions i and j exchange their sources; j's coordinate was mixed before, so it
		// stays mixed outside the block.
		p[i], p[j] = p[j], p[i]
		at[i], at[j] = at[j], at[i]
		j++
	}
}

// smoothBlock returns the largest k <= n with k - 1 = 2^a q, q one of the odd 5-smooth numbers
// up to 45: FFTPACK's passes for 4 and 2 are its fastest, and these sizes leave at most one
// number in nine out of the block (consecutive candidates differ by a factor of at most 9/8).
func smoothBlock(n int) int {
	if n < 3 {
		return n
	}
	best := 2
	for _, q := range []int{1, 3, 5, 9, 15, 25, 27, 45} {
		for v := q; v+1 <= n; v *= 2 {
			best = max(best, v+1)
		}
	}
	return best
}

// Dim returns the order of the matrix.
func (f *Fast) Dim() int { return f.n }

func (f *Fast) cosine(x []float64) {
	if f.dct == nil {
		return
	}
	b := x[:f.k]
	for i := range b {
		if i == 0 || i == f.k-1 {
			b[i] *= f.w[i]
		} else {
			b[i] *= 0.5
		}
	}
	f.dct.Transform(b, b)
	c := math.Sqrt(2 / float64(f.k-1))
	for i := range b {
		b[i] *= c * f.w[i]
	}
}

// Mul sets dst = Q x.
func (f *Fast) Mul(dst, x []float64) {
	copy(dst, x)
	for r := range f.signs {
		s, p := f.signs[r], f.perms[r]
		for i, pi := range p {
			f.buf[i] = s[pi] * dst[pi]
		}
		copy(dst, f.buf)
		f.cosine(dst)
	}
}

// MulT sets dst = Q^T x.
func (f *Fast) MulT(dst, x []float64) {
	copy(dst, x)
	for r := len(f.signs) - 1; r >= 0; r-- {
		f.cosine(dst)
		s, p := f.signs[r], f.perms[r]
		for i, pi := range p {
			f.buf[pi] = s[pi] * dst[i]
		}
		copy(dst, f.buf)
	}
}
