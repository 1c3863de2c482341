package rrkm

import (
	"errors"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// The conventional treatment of angular momentum in a unimolecular
// reaction keeps the two-dimensional rotation of the total angular momentum
// J adiabatic (J is conserved through the reaction and its rotational energy
// is not available to the reaction coordinate) while the rotation about the
// top's unique axis, the K rotor, exchanges energy freely with the
// vibrations (Robinson & Holbrook, Unimolecular Reactions, Wiley 1972, ch.
// 4; Holbrook, Pilling & Robertson, Unimolecular Reactions, 2nd ed., Wiley
// 1996, §4.6; Troe, J. Chem. Phys. 66, 4745, 1977). With E the active energy
// (vibrations, K rotor, torsions, electronic levels) above the reactant's
// zero-point level,
//
//	k(E, J) = L·W‡(E − E0 − [E‡rot(J) − Erot(J)]) / (h·ρ(E)),
//
// Erot(J) = B̄·J(J+1), E‡rot(J) = B̄‡·J(J+1), so the effective threshold
// rises with J when the transition state's moment of inertia is smaller
// than the reactant's (B̄‡ > B̄, a tight transition state) and falls when it
// is larger. Collisions thermalise J, so at every active energy J follows
// the reactant's Boltzmann distribution P_T(J) ∝ (2J+1)·exp(−Erot(J)/kT):
// the one-dimensional master equation runs on the active energy with
// k_T(E) = Σ_J P_T(J)·k(E, J), the standard reduction (Holbrook, Pilling &
// Robertson 1996, eq. 4.64, from memory; Smith & Gilbert, Int. J. Chem.
// Kinet. 20, 307, 1988, from memory).

// JRotor is the adiabatic two-dimensional rotor of a species: its constant
// B̄ in cm⁻¹, 0 for a species without external rotation (an atom).
type JRotor struct {
	B float64
}

// Energy returns B̄·J(J+1) in cm⁻¹.
func (r JRotor) Energy(j int) float64 { return r.B * float64(j) * float64(j+1) }

// ErrNoExternalRotor reports a species pair where one member has external
// rotation and the other has none, so J cannot be carried from one to the
// other.
var ErrNoExternalRotor = errors.New("rrkm: adiabatic J rotation needs the external rotation of both the reactant and the transition state")

// SplitExternalRotation returns a copy of s whose external rotor is split
// into an active one-dimensional K rotor, kept in the copy's Rotors, and the
// adiabatic J rotor, returned. For a non-linear top with constants
// A ≥ B ≥ C the unique axis is the a axis of a prolate top (2B ≤ A + C): the
// K rotor takes A and the J rotor B̄ = sqrt(BC); for an oblate top the K
// rotor takes C and B̄ = sqrt(AB). Their classical partition functions
// multiply to the three-dimensional one, sqrt(π(kT)³/(ABC)) = sqrt(πkT/A)·
// (kT/B̄), so canonical TST is unchanged; this is the symmetric-top energy
// B̄J(J+1) + (A − B̄)K² with the restriction |K| ≤ J integrated out. A
// linear molecule's rotor (dimension 2) is all J: no K rotor is left. A
// species with no external rotor (dimension 3 or 2) is returned unchanged
// with a zero J rotor. Internal free rotors (dimension 1) stay active.
func SplitExternalRotation(s *Species) (*Species, JRotor) {
	out := *s
	out.Rotors = nil
	var j JRotor
	for _, r := range s.Rotors {
		switch r.Dim {
		case 3:
			c := slices.Clone(r.Consts)
			slices.Sort(c)
			slices.Reverse(c) // A ≥ B ≥ C
			a, b, cc := c[0], c[1], c[2]
			if 2*b <= a+cc { // prolate or spherical: K about a
				out.Rotors = append(out.Rotors, Rotor{Dim: 1, Consts: []float64{a}, Symmetry: r.Symmetry})
				j = JRotor{B: math.Sqrt(b * cc)}
			} else {
				out.Rotors = append(out.Rotors, Rotor{Dim: 1, Consts: []float64{cc}, Symmetry: r.Symmetry})
				j = JRotor{B: math.Sqrt(a * b)}
			}
		case 2:
			j = JRotor{B: r.Consts[0]}
		default:
			out.Rotors = append(out.Rotors, r)
		}
	}
	return &out, j
}

// JDistribution returns P_T(J) ∝ (2J+1)·exp(−B̄J(J+1)/kT) for J = 0, 1, …
// up to where the weight falls below e^−36 (≈ 2e-16) of the largest,
// normalised to 1. A zero rotor gives the single J = 0.
func (r JRotor) JDistribution(tK float64) []float64 {
	if r.B <= 0 {
		return []float64{1}
	}
	kt := kT(tK)
	// ln w(J) = ln(2J+1) − B̄J(J+1)/kT peaks near J ≈ sqrt(kT/2B̄).
	var lw []float64
	top := math.Inf(-1)
	for j := 0; ; j++ {
		l := math.Log(float64(2*j+1)) - r.Energy(j)/kt
		lw = append(lw, l)
		top = math.Max(top, l)
		if l < top-36 && float64(j) > math.Sqrt(kt/(2*r.B)) {
			break
		}
	}
	sum := 0.0
	p := make([]float64, len(lw))
	for j, l := range lw {
		p[j] = math.Exp(l - top)
		sum += p[j]
	}
	for j := range p {
		p[j] /= sum
	}
	return p
}

// QJ returns the quantum partition function of the J rotor,
// Σ_J (2J+1)·exp(−B̄J(J+1)/kT) (1 for a zero rotor); for B̄ ≪ kT it is
// kT/B̄ + 1/3 + … (Mulholland's expansion; McQuarrie, Statistical
// Mechanics, 1976, eq. 6-29).
func (r JRotor) QJ(tK float64) float64 {
	if r.B <= 0 {
		return 1
	}
	kt := kT(tK)
	q := 0.0
	for j := 0; ; j++ {
		t := float64(2*j+1) * math.Exp(-r.Energy(j)/kt)
		q += t
		if t < 1e-17*q && float64(j) > math.Sqrt(kt/(2*r.B)) {
			return q
		}
	}
}

// MaxJShift returns how far the effective threshold E0(J) − E0 =
// (B̄‡ − B̄)·J(J+1) falls below E0 over the J that matter at temperatures up
// to tMaxK, in cm⁻¹ (≥ 0): the transition state must be counted that much
// higher when its moment of inertia is the larger.
func MaxJShift(reactant, ts JRotor, tMaxK float64) float64 {
	p := reactant.JDistribution(tMaxK)
	j := len(p) - 1
	return math.Max(0, (reactant.B-ts.B)*float64(j)*float64(j+1))
}

// SumTable holds a counter's integrated sum of states ∫₀^e W(x)dx on its
// fine grid, so that the many shifted grain sums of the J average cost O(1)
// each. For a species with classical rotors the values at the half nodes
// (j+½)δ are exact (the power sums of the rotor convolution) and are
// interpolated linearly between them; the integral's second derivative is
// the density ρ, so the error is at most δ²ρ/8, below 1e-4 of a grain's
// sum for δ = 1 cm⁻¹ and 10 cm⁻¹ grains wherever W/ρ > 100 cm⁻¹ (common
// practice, no source). A species without classical rotors is evaluated
// exactly (prefix sums).
type SumTable struct {
	c    *Counter
	half []float64 // ∫W at (j+½)δ, times 2^−scale; nil: exact evaluation
}

// NewSumTable tabulates c's integrated sum of states to top cm⁻¹ (at most
// its ceiling).
func (c *Counter) NewSumTable(top float64) *SumTable {
	t := &SumTable{c: c}
	if c.rot == nil {
		return t
	}
	top = math.Min(top, c.ceiling)
	jmax := int(math.Floor(top/c.fine - 0.5))
	if jmax < 0 {
		jmax = 0
	}
	p := float64(c.rotDim)/2 + 1
	f := c.rotB / math.Gamma(p+1)
	t.half = c.rot.atHalfNodes(jmax, p)
	for j := range t.half {
		t.half[j] *= f
	}
	return t
}

// exactNodes is how many fine grains above zero SumTable evaluates exactly.
const exactNodes = 64

// at returns ∫₀^e W times 2^−scale.
func (t *SumTable) at(e float64) float64 {
	if e <= 0 {
		return 0
	}
	if t.half == nil {
		return t.c.integratedSum(e)
	}
	x := e/t.c.fine - 0.5
	if x < exactNodes {
		// Near the threshold ∫W grows as e^(D/2+1), too curved for linear
		// interpolation: evaluate it.
		return t.c.integratedSum(e)
	}
	j := int(x)
	if j >= len(t.half)-1 {
		t.c.check(e)
		return t.c.integratedSum(e)
	}
	f := x - float64(j)
	return t.half[j] + f*(t.half[j+1]-t.half[j])
}

// RRKMAdiabatic computes the J-averaged k_T(E) on grains g at tK for the
// adiabatic J treatment: reactant and ts count the active degrees of
// freedom (SplitExternalRotation; ts through its SumTable, to g.Top() − E0
// + MaxJShift), jr and jts are their J rotors. SumTS is the J average
// Σ_J P_T(J)·W̄‡(E − E0 − (B̄‡ − B̄)J(J+1)) and K = L·c·SumTS/ρ̄(E).
//
// A grain that holds no reactant state (a sparse vibrational density: a
// linear reactant has no K rotor to fill the gaps between its levels)
// cannot carry the flux W̄‡ of its energies, so that flux, weighted by its
// Boltzmann factor relative to the grain that takes it, goes to the nearest
// lower grain that holds states. Σρ̄·k·e^(−E/kT), the high-pressure flux,
// is then exact whatever the sparsity, at the price of a k(E) coarse-grained
// over the level spacing where the density is sparse. With B̄‡ = B̄ and no
// empty grain it is RRKM on the active counts.
func RRKMAdiabatic(reactant *Counter, ts *SumTable, l float64, g Grains, jr, jts JRotor, tK float64) *Micro {
	e0 := ts.c.species.E0
	m := &Micro{Grains: g, E0: e0, L: l, Scale: reactant.scale,
		Counts: reactant.ScaledCounts(g, 0),
		SumTS:  make([]float64, g.N),
		K:      make([]float64, g.N)}
	p := jr.JDistribution(tK)
	db := jts.B - jr.B
	for j, pj := range p {
		if pj < 1e-18 {
			continue
		}
		ts.addShiftedSums(m.SumTS, g, e0+db*float64(j)*float64(j+1), pj)
	}
	m.finish(ts, tK)
	return m
}

// addShiftedSums adds weight times the grain averages of W(E − off) to sums.
func (t *SumTable) addShiftedSums(sums []float64, g Grains, off, weight float64) {
	if off >= g.Top() {
		return // every grain lies below this threshold
	}
	w := g.Width
	lo := t.at(-0.5*w - off)
	for i := range sums {
		hi := t.at((float64(i)+0.5)*w - off)
		sums[i] += weight * (hi - lo) / w
		lo = hi
	}
}

// finish moves the flux of grains without reactant states down to the
// nearest grain with states, weighted by the Boltzmann factor at tK
// between them (see RRKMAdiabatic), and forms k(E).
func (m *Micro) finish(ts *SumTable, tK float64) {
	beta := 1 / kT(tK)
	w := m.Grains.Width
	last := -1
	for i, n := range m.Counts {
		switch {
		case n > 0:
			last = i
		case last >= 0 && m.SumTS[i] > 0:
			m.SumTS[last] += m.SumTS[i] * math.Exp(-beta*float64(i-last)*w)
			m.SumTS[i] = 0
		}
	}
	m.rates(ts.c.scale)
}

// JQuadrature returns the nodes x_q and weights w_q of n-point
// Gauss–Laguerre quadrature, Σ w_q f(x_q) ≈ ∫₀^∞ e^(−x) f(x) dx, exact for
// polynomials of degree below 2n: the average over a classical thermal J
// distribution, whose weight (2J+1)·exp(−B̄J(J+1)/kT) is e^(−x) dx in
// x = B̄J(J+1)/kT. The nodes are the eigenvalues of the Jacobi matrix of the
// Laguerre polynomials (diagonal 2k+1, off-diagonal k), the weights the
// squared first components of its eigenvectors (Golub & Welsch, Math.
// Comp. 23, 221, 1969).
func JQuadrature(n int) (x, w []float64) {
	if n < 1 {
		panic("rrkm: JQuadrature needs at least one node")
	}
	a := mat.NewSymDense(n, nil)
	for k := range n {
		a.SetSym(k, k, float64(2*k+1))
		if k+1 < n {
			a.SetSym(k, k+1, float64(k+1))
		}
	}
	var es mat.EigenSym
	if !es.Factorize(a, true) {
		panic("rrkm: JQuadrature: eigendecomposition failed")
	}
	x = es.Values(nil)
	var v mat.Dense
	es.VectorsTo(&v)
	w = make([]float64, n)
	for q := range n {
		w[q] = v.At(0, q) * v.At(0, q)
	}
	return x, w
}

// JNodeShift returns the centrifugal shift of the threshold, (B̄‡ − B̄)·J(J+1)
// in cm⁻¹, at the quadrature node x = B̄J(J+1)/kT (JQuadrature) at tK.
func JNodeShift(jr, jts JRotor, x, tK float64) float64 {
	if jr.B <= 0 {
		return 0
	}
	return (jts.B - jr.B) * x * kT(tK) / jr.B
}

// RRKMShifted computes k(E) = L·c·W̄‡(E − E0 − shift)/ρ̄(E) on grains g for
// one J of the adiabatic treatment (shift = JNodeShift), with the flux of
// grains without reactant states moved as in RRKMAdiabatic (at tK).
func RRKMShifted(reactant *Counter, ts *SumTable, l float64, g Grains, shift, tK float64) *Micro {
	e0 := ts.c.species.E0
	m := &Micro{Grains: g, E0: e0 + shift, L: l, Scale: reactant.scale,
		Counts: reactant.ScaledCounts(g, 0),
		SumTS:  make([]float64, g.N),
		K:      make([]float64, g.N)}
	ts.addShiftedSums(m.SumTS, g, e0+shift, 1)
	m.finish(ts, tK)
	return m
}

// RRKMAtJ computes k(E, J) at one J on grains g: L·c·W̄‡(E − E0 −
// (B̄‡ − B̄)J(J+1))/ρ̄(E), with the active counts as in RRKMAdiabatic.
func RRKMAtJ(reactant, ts *Counter, l float64, g Grains, jr, jts JRotor, j int) *Micro {
	e0 := ts.species.E0
	off := e0 + (jts.B-jr.B)*float64(j)*float64(j+1)
	m := &Micro{Grains: g, E0: off, L: l, Scale: reactant.scale,
		Counts: reactant.ScaledCounts(g, 0),
		SumTS:  make([]float64, g.N),
		K:      make([]float64, g.N)}
	if off < g.Top() {
		m.SumTS = ts.averagedSums(g, off)
	}
	m.rates(ts.scale)
	return m
}

// KInfAdiabatic returns canonical TST for the adiabatic J treatment:
// KInf of the active species times Q_J(B̄‡)/Q_J(B̄) with the quantum J sums
// (QJ), the high-pressure limit RRKMAdiabatic's k_T(E) averages to. It
// differs from KInf of the full species by the quantum correction of the J
// sums, about (B̄‡ − B̄)/(3kT) relative.
func KInfAdiabatic(reactant, ts *Species, jr, jts JRotor, l, tK float64) float64 {
	return KInf(reactant, ts, l, tK) * jts.QJ(tK) / jr.QJ(tK)
}

// checkPair reports a reactant and transition state of which only one has
// external rotation.
func checkPair(jr, jts JRotor, r, ts *Species) error {
	if (jr.B > 0) != (jts.B > 0) {
		return fmt.Errorf("%w: %q has B̄ = %g cm-1, %q has B̄ = %g cm-1", ErrNoExternalRotor, r.Name, jr.B, ts.Name, jts.B)
	}
	return nil
}

// CheckAdiabaticPair reports whether reactant r and transition state ts can
// be treated with adiabatic J: both need external rotation, or neither.
func CheckAdiabaticPair(r, ts *Species) error {
	_, jr := SplitExternalRotation(r)
	_, jts := SplitExternalRotation(ts)
	return checkPair(jr, jts, r, ts)
}
