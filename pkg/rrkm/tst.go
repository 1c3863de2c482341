package rrkm

import (
	"math"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// PathDegeneracy returns the reaction-path degeneracy
// L = (σ_R·m‡)/(σ‡·m_R) from the external symmetry numbers σ and optical-isomer
// counts m of the reactant and transition state (Pollak & Pechukas 1978;
// Gilbert & Smith, Theory of Unimolecular and Recombination Reactions, 1990,
// §4.5).
func PathDegeneracy(reactant, ts *Species) float64 {
	return orOne(reactant.Symmetry) * orOne(ts.OpticalIsomers) /
		(orOne(ts.Symmetry) * orOne(reactant.OpticalIsomers))
}

func orOne(x float64) float64 {
	if x <= 0 {
		return 1
	}
	return x
}

// KInf returns the canonical transition-state-theory rate constant
// k∞(T) = L·(k_BT/h)·(Q‡/Q)·exp(−E0/kT) in s⁻¹, with Q the internal partition
// functions (translation cancels for a unimolecular step; Eyring, J. Chem.
// Phys. 3, 107, 1935).
func KInf(reactant, ts *Species, l, tK float64) float64 {
	kt := kT(tK)
	// k_BT/h in s⁻¹ is c·kT with kT in cm⁻¹.
	return l * units.LightCm * kt * ts.InternalQ(tK) / reactant.InternalQ(tK) * math.Exp(-ts.E0/kt)
}

// KInfTunnel returns canonical TST with Eckart tunnelling, k∞(T)·κ(T) in
// s⁻¹ (Johnston & Heicklen, J. Phys. Chem. 66, 532, 1962), evaluated as
// L·c·(Q‡/Q)·∫P(E)e^(−E/kT)dE so that it stays finite where k∞ underflows
// and κ overflows. A nil e gives KInf. It is the Boltzmann average of
// RRKMTunnel's k(E). KInfTunnel panics if e.V1 is not ts.E0 or e is invalid.
func KInfTunnel(reactant, ts *Species, l, tK float64, e *Eckart) float64 {
	if e == nil {
		return KInf(reactant, ts, l, tK)
	}
	checkTop("KInfTunnel", ts, e)
	return l * units.LightCm * ts.InternalQ(tK) / reactant.InternalQ(tK) * math.Exp(e.logLaplace(tK))
}

// thermalAverage returns the Boltzmann average Σ N_i k_i e^(−E_i/kT) / Σ N_i
// e^(−E_i/kT) of a microcanonical rate k over grains with counts N (in any
// unit, such as Micro.Counts in 2^Scale states). The weights are formed
// relative to the largest in log space: scaled counts of a large molecule
// times e^(−E/kT) can fall below the smallest normal float64 where the
// weight matters.
func thermalAverage(counts, k []float64, g Grains, tK float64) float64 {
	if len(counts) != len(k) {
		panic("rrkm: thermalAverage: counts and k differ in length")
	}
	beta := 1 / kT(tK)
	lw := make([]float64, len(counts))
	top := math.Inf(-1)
	for i, n := range counts {
		lw[i] = math.Inf(-1) // an empty grain
		if n > 0 {
			lw[i] = math.Log(n) - beta*g.Energy(i)
		}
		top = math.Max(top, lw[i])
	}
	num, den := 0.0, 0.0
	for i, l := range lw {
		w := math.Exp(l - top)
		num += w * k[i]
		den += w
	}
	return num / den
}
