package simulate

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/mat"

	"hdrisk/engine/design"
	"hdrisk/engine/signal"
)

// Factors chooses how the orthogonal factors U and V of F = U S V^T are drawn.
type Factors int

const (
	// FactorsFast uses Fast structured transforms: O(n log n) per product, no factorization,
	// the way to large n. It is the zero value.
	FactorsFast Factors = iota
	// FactorsQR draws Haar matrices by QR with the sign fix (HaarQR): O(n^3).
	FactorsQR
	// FactorsHouseholder draws Haar matrices as products of reflections (HaarHouseholder): O(n^2).
	FactorsHouseholder
)

func (f Factors) String() string {
	switch f {
	case FactorsFast:
		return "fast"
	case FactorsQR:
		return "haar-qr"
	case FactorsHouseholder:
		return "haar-householder"
	}
	return fmt.Sprintf("Factors(%d)", int(f))
}

// ParseFactors reads "fast", "haar-qr" or "haar-householder".
func ParseFactors(s string) (Factors, error) {
	for _, f := range []Factors{FactorsFast, FactorsQR, FactorsHouseholder} {
		if f.String() == s {
			return f, nil
		}
	}
	return 0, paramErr("factors", "%q is not one of fast, haar-qr, haar-householder", s)
}

// Spectrum chooses where the singular values of an instance come from.
type Spectrum int

const (
	// Quantiles takes the law's quantiles (design.Law.SingularValues): less variance between
	// trials; an empirical design of matching size uses exactly its own values. The zero value.
	Quantiles Spectrum = iota
	// Draws takes min(m, n) i.i.d. draws from the law, made by sampling uniformly from its
	// quantiles at eight times the resolution.
	Draws
)

func (s Spectrum) String() string {
	if s == Draws {
		return "draws"
	}
	return "quantiles"
}

// Caps on the sizes an instance may take, so that a request cannot exhaust memory or time.
const (
	MaxN            = 1_000_000  // unknowns n, with fast factors and a matrix-free solver
	MaxM            = 1_000_000  // measurements m
	MaxDenseEntries = 25_000_000 // m n for a design held in full (coordinate descent, Gaussian entries): 200 MB
	MaxHaarN        = 4000       // order of a Haar factor drawn with QR or Householder reflections
	MaxSVDN         = 2000       // order of a Gaussian design factorized for VAMP
	MaxTrials       = 10_000
)

// Instance is one finite problem y = F x0 + w.
type Instance struct {
	M, N  int
	X0, Y []float64
	// Dense holds F in full when it was drawn entry by entry (Gaussian entries) or formed for a
	// solver that reads columns; SVD holds its factors when it was drawn as U S V^T or
	// factorized for VAMP. At least one is set.
	Dense *Matrix
	SVD   *SVD
	// Lipschitz is the largest eigenvalue of F^T F when known (0: estimated when needed).
	Lipschitz float64
}

// DesignDraw says how to draw the design of an instance.
type DesignDraw struct {
	Law design.Law
	// GaussianEntries draws F entry by entry, i.i.d. N(0, Mean/m), so that E[F^T F] = Mean I
	// matches the law (the Marchenko-Pastur shape); otherwise F = U S V^T. Past
	// MaxDenseEntries, with fast factors, a Gaussian design is drawn as U S V^T with the
	// Marchenko-Pastur spectrum instead, which has the same law up to that of its spectrum
	// (a Gaussian matrix is rotationally invariant); Entries reports which.
	GaussianEntries bool
	Factors         Factors
	Rounds          int // rounds of a Fast factor; 0 means DefaultRounds
	Spectrum        Spectrum
}

// Rows returns m = round(alpha n), at least 1.
func Rows(alpha float64, n int) int {
	return max(1, int(math.Round(alpha*float64(n))))
}

// Entries reports whether a design with n unknowns is drawn entry by entry.
func (d DesignDraw) Entries(n int) bool {
	if !d.GaussianEntries {
		return false
	}
	m := Rows(d.Law.Alpha(), n)
	return d.Factors != FactorsFast || float64(m)*float64(n) <= MaxDenseEntries
}

