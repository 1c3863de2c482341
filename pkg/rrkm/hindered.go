package rrkm

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// HinderedRotor is a one-dimensional hindered internal rotor: a rigid top
// turning through the torsional angle φ against the periodic potential
//
//	V(φ) = (V0/2)·(1 − cos nφ) + Σ_j (Cos[j]/2)·(1 − cos((j+2)·n·φ)),
//
// n = Fold. Writing V_1 = V0 and V_{j+2} = Cos[j], the potential is
// Σ_h (V_h/2)(1 − cos hnφ): every term vanishes at φ = 0 and has the period
// 2π/n of the first, so V(0) = 0 and the n wells stay equivalent. V is
// measured from its minimum, at φ = 0: Validate rejects coefficients that
// make V negative anywhere. With Cos empty V0 is the barrier height.
//
// The levels solve −B·d²ψ/dφ² + V(φ)ψ = Eψ on 0 ≤ φ < 2π with periodic ψ,
// measured from the lowest level (the zero-point level is 0), like every
// other energy of this package.
//
// Symmetry number: a rotor whose top has σ indistinguishable orientations
// one turn apart by 2π/σ (σ = 3 for a methyl group) has each level counted
// with weight 1/σ, so that for V0 → 0 the partition function becomes the
// classical free rotor (1/σ)·sqrt(πkT/B) of Rotor with Dim 1. σ must divide
// n: the potential must be at least as symmetric as the top.
type HinderedRotor struct {
	// B is the rotational constant of the internal rotation in cm⁻¹, from
	// the reduced moment of inertia: B = 16.857629/I[amu Å²]
	// (units.RotConstFromInertia).
	B float64
	// V0 is the coefficient of the n-fold cosine in cm⁻¹; with Cos empty it
	// is the barrier height.
	V0 float64
	// Fold is n, the number of minima per revolution.
	Fold int
	// Symmetry is the rotor symmetry number σ; 0 means σ = Fold.
	Symmetry int
	// Cos are optional higher harmonics in cm⁻¹: Cos[j] multiplies
	// (1 − cos((j+2)·n·φ))/2, so Cos[0] is the 2n-fold term.
	Cos []float64
}

// Validate reports a rotor that cannot be solved, in one line.
func (h HinderedRotor) Validate() error {
	switch {
	case !(h.B > 0) || math.IsInf(h.B, 0):
		return fmt.Errorf("hindered rotor: rotational constant B = %v cm-1 must be positive", h.B)
	case !(h.V0 >= 0) || math.IsInf(h.V0, 0):
		return fmt.Errorf("hindered rotor: barrier V0 = %v cm-1 must be >= 0", h.V0)
	case h.Fold < 1:
		return fmt.Errorf("hindered rotor: fold n = %d must be at least 1", h.Fold)
	case h.Symmetry < 0:
		return fmt.Errorf("hindered rotor: symmetry number %d must be positive (0 means the fold, %d)", h.Symmetry, h.Fold)
	case h.Fold%h.sigma() != 0:
		return fmt.Errorf("hindered rotor: symmetry number %d does not divide the fold %d", h.Symmetry, h.Fold)
	}
	if len(h.Cos) > MaxHarmonics {
		return fmt.Errorf("hindered rotor: %d Fourier terms (at most %d)", len(h.Cos), MaxHarmonics)
	}
	for j, c := range h.Cos {
		if math.IsNaN(c) || math.IsInf(c, 0) {
			return fmt.Errorf("hindered rotor: cos[%d] = %v cm-1 is not a number", j, c)
		}
	}
	if len(h.Cos) > 0 {
		if vmin, at := h.potentialMin(); vmin < -1e-12*h.vsum() {
			return fmt.Errorf("hindered rotor: potential %.6g cm-1 at φ = %.4g rad is below V(0) = 0; the minimum must be at φ = 0", vmin, at)
		}
	}
	return nil
}

func (h HinderedRotor) sigma() int {
	if h.Symmetry == 0 {
		return h.Fold
	}
	return h.Symmetry
}

// harmonics returns V_h, h = 1..K: V0 followed by Cos.
func (h HinderedRotor) harmonics() []float64 {
	return append([]float64{h.V0}, h.Cos...)
}

// vsum is Σ|V_h|, a bound on the potential and on its coupling strength.
func (h HinderedRotor) vsum() float64 {
	s := 0.0
	for _, v := range h.harmonics() {
		s += math.Abs(v)
	}
	return s
}

