package input

import (
	"fmt"
	"math"
	"strconv"

	"github.com/falloff-kinetics/falloff/pkg/units"
	"go.yaml.in/yaml/v3"
)

// A limit is the physical range of one kind of value, in its internal
// unit, with why a value beyond each end cannot be meant. The reader
// refuses such a value with the reason and a hint, so that a unit slip or
// a stray exponent is caught where it is written instead of failing, or
// silently giving nonsense, deep in a calculation. The ranges are wide: each
// end lies well beyond any real molecule, gas or experiment.
type limit struct {
	lo, hi       float64 // the range, ends included
	unit         string  // the internal unit, "" for a plain number
	below, above string  // why a value below lo or above hi is wrong
	hint         string
}

// check returns a FieldError for the value x of the field at path (node n)
// if it lies outside the limit.
func (l limit) check(p *parser, path string, n *yaml.Node, x float64) error {
	switch {
	case x < l.lo:
		return p.errAt(path, n, problemf("%s is below %s: %s", l.fmt(x), l.fmt(l.lo), l.below), l.hint)
	case x > l.hi:
		return p.errAt(path, n, problemf("%s is above %s: %s", l.fmt(x), l.fmt(l.hi), l.above), l.hint)
	}
	return nil
}

func (l limit) fmt(x float64) string {
	s := strconv.FormatFloat(x, 'g', 4, 64)
	if x == math.Trunc(x) && math.Abs(x) < 1e7 {
		s = strconv.FormatFloat(x, 'f', -1, 64) // a count, whole
	}
	if l.unit == "" {
		return s
	}
	return s + " " + l.unit
}

// Energies above maxThresholdKcal (300 kcal/mol, 104 927 cm⁻¹) exceed every
// chemical bond energy (see maxThresholdKcal).
var maxBondCm1 = maxThresholdKcal * units.Cm1PerKcalPerMol

// heliumIonizationCm1 is the ionization energy of helium, 24.587 eV =
// 198 310.7 cm⁻¹ (NIST Atomic Spectra Database), the highest of any atom
// or molecule: no bound electronic level of a neutral species lies above it.
const heliumIonizationCm1 = 198310.7