// checkSize refuses sizes past the caps, naming the cap. needDense is set for a solver that
// reads columns; needSVD for one that needs the factors of F.
func checkSize(d DesignDraw, n int, needDense, needSVD bool) error {
	if n < 1 {
		return paramErr("n", "%d: need at least 1 unknown", n)
	}
	if n > MaxN {
		return paramErr("n", "%d is past the cap of %d unknowns", n, MaxN)
	}
	m := Rows(d.Law.Alpha(), n)
	if m > MaxM {
		return paramErr("n", "m = round(alpha n) = %d is past the cap of %d measurements", m, MaxM)
	}
	entries := d.Entries(n)
	if (needDense || entries) && float64(m)*float64(n) > MaxDenseEntries {
		return paramErr("n", "a design held in full needs m n = %d x %d entries, past the cap of %d (use fast factors with the prox or vamp solver)", m, n, MaxDenseEntries)
	}
	if !entries && d.Factors != FactorsFast && max(m, n) > MaxHaarN {
		return paramErr("n", "Haar factors of order %d are past the cap of %d (use fast factors)", max(m, n), MaxHaarN)
	}
	if entries && needSVD && max(m, n) > MaxSVDN {
		return paramErr("n", "the SVD of a Gaussian design of order %d is past the cap of %d (use fast factors, or the cd or prox solver)", max(m, n), MaxSVDN)
	}
	return nil
}

// Draw draws an instance with n unknowns: x0 from sig, F from d, and w ~ N(0, noise I_m),
// all from rng, in that order.
func Draw(rng *rand.Rand, d DesignDraw, sig signal.Law, noise float64, n int) (*Instance, error) {
	if d.Law == nil || sig == nil {
		return nil, paramErr("problem", "missing design or signal law")
	}
	if !(noise >= 0) || math.IsInf(noise, 0) {
		return nil, paramErr("noise", "variance %g must be finite and >= 0", noise)
	}
	if err := checkSize(d, n, false, false); err != nil {
		return nil, err
	}
	m := Rows(d.Law.Alpha(), n)
	inst := &Instance{M: m, N: n, X0: sig.Sample(rng, n), Y: make([]float64, m)}
	if d.Entries(n) {
		sd := math.Sqrt(d.Law.Mean() / float64(m))
		a := &Matrix{Rows: m, Cols: n, Data: normals(rng, m*n)}
		for i := range a.Data {
			a.Data[i] *= sd
		}
		inst.Dense = a
		a.Mul(inst.Y, inst.X0)
	} else {
		s := singularValues(rng, d, m, n)
		u, v := orthogonalFactor(rng, d, m), orthogonalFactor(rng, d, n)
		inst.SVD = NewSVD(u, v, s)
		inst.SVD.Mul(inst.Y, inst.X0)
	}
	sd := math.Sqrt(noise)
	for i := range inst.Y {
		inst.Y[i] += sd * rng.NormFloat64()
	}
	return inst, nil
}

func orthogonalFactor(rng *rand.Rand, d DesignDraw, n int) Orthogonal {
	switch d.Factors {
	case FactorsQR:
		return HaarQR(rng, n)
	case FactorsHouseholder:
		return HaarHouseholder(rng, n)
	}
	r := d.Rounds
	if r <= 0 {
		r = DefaultRounds
	}
	return NewFast(rng, n, r)
}

func singularValues(rng *rand.Rand, d DesignDraw, m, n int) []float64 {
	if d.Spectrum != Draws {
		return d.Law.SingularValues(m, n)
	}
	const k = 8
	grid := d.Law.SingularValues(k*m, k*n)
	s := make([]float64, min(m, n))
	for i := range s {
		s[i] = grid[rng.IntN(len(grid))]
	}
	slices.SortFunc(s, func(a, b float64) int { return -cmpFloat(a, b) })
	return s
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// dense returns F in full, forming it from the factors when needed (at most MaxDenseEntries).
func (inst *Instance) dense() (*Matrix, error) {
	if inst.Dense != nil {
		return inst.Dense, nil
	}
	if float64(inst.M)*float64(inst.N) > MaxDenseEntries {
		return nil, paramErr("n", "coordinate descent needs the design in full, m n = %d x %d entries, past the cap of %d (use the prox or vamp solver)", inst.M, inst.N, MaxDenseEntries)
	}
	inst.Dense = DenseOf(inst.SVD)
	return inst.Dense, nil
}

// svd returns the factors of F, computing the SVD of a design drawn entry by entry (gonum's
// LAPACK port) when needed.
func (inst *Instance) svd() (*SVD, error) {
	if inst.SVD != nil {
		return inst.SVD, nil
	}
	a := inst.Dense
	t := mat.NewDense(a.Cols, a.Rows, a.Data)
	var f mat.SVD
	if !f.Factorize(t.T(), mat.SVDFull) {
		return nil, paramErr("design", "the singular value decomposition of the %d x %d instance did not converge", a.Rows, a.Cols)
	}
	var u, v mat.Dense
	f.UTo(&u)
	f.VTo(&v)
	inst.SVD = NewSVD(&DenseOrthogonal{Q: &u}, &DenseOrthogonal{Q: &v}, f.Values(nil))
	return inst.SVD, nil
}