// Potential returns V(φ) in cm⁻¹ at the torsion angle phi in radians.
func (h HinderedRotor) Potential(phi float64) float64 {
	v := 0.0
	for k, vh := range h.harmonics() {
		v += vh / 2 * (1 - math.Cos(float64((k+1)*h.Fold)*phi))
	}
	return v
}

// potentialMin samples V on one period, 512 points per harmonic, and
// returns its least value and where it lies; with the curvature at φ = 0
// it catches a potential that dips below zero.
func (h HinderedRotor) potentialMin() (float64, float64) {
	k := len(h.Cos) + 1
	n := 512 * k
	best, at := math.Inf(1), 0.0
	for i := range n {
		phi := 2 * math.Pi / float64(h.Fold) * float64(i) / float64(n)
		if v := h.Potential(phi); v < best {
			best, at = v, phi
		}
	}
	if c := h.curvature(); c < 0 {
		// V ≈ cφ²/2 near 0: negative just beside the origin.
		d := 1e-3 / float64(h.Fold*k)
		if v := h.Potential(d); v < best {
			best, at = v, d
		}
	}
	return best, at
}

// curvature returns V″(0) = (n²/2)·Σ_h h²·V_h in cm⁻¹ rad⁻².
func (h HinderedRotor) curvature() float64 {
	c := 0.0
	for k, vh := range h.harmonics() {
		hn := float64((k + 1) * h.Fold)
		c += vh * hn * hn / 2
	}
	return c
}

// HarmonicFrequency returns the harmonic frequency of the torsion at the
// bottom of a well in cm⁻¹, ν = sqrt(2B·V″(0)); for the single cosine
// ν = n·sqrt(V0·B).
func (h HinderedRotor) HarmonicFrequency() float64 {
	return math.Sqrt(2 * h.B * math.Max(h.curvature(), 0))
}

// Basis limits. The single-cosine blocks are tridiagonal and cost O(N²);
// series blocks go through a dense symmetric eigensolver, O(N³), about 3 s
// at the limit.
const (
	maxTridiagonalBlock = 20000
	maxDenseBlock       = 1500
)

// MaxHarmonics bounds the number of higher cosine terms (len(Cos)) Validate
// accepts. A few dozen terms describe any torsional potential; each term
// widens the band of the Hamiltonian and the sampling of the potential
// (Validate checks V ≥ 0 on 512 points per term, so its cost grows as the
// square of the number of terms).
const MaxHarmonics = 32

// BasisSize returns the largest block of the Hamiltonian that Levels(emax)
// diagonalises first, and the most the solver takes for this rotor's
// potential (20000 functions for a single cosine, 1500 for a series): a
// block above the limit makes Levels fail with ErrTooLarge. It solves
// nothing, so that a caller can check a rotor against the energies a
// calculation will need before any work. Levels may enlarge the basis
// further if the first one does not converge; it rarely does.
func (h HinderedRotor) BasisSize(emax float64) (size, limit int) {
	limit = maxTridiagonalBlock
	if len(h.Cos) > 0 {
		limit = maxDenseBlock
	}
	if h.Validate() != nil || !(emax >= 0) || math.IsInf(emax, 0) {
		return math.MaxInt, limit
	}
	m := h.basisFor(emax)
	m += max(2*h.Fold*(len(h.Cos)+1), m/4)
	return h.maxBlock(m), limit
}

// checkBasis returns an ErrTooLarge error if a block of the basis |m| ≤ M
// is beyond what the solver takes.
func (h HinderedRotor) checkBasis(mMax int) error {
	limit := maxTridiagonalBlock
	if len(h.Cos) > 0 {
		limit = maxDenseBlock
	}
	if size := h.maxBlock(mMax); size > limit {
		return fmt.Errorf("%w: hindered rotor: basis block of %d functions with %d Fourier terms (at most %d); lower the ceiling", ErrTooLarge, size, len(h.Cos), limit)
	}
	return nil
}

// maxBlock returns the largest matrix the eigensolver gets in the basis
// |m| ≤ M: a block, or half of one for the blocks that split into mirror
// sectors.
func (h HinderedRotor) maxBlock(mMax int) int {
	size := 0
	n := h.Fold
	for r := 0; 2*r <= n; r++ {
		s := h.blockSize(r, mMax)
		if r == 0 || 2*r == n {
			s = (s + 1) / 2 // the mirror sectors
		}
		size = max(size, s)
	}
	return size
}

