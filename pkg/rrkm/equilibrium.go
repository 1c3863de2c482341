package rrkm

import (
	"math"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// MolecularQ returns the full molecular partition function per unit volume
// in cm⁻³: translational × internal × m/σ, with the external symmetry
// number σ and the number of optical isomers m (a racemic mixture counts as
// one species with m times the states), as equilibrium constants need it
// (McQuarrie, Statistical Mechanics, 1976, ch. 9).
func (s *Species) MolecularQ(tK float64) float64 {
	return s.TranslationalQ(tK) * s.InternalQ(tK) * orOne(s.OpticalIsomers) / orOne(s.Symmetry)
}

// EquilibriumConstant returns K_c(T) = Π q_products / q_reactant ·
// exp(−ΔE0/kT) for reactant ⇌ products in (molecules cm⁻³)^(n−1), n the
// number of products, with q the partition functions per volume of
// MolecularQ and dE0 the zero-point-corrected reaction energy in cm⁻¹
// (McQuarrie 1976, eq. 9-13). It is the ratio k_forward/k_reverse of the
// unimolecular step and its reverse.
func EquilibriumConstant(reactant *Species, products []*Species, dE0, tK float64) float64 {
	lk := -dE0/kT(tK) - math.Log(reactant.MolecularQ(tK))
	for _, p := range products {
		lk += math.Log(p.MolecularQ(tK))
	}
	return math.Exp(lk)
}

// pressureEquilibriumConstant converts K_c in (molecules cm⁻³)^Δn to the
// dimensionless K_p for the standard pressure std Pa: K_p = K_c·(k_BT/p°)^Δn.
func pressureEquilibriumConstant(kc float64, deltaN int, tK, std float64) float64 {
	return kc * math.Pow(units.Boltzmann*tK*1e6/std, float64(deltaN))
}