// The physical ranges of the values of an input file.
var (
	massLimit = limit{lo: 1, hi: 1e5, unit: "amu",
		below: "the lightest species, the hydrogen atom, has 1.008 amu",
		above: "far beyond the molecules a state count describes (150 atoms weigh about 2000 amu)",
		hint:  "check the number and its unit, e.g. mass: 70.09 amu"}
	// The highest fundamental of any molecule is the H2 stretch, 4161 cm⁻¹
	// (Huber & Herzberg, Constants of Diatomic Molecules, 1979).
	vibrationLimit = limit{lo: 0, hi: 1e4, unit: "cm-1",
		above: "beyond any vibration (the highest, the H2 stretch, is 4161 cm-1)",
		hint:  "check the list's unit; vibrations are usually given in cm-1"}
	// Imaginary frequencies of H-atom transfers, the largest, stay below
	// about 4000 cm⁻¹ (from memory); below 1 cm⁻¹ the barrier top is flat
	// and no tunnelling correction has a meaning.
	imaginaryLimit = limit{lo: 1, hi: 1e4, unit: "cm-1",
		below: "a barrier this flat has no tunnelling; delete the key",
		above: "beyond any transition state (light-atom transfers, the largest, have a few thousand cm-1)",
		hint:  "check the number and its unit, e.g. imaginary-frequency: 650 cm-1"}
	// Rotational constants: H2 has the largest, B = 60.85 cm⁻¹ (Huber &
	// Herzberg 1979); 1e-5 cm⁻¹ is a moment of inertia of 1.7e6 amu Å², far
	// beyond any molecule a state count describes.
	rotConstLimit = limit{lo: 1e-5, hi: 100, unit: "cm-1",
		below: "a moment of inertia above 1.7e6 amu angstrom2, beyond any molecule this program describes",
		above: "beyond any molecule (the largest, H2's, is 60.85 cm-1)",
		hint:  "check the list's unit: cm-1, GHz or MHz for constants, amu angstrom2 for inertia"}
	// The largest external symmetry number of a point group is 60, for the
	// icosahedral groups (C60); a linear molecule has 1 or 2.
	symmetryLimit = limit{lo: 1, hi: 60, unit: "",
		below: "a symmetry number is at least 1",
		above: "beyond any point group (the icosahedral groups, C60's, have 60)",
		hint:  "the external rotational symmetry number: 1 for no symmetry, 2 for H2O, 3 for NH3, 12 for CH4"}
	// Optical isomers: 2 for a chiral species; up to 2^n for the
	// stereoisomers of n stereocentres lumped into one species.
	opticalLimit = limit{lo: 1, hi: 64, unit: "",
		below: "a count of optical isomers is at least 1",
		above: "more than the 2^6 stereoisomers of six stereocentres",
		hint:  "1 for an achiral species, 2 for a chiral one"}
	electronicLimit = limit{lo: 0, hi: heliumIonizationCm1, unit: "cm-1",
		below: "energies are measured from the ground level, at 0",
		above: "no bound level of any species lies above the ionization energy of helium (24.6 eV), the highest",
		hint:  "check the number and its unit, e.g. {energy: 121 cm-1, degeneracy: 2}"}
	// 2J+1 of the heaviest open-shell atoms is at most 17; a lumped
	// manifold of levels may count more, but not thousands.
	degeneracyLimit = limit{lo: 1, hi: 1000, unit: "",
		below: "a degeneracy is at least 1",
		above: "more than any level or lumped manifold of levels (2J+1 is at most 17 for an atom)",
		hint:  "give the level's degeneracy 2J+1 or g, e.g. degeneracy: 2"}
	// Lennard-Jones parameters of real species (Reid, Prausnitz & Poling
	// 1987, App. B, after Svehla 1962): σ from 2.55 Å (He) to about 10 Å;
	// ε/k_B from 10.2 K (He) to about 1000 K (large polar molecules).
	sigmaLimit = limit{lo: 1, hi: 30, unit: "angstrom",
		below: "smaller than any atom (helium's σ is 2.55 angstrom)",
		above: "larger than any molecule this program describes (a C16 alkane has about 7 angstrom)",
		hint:  "check the number and its unit, e.g. sigma: 5.0 angstrom"}
	epsilonLimit = limit{lo: 1, hi: 1e4, unit: "K",
		below: "weaker than any species (helium's ε/k_B is 10.2 K); the collision integral's fit (valid for kT/ε from 0.3 to 100) would be used far outside its range",
		above: "stronger than any species (water's ε/k_B is 809 K)",
		hint:  "ε/k_B in K, e.g. epsilon: 400 K; in other units ε is converted by k_B (1 K = 0.695 cm-1)"}
	// A torsional barrier higher than any bond energy would break the bond
	// before the group turned; rotation about a C=C double bond takes
	// about 65 kcal/mol (from memory).
	torsionBarrierLimit = limit{lo: 0, hi: maxBondCm1, unit: "cm-1",
		below: "a torsional barrier is not negative (0 is a free rotor)",
		above: "more than any chemical bond energy (300 kcal/mol): the bond would break before the group turned",
		hint:  "check the unit; a methyl torsion has about 1000 cm-1 (3 kcal/mol), a C=C double bond about 65 kcal/mol"}
	harmonicLimit = limit{lo: -maxBondCm1, hi: maxBondCm1, unit: "cm-1",
		below: "a Fourier coefficient larger than any bond energy (300 kcal/mol)",
		above: "a Fourier coefficient larger than any bond energy (300 kcal/mol)",
		hint:  "check the list's unit; coefficients are a fraction of the barrier height"}
	// Torsions have 1, 2, 3 or 6 minima per turn in practice (6 for a
	// methyl group against a planar frame, as in toluene).
	periodicityLimit = limit{lo: 1, hi: 12, unit: "",
		below: "a torsion has at least one minimum per turn",
		above: "more minima per turn than any torsion (1, 2, 3 or 6 in practice)",
		hint:  "the number of equivalent minima in one turn: 3 for a methyl group"}
	// Reaction-path degeneracy L = σ_R·m‡/(σ‡·m_R) lies between 1/120 and
	// 120 (σ at most 60, m at most 2).
	pathDegeneracyLimit = limit{lo: 1e-3, hi: 1e3, unit: "",
		below: "below any ratio σ_R·m‡/(σ‡·m_R) of symmetry numbers and optical isomers (at least 1/120)",
		above: "above any ratio σ_R·m‡/(σ‡·m_R) of symmetry numbers and optical isomers (at most 120)",
		hint:  "write auto to compute L = σ_R·m‡/(σ‡·m_R), or the number of equivalent reaction paths, such as 2"}
	reactionEnergyLimit = limit{lo: -maxBondCm1, hi: maxBondCm1, unit: "cm-1",
		below: "more exothermic than 300 kcal/mol, beyond any chemical bond energy",
		above: "more endothermic than 300 kcal/mol, beyond any chemical bond energy",
		hint:  "ΔE0 of the products above the reactant, zero-point corrected; check the unit"}
	// Unimolecular pre-exponential factors reach about 1e17–1e19 s⁻¹ for the
	// loosest transition states (from memory).
	barrierlessALimit = limit{lo: 1, hi: 1e22, unit: "s-1",
		below: "slower than any unimolecular reaction's pre-exponential factor",
		above: "faster than any unimolecular reaction's pre-exponential factor (the loosest reach about 1e19 s-1)",
		hint:  "A of k∞(T) = A·(T/T0)^n·exp(−energy/kT) in s-1, e.g. A: 1e15 s-1"}
	barrierlessT0Limit = limit{lo: 1, hi: 1e4, unit: "K",
		below: "below any temperature of the grid",
		above: "above 10000 K, where no molecule survives",
		hint:  "the reference temperature of (T/T0)^n, usually 300 K or 1000 K"}
	barrierlessNLimit = limit{lo: 0, hi: 10, unit: "",
		below: "the inverse Laplace transform needs n ≥ 0",
		above: "a temperature dependence far steeper than any measured k∞ (n is usually between 0 and 3)",
		hint:  "n of (T/T0)^n, usually 0 to 2"}
	// Gas-kinetic collision rate constants are 1e-10 to 1e-9 cm³ molecule⁻¹
	// s⁻¹ (ion–molecule capture about 2e-9); with a collision efficiency
	// folded in, a few 1e-12.
	collisionRateLimit = limit{lo: 1e-13, hi: 1e-8, unit: "cm3/molecule/s",
		below: "slower than any gas-phase collision rate, even with a small collision efficiency folded in",
		above: "faster than any gas-phase collision rate (gas-kinetic 1e-10 to 1e-9, ion capture about 2e-9)",
		hint:  `write the collision rate constant Z/[M], e.g. "3.1e-10 cm3/molecule/s"`}
	// Measured ⟨ΔE⟩down lie between about 50 and 2000 cm⁻¹ (from memory).
	alphaLimit = limit{lo: 0, hi: 1e4, unit: "cm-1",
		above: "far above any measured energy transfer per collision (50 to 2000 cm-1)",
		hint:  "α300 is ⟨ΔE⟩down at 300 K, typically 100 to 1000 cm-1"}
	alphaExponentLimit = limit{lo: -4, hi: 4, unit: "",
		below: "a steeper fall of α with temperature than any measurement (n is usually between 0 and 1)",
		above: "a steeper rise of α with temperature than any measurement (n is usually between 0 and 1)",
		hint:  "n in α(T) = α300·(T/300 K)^n, typically 0 to 1"}
	// At 10 000 K kT is 20 kcal/mol: every molecule falls apart within a
	// vibrational period, and no rate theory of a thermal reactant applies.
	temperatureLimit = limit{lo: 1, hi: 1e4, unit: "K",
		below: "below any temperature a gas-phase rate is computed for",
		above: "at 10000 K kT is 20 kcal/mol and every molecule falls apart within a vibration (harmonic states are unreliable above about 5000 K anyway)",
		hint:  "kinetic models cover about 200 to 3000 K; shock tubes reach 5000 K"}
	// At 1e-10 Pa a molecule meets a collider about once a day; at 1e9 Pa
	// (10 kbar) a gas is a dense fluid and the ideal-gas collision rate
	// does not hold.
	pressureLimit = limit{lo: 1e-10, hi: 1e9, unit: "Pa",
		below: "a molecule would meet a collider less than once a day",
		above: "a gas is a dense fluid at 10 kbar, and its collisions are no longer those of an ideal gas",
		hint:  "check the number and its unit; falloff grids usually span 0.001 to 1000 bar"}
)

// maxExponent bounds E0/kT at the lowest grid temperature for every
// channel: beyond it exp(−E0/kT) is below 1e-217 and k below about 1e-200
// s⁻¹, a rate no experiment or model can use (the age of the universe is
// 4e17 s), and near the end of the floating-point range in the falloff
// region, where k(T,P) is smaller still.
const maxExponent = 500

// The hint for a threshold that lies below one master-equation grain.
func grainHint(t float64) string {
	return fmt.Sprintf("a reactant bound less deeply than kT/5 at %s K is not a unimolecular reactant; check the energy and its unit, or lower the highest temperature", strconv.FormatFloat(t, 'g', 4, 64))
}