// blockSize is the number of functions e^(imφ) with m ≡ r (mod n), |m| ≤ M.
func (h HinderedRotor) blockSize(r, mMax int) int {
	n := h.Fold
	kmin := -((mMax + r) / n)
	kmax := (mMax - r) / n
	return kmax - kmin + 1
}

// Levels returns the energy levels of the rotor from 0 (its lowest level)
// to emax cm⁻¹ in increasing order, each with its degeneracy divided by the
// symmetry number σ. Levels that coincide to 1e-9 cm⁻¹ + 1e-13·E (degenerate
// to rounding, like ±m of a free rotor) are merged.
//
// The Hamiltonian is diagonalised in the free-rotor basis e^(imφ),
// |m| ≤ M, where it is real and symmetric: B·m² + Σ_h V_h/2 on the diagonal
// and −V_h/4 between m and m ± hn. It splits into n blocks by m mod n; the
// blocks r and n − r are mirror images (m → −m) with equal spectra, so only
// r ≤ n/2 are solved, and the blocks r = 0 and r = n/2, their own mirror
// images, split further into cos and sin functions. M is chosen from the
// decay of the eigenvectors beyond the classical turning point and checked
// by re-solving with a basis 25 % larger; levels below emax agree between
// the two to 1e-9 cm⁻¹ plus rounding, or M grows.
func (h HinderedRotor) Levels(emax float64) ([]Level, error) {
	l, _, err := h.levels(emax)
	return l, err
}

// levels is Levels, also returning the basis limit M used.
func (h HinderedRotor) levels(emax float64) ([]Level, int, error) {
	if err := h.Validate(); err != nil {
		return nil, 0, err
	}
	if !(emax >= 0) || math.IsInf(emax, 0) {
		return nil, 0, fmt.Errorf("hindered rotor: level ceiling %v cm-1 must be >= 0 and finite", emax)
	}
	m := h.basisFor(emax)
	for range 8 {
		m1 := m + max(2*h.Fold*(len(h.Cos)+1), m/4)
		if err := h.checkBasis(m1); err != nil {
			return nil, 0, err // fail before solving the smaller basis
		}
		lo, err := h.spectrum(m)
		if err != nil {
			return nil, 0, err
		}
		hi, err := h.spectrum(m1)
		if err != nil {
			return nil, 0, err
		}
		if hi.agrees(lo, emax, h.roundoff(m1)) {
			return hi.levels(emax, h.sigma()), m1, nil
		}
		m = 2 * m1
	}
	return nil, 0, fmt.Errorf("hindered rotor: levels to %v cm-1 did not converge with the basis size", emax)
}

// levelsInBasis returns the levels to emax in the basis |m| ≤ M, for tests.
func (h HinderedRotor) levelsInBasis(emax float64, m int) ([]Level, error) {
	s, err := h.spectrum(m)
	if err != nil {
		return nil, err
	}
	return s.levels(emax, h.sigma()), nil
}

// roundoff bounds the rounding error of an eigenvalue of a block with
// |m| ≤ M: 64 ε·‖H‖, ‖H‖ ≤ B·M² + 2Σ|V_h|.
func (h HinderedRotor) roundoff(m int) float64 {
	norm := h.B*float64(m)*float64(m) + 2*h.vsum()
	return 64 * 0x1p-52 * norm
}

// basisFor returns a basis limit M for levels up to emax above the lowest.
// The lowest level lies below ⟨0|H|0⟩ = Σ V_h/2 (variational principle), so
// the levels wanted lie below E* = Σ V_h/2 + emax. Beyond the turning point
// m_t, B·m_t² = E* + Σ|V_h|, an eigenvector's components fall by about
// (Σ|V_h|/4)/(B·m² − E*) for every hop of up to K·n in m (the eigenvalue
// equation read as a recursion for the decaying tail: an estimate, which
// levels checks); M is where they have fallen by 1e-12, so the eigenvalue
// error, second order in that, is far below rounding.
func (h HinderedRotor) basisFor(emax float64) int {
	vbar := 0.0
	for _, v := range h.harmonics() {
		vbar += v / 2
	}
	es := vbar + emax
	vs := h.vsum()
	m := math.Sqrt((es + vs) / h.B)
	// Past this the blocks are beyond any solver limit: stop here, before
	// the tail's walk (a step per hop) and the int conversion run away
	// with a barrier of 1e20 cm⁻¹; checkBasis then refuses the basis before
	// anything is allocated.
	if tooLarge := float64(4 * (maxTridiagonalBlock + 1) * h.Fold); !(m < tooLarge) {
		return int(tooLarge)
	}
	hop := float64(h.Fold * (len(h.Cos) + 1))
	for prod := 1.0; prod > 1e-12 && vs > 0; {
		m += hop
		prod *= vs / 4 / (h.B*m*m - es)
	}
	return int(math.Ceil(m)) + h.Fold
}

