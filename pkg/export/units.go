package export

import (
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Units are the output units of a mechanism file.
type Units struct {
	Energy   string // "cal/mol" (default), "kcal/mol", "J/mol", "kJ/mol" or "K"
	Quantity string // "mol" (default) or "molecule"
}

// DefaultUnits are the units of most open mechanisms.
var DefaultUnits = Units{Energy: "cal/mol", Quantity: "mol"}

// gasConstant is R in J mol⁻¹ K⁻¹ (N_A·k_B, exact since 2019).
const gasConstant = units.Avogadro * units.Boltzmann

// energyPerK returns the activation energy, in the unit, of Ea/R = 1 K.
func energyPerK(unit string) (float64, error) {
	switch unit {
	case "cal/mol":
		return gasConstant / units.Calorie, nil
	case "kcal/mol":
		return gasConstant / units.Calorie / 1000, nil
	case "J/mol":
		return gasConstant, nil
	case "kJ/mol":
		return gasConstant / 1000, nil
	case "K":
		return 1, nil
	}
	return 0, fmt.Errorf("export: unknown activation-energy unit %q (use cal/mol, kcal/mol, J/mol, kJ/mol or K)", unit)
}

func (u Units) withDefaults() Units {
	if u.Energy == "" {
		u.Energy = DefaultUnits.Energy
	}
	if u.Quantity == "" {
		u.Quantity = DefaultUnits.Quantity
	}
	return u
}

// Check reports an unknown energy or quantity unit.
func (u Units) Check() error {
	u = u.withDefaults()
	if _, err := energyPerK(u.Energy); err != nil {
		return err
	}
	if u.Quantity != "mol" && u.Quantity != "molecule" {
		return fmt.Errorf("export: unknown quantity %q (use mol or molecule)", u.Quantity)
	}
	return nil
}

// aFactor is the factor that converts an A (or k) with `order` powers of
// cm³ molecule⁻¹ to the output quantity: N_A^order for mol.
func (u Units) aFactor(order int) float64 {
	if u.withDefaults().Quantity == "mol" {
		return math.Pow(units.Avogadro, float64(order))
	}
	return 1
}

// arrhenius converts a form to output units: A, b, Ea.
func (u Units) arrhenius(a fit.Arrhenius, order int) (A, b, ea float64) {
	e, _ := energyPerK(u.withDefaults().Energy)
	return a.A * u.aFactor(order), a.N, a.Ta * e
}
