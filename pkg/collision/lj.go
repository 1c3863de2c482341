package collision

import (
	"math"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// LennardJones holds the parameters of a Lennard-Jones 12-6 potential.
type LennardJones struct {
	Sigma   float64 // σ in Å
	Epsilon float64 // ε/k_B in K
}

// Combine returns the parameters of the unlike pair by the usual combining
// rules σ12 = (σ1+σ2)/2, ε12 = sqrt(ε1·ε2) (Hirschfelder, Curtiss & Bird 1954).
func Combine(a, b LennardJones) LennardJones {
	return LennardJones{Sigma: (a.Sigma + b.Sigma) / 2, Epsilon: math.Sqrt(a.Epsilon * b.Epsilon)}
}

// ReducedMass returns m1·m2/(m1+m2) in amu.
func ReducedMass(m1, m2 float64) float64 { return m1 * m2 / (m1 + m2) }

// omega22 returns the reduced collision integral Ω(2,2)*(T*) by the fit of
// Neufeld, Janzen & Aziz (J. Chem. Phys. 57, 1100, 1972) including their
// sine correction term, for 0.3 ≤ T* ≤ 100.
func omega22(tStar float64) float64 {
	const a, b, c, d, e, f = 1.16145, 0.14874, 0.52487, 0.77320, 2.16178, 2.43787
	const r, s, w, p = -6.435e-4, 18.0323, -0.76830, 7.27371
	tb := math.Pow(tStar, b)
	return a/tb + c/math.Exp(d*tStar) + e/math.Exp(f*tStar) + r*tb*math.Sin(s*math.Pow(tStar, w)-p)
}

// lJRateConstant returns the Lennard-Jones collision rate constant
// Z = πσ²Ω(2,2)*(T/ε)·sqrt(8k_BT/(πμ)) in cm³ molecule⁻¹ s⁻¹ for the pair
// parameters lj and reduced mass mu in amu.
func lJRateConstant(lj LennardJones, mu, tK float64) float64 {
	sigma := lj.Sigma * 1e-8 // cm
	vRel := math.Sqrt(8*units.Boltzmann*tK/(math.Pi*mu*units.AtomicMass)) * 100
	return math.Pi * sigma * sigma * omega22(tK/lj.Epsilon) * vRel
}

// Concentration returns the number density P/(k_B·T) in molecules cm⁻³ for a
// pressure in Pa.
func Concentration(pressurePa, tK float64) float64 {
	return pressurePa / (units.Boltzmann * tK) * 1e-6
}