// spectrum holds the eigenvalues of the blocks r = 0..n/2, each sorted, with
// the number of blocks each stands for (2 for a mirror pair, else 1).
type spectrum struct {
	blocks [][]float64
	mult   []float64
	ground float64
}

// spectrum diagonalises the blocks in the basis |m| ≤ M.
func (h HinderedRotor) spectrum(m int) (*spectrum, error) {
	if err := h.checkBasis(m); err != nil {
		return nil, err // before solving any block
	}
	n := h.Fold
	s := &spectrum{ground: math.Inf(1)}
	for r := 0; 2*r <= n; r++ {
		e, err := h.block(r, m)
		if err != nil {
			return nil, err
		}
		mult := 2.0
		if r == 0 || 2*r == n {
			mult = 1
		}
		s.blocks = append(s.blocks, e)
		s.mult = append(s.mult, mult)
		s.ground = math.Min(s.ground, e[0])
	}
	return s, nil
}

// block returns the sorted eigenvalues of the block of basis functions
// e^(imφ) with m ≡ r (mod n), |m| ≤ M. Ordered by m, the block matrix is
// banded: B·m² + Σ V_h/2 on the diagonal and −V_h/4 at index distance h.
// The blocks r = 0 and r = n/2 map onto themselves under m → −m (index
// i → N−1−i), so their matrix is centrosymmetric and splits into the
// vectors even and odd under the mirror (the cos and sin functions), each
// half the size.
func (h HinderedRotor) block(r, mMax int) ([]float64, error) {
	n := h.Fold
	kmin := -((mMax + r) / n) // least k with r + k·n ≥ −M
	kmax := (mMax - r) / n
	size := kmax - kmin + 1
	vh := h.harmonics()
	vbar := 0.0
	for _, v := range vh {
		vbar += v / 2
	}
	diag := make([]float64, size)
	for i := range diag {
		mi := float64(r + (kmin+i)*n)
		diag[i] = h.B*mi*mi + vbar
	}
	at := func(i, j int) float64 {
		d := i - j
		if d < 0 {
			d = -d
		}
		switch {
		case d == 0:
			return diag[i]
		case d <= len(vh):
			return -vh[d-1] / 4
		}
		return 0
	}
	if r != 0 && 2*r != n {
		return h.solve(size, at)
	}
	// Mirror sectors. Even vectors (δ_i + δ_{N−1−i})/√2, i < p, and for odd
	// N the middle δ_p; odd vectors (δ_i − δ_{N−1−i})/√2. By centrosymmetry
	// ⟨i±|H|j±⟩ = H(i,j) ± H(i,N−1−j), and ⟨i+|H|p⟩ = √2·H(i,p).
	p := size / 2
	sector := func(sign float64) func(i, j int) float64 {
		return func(i, j int) float64 {
			switch {
			case i == p && j == p:
				return at(p, p)
			case i == p:
				return math.Sqrt2 * at(j, p)
			case j == p:
				return math.Sqrt2 * at(i, p)
			}
			return at(i, j) + sign*at(i, size-1-j)
		}
	}
	even, err := h.solve(p+size%2, sector(1))
	if err != nil {
		return nil, err
	}
	odd, err := h.solve(p, sector(-1))
	if err != nil {
		return nil, err
	}
	out := append(even, odd...)
	slices.Sort(out)
	return out, nil
}

