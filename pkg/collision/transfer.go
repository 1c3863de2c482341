package collision

import (
	"fmt"
	"math"
)

// Transfer is an energy-transfer model.
type Transfer struct {
	// Strong selects the strong collider; otherwise exponential-down.
	Strong bool
	// Efficiency is the strong collider's collision efficiency βc in (0, 1]
	// (0 means 1).
	Efficiency float64
	// Alpha300 and Exponent give the exponential-down α(T) =
	// Alpha300·(T/300 K)^Exponent in cm⁻¹; α = ⟨ΔE⟩down for this model.
	Alpha300, Exponent float64
}

// Alpha returns α(T) in cm⁻¹ (exponential-down).
func (t Transfer) Alpha(tK float64) float64 { return t.Alpha300 * math.Pow(tK/300, t.Exponent) }

func (t Transfer) efficiency() float64 {
	if t.Efficiency > 0 {
		return t.Efficiency
	}
	return 1
}

func (t Transfer) validate() error {
	if t.Strong {
		if e := t.efficiency(); !(e > 0 && e <= 1) {
			return fmt.Errorf("collision: strong-collider efficiency %v outside (0, 1]", t.Efficiency)
		}
		return nil
	}
	if !(t.Alpha300 > 0) || math.IsInf(t.Alpha300, 0) || math.IsNaN(t.Exponent) {
		return fmt.Errorf("collision: exponential-down alpha-300 = %v cm-1, exponent %v: need alpha > 0", t.Alpha300, t.Exponent)
	}
	return nil
}

// String describes the model for reports.
func (t Transfer) String() string {
	if t.Strong {
		return fmt.Sprintf("strong collider, βc = %g", t.efficiency())
	}
	return fmt.Sprintf("exponential-down, ⟨ΔE⟩down = %g cm-1 × (T/300 K)^%g", t.Alpha300, t.Exponent)
}

// Collider gives the collision rate constant of the reactant with the bath.
type Collider struct {
	LJ LennardJones // pair parameters (after Combine)
	Mu float64      // reduced mass, amu
	// Fixed, if positive, is a given rate constant in cm³ molecule⁻¹ s⁻¹
	// used at every temperature instead of the Lennard-Jones one.
	Fixed float64
}

// Z returns the collision rate constant in cm³ molecule⁻¹ s⁻¹ at tK.
func (c Collider) Z(tK float64) float64 {
	if c.Fixed > 0 {
		return c.Fixed
	}
	return lJRateConstant(c.LJ, c.Mu, tK)
}