// solve returns the sorted eigenvalues of the size×size symmetric matrix
// with elements at(i, j): by gonum's LAPACK Dsterf (the implicit QL/QR step
// mat.EigenSym applies after reducing a matrix to tridiagonal form) when
// the potential is a single cosine and the matrix is tridiagonal, else by
// mat.EigenSym.
func (h HinderedRotor) solve(size int, at func(i, j int) float64) ([]float64, error) {
	if size == 0 {
		return nil, nil
	}
	if len(h.Cos) == 0 {
		if size > maxTridiagonalBlock {
			return nil, fmt.Errorf("%w: hindered rotor: basis block of %d functions (at most %d); lower the ceiling", ErrTooLarge, size, maxTridiagonalBlock)
		}
		d := make([]float64, size)
		e := make([]float64, size-1)
		for i := range d {
			d[i] = at(i, i)
			if i+1 < size {
				e[i] = at(i, i+1)
			}
		}
		if !(gonum.Implementation{}).Dsterf(size, d, e) {
			return nil, fmt.Errorf("hindered rotor: tridiagonal eigensolver did not converge (%d functions)", size)
		}
		return d, nil
	}
	if size > maxDenseBlock {
		return nil, fmt.Errorf("%w: hindered rotor: basis block of %d functions with %d Fourier terms (at most %d); lower the ceiling", ErrTooLarge, size, len(h.Cos), maxDenseBlock)
	}
	// Banded with half-width K: in the mirror sectors the reflected terms
	// H(i, N−1−j) occur only for i, j within K of the middle, |i−j| < K.
	band := len(h.Cos) + 1
	a := mat.NewSymDense(size, nil)
	for i := range size {
		for j := i; j < size && j <= i+band; j++ {
			a.SetSym(i, j, at(i, j))
		}
	}
	var es mat.EigenSym
	if !es.Factorize(a, false) {
		return nil, fmt.Errorf("hindered rotor: symmetric eigensolver did not converge (%d functions)", size)
	}
	return es.Values(nil), nil
}

// agrees reports whether the eigenvalues of s within emax of its ground
// level match those of a smaller basis t to 1e-9 cm⁻¹ + tol. Truncating the
// basis only raises eigenvalues (variational principle), so the k-th of each
// block is compared with the k-th.
func (s *spectrum) agrees(t *spectrum, emax, tol float64) bool {
	cut := s.ground + emax + 1e-9 + tol
	for b, e := range s.blocks {
		for k, x := range e {
			if x > cut {
				break
			}
			if k >= len(t.blocks[b]) || math.Abs(t.blocks[b][k]-x) > 1e-9+tol {
				return false
			}
		}
	}
	return true
}

// levels collects the eigenvalues up to emax above the ground level with
// weights (block multiplicity)/σ, merging those that coincide to rounding.
func (s *spectrum) levels(emax float64, sigma int) []Level {
	var all []Level
	for b, e := range s.blocks {
		for _, x := range e {
			if x-s.ground > emax {
				break
			}
			all = append(all, Level{Energy: x - s.ground, Degeneracy: s.mult[b] / float64(sigma)})
		}
	}
	slices.SortFunc(all, func(a, b Level) int { return cmpFloat(a.Energy, b.Energy) })
	out := all[:0]
	for _, l := range all {
		if k := len(out) - 1; k >= 0 && l.Energy-out[k].Energy <= 1e-9+1e-13*l.Energy {
			out[k].Degeneracy += l.Degeneracy
			continue
		}
		out = append(out, l)
	}
	out[0].Energy = 0
	return out
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

// qCeilingKT is the ceiling of the level sum in Q, in units of kT above the
// lowest level. The neglected tail is about e⁻⁵⁰ ≈ 2e-22 times the number
// of levels within a few kT of the ceiling: n·kT/ν below the barrier,
// sqrt(kT/B) above it (the free rotor's (1/σ)·sqrt(πkT/B)·erfc(√50)), both
// far below the rounding of Q ≥ 1/σ (TestHinderedQCeiling).
const qCeilingKT = 50

// Q returns the quantum partition function Σ g·exp(−E/kT) over the levels
// of Levels up to qCeilingKT·kT, with the zero of energy at the lowest
// level and the weights 1/σ. It panics if the rotor is invalid or tK is not
// positive (check with Validate; Species.Validate does).
func (h HinderedRotor) Q(tK float64) float64 {
	if !(tK > 0) {
		panic(fmt.Sprintf("rrkm: HinderedRotor.Q: temperature %v K", tK))
	}
	kt := kT(tK)
	levels, err := h.Levels(qCeilingKT * kt)
	if err != nil {
		panic("rrkm: HinderedRotor.Q: " + err.Error())
	}
	q := 0.0
	for _, l := range slices.Backward(levels) { // smallest terms first
		q += l.Degeneracy * math.Exp(-l.Energy/kt)
	}
	return q
}

// ClassicalQ returns the classical partition function of the hindered
// rotor with the zero of energy at the potential minimum,
//
//	Q_cl = (1/σ)·sqrt(πkT/B)·⟨exp(−V/kT)⟩_φ,
//
// the free rotor's times the configurational average (the momentum
// integral is that of the free rotor). For the single cosine the average
// is exp(−x)·I0(x), x = V0/2kT (Pitzer & Gwinn, J. Chem. Phys. 10, 428,
// 1942); for a series it is the trapezoidal rule on one period, which
// converges geometrically for a periodic analytic integrand (Trefethen &
// Weideman, SIAM Rev. 56, 385, 2014), doubled until it changes by < 1e-14.
// It panics on an invalid rotor or a temperature that is not positive.
func (h HinderedRotor) ClassicalQ(tK float64) float64 {
	if err := h.Validate(); err != nil {
		panic("rrkm: HinderedRotor.ClassicalQ: " + err.Error())
	}
	if !(tK > 0) {
		panic(fmt.Sprintf("rrkm: HinderedRotor.ClassicalQ: temperature %v K", tK))
	}
	kt := kT(tK)
	free := math.Sqrt(math.Pi*kt/h.B) / float64(h.sigma())
	if len(h.Cos) == 0 {
		return free * scaledI0(h.V0/(2*kt))
	}
	avg := func(n int) float64 {
		s := 0.0
		for i := range n {
			s += math.Exp(-h.Potential(2*math.Pi/float64(h.Fold)*float64(i)/float64(n)) / kt)
		}
		return s / float64(n)
	}
	n := 64 * (len(h.Cos) + 1)
	prev := avg(n)
	for n < 1<<24 {
		n *= 2
		cur := avg(n)
		if math.Abs(cur-prev) <= 1e-14*cur {
			return free * cur
		}
		prev = cur
	}
	panic("rrkm: HinderedRotor.ClassicalQ: configuration integral did not converge")
}

// PitzerGwinn returns the Pitzer–Gwinn approximation to the hindered-rotor
// partition function (Pitzer & Gwinn, J. Chem. Phys. 10, 428, 1942): the
// classical hindered rotor corrected by the quantum-to-classical ratio of
// the harmonic oscillator of the well,
//
//	Q_PG = Q_cl · Q_HO(ν)/(kT/hν) = Q_cl · u/(1 − e^(−u)),  u = hν/kT,
//
// with ν = HarmonicFrequency (n·sqrt(V0·B) for the single cosine) and Q_cl
// from ClassicalQ. Q_HO = 1/(1 − e^(−u)) is measured from the oscillator's
// zero-point level, so Q_PG shares the zero of Q (the lowest level): it
// tends to the harmonic wells (n/σ)/(1 − e^(−u)) for V0 ≫ kT and to the
// free rotor for V0 ≪ kT. For a series potential only the curvature at
// φ = 0 enters ν, so a potential with other, inequivalent minima is
// approximated poorly. It panics like ClassicalQ.
func PitzerGwinn(h HinderedRotor, tK float64) float64 {
	qcl := h.ClassicalQ(tK)
	u := h.HarmonicFrequency() / kT(tK)
	if u == 0 {
		return qcl
	}
	return qcl * u / -math.Expm1(-u)
}

// scaledI0 returns exp(−x)·I0(x) for x ≥ 0, I0 the modified Bessel function
// of order zero: from the power series I0(x) = Σ_k (x²/4)^k/(k!)²
// (Abramowitz & Stegun, Handbook of Mathematical Functions, 1964, 9.6.12)
// for x ≤ 30, whose terms are all positive so no precision is lost, and
// above from the asymptotic expansion
// exp(−x)·I0(x) ~ (2πx)^(−½)·Σ_k [(2k−1)!!]²/(k!·(8x)^k) (A&S 9.7.1), whose
// smallest term, near k = 2x, is below 1e-25 there.
func scaledI0(x float64) float64 {
	if x <= 30 {
		t, s := 1.0, 1.0
		q := x * x / 4
		for k := 1.0; t > 1e-17*s; k++ {
			t *= q / (k * k)
			s += t
		}
		return s * math.Exp(-x)
	}
	t, s := 1.0, 1.0
	for k := 1.0; t > 1e-17*s; k++ {
		t *= (2*k - 1) * (2*k - 1) / (8 * x * k)
		s += t
	}
	return s / math.Sqrt(2*math.Pi*x)
}
