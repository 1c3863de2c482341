package export

import (
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// EnergyUnit is the unit of activation energies in a mechanism file.
type EnergyUnit string

// Activation-energy units.
const (
	CalPerMol  EnergyUnit = "cal/mol"
	KcalPerMol EnergyUnit = "kcal/mol"
	JPerMol    EnergyUnit = "J/mol"
	KJPerMol   EnergyUnit = "kJ/mol"
	Kelvin     EnergyUnit = "K" // Ea/R
)

// QuantityUnit is the unit of quantity of a mechanism file: it sets the
// concentration unit in A (mol cm⁻³ or molecules cm⁻³).
type QuantityUnit string

// Quantity units.
const (
	Mole     QuantityUnit = "mol"
	Molecule QuantityUnit = "molecule"
)

// Units are the output units of a mechanism file. A zero field means the
// field of DefaultUnits.
type Units struct {
	Energy   EnergyUnit   // CalPerMol (default), KcalPerMol, JPerMol, KJPerMol or Kelvin
	Quantity QuantityUnit // Mole (default) or Molecule
}

// DefaultUnits are the units of most open mechanisms.
var DefaultUnits = Units{Energy: CalPerMol, Quantity: Mole}

// ParseUnits returns the units named energy ("cal/mol", "kcal/mol",
// "J/mol", "kJ/mol" or "K") and quantity ("mol" or "molecule"), as a
// command line gives them; "" means the default. An unknown name is an
// error (see Units.Check).
func ParseUnits(energy, quantity string) (Units, error) {
	u := Units{Energy: EnergyUnit(energy), Quantity: QuantityUnit(quantity)}
	if err := u.Check(); err != nil {
		return Units{}, err
	}
	return u.withDefaults(), nil
}

// gasConstant is R in J mol⁻¹ K⁻¹ (N_A·k_B, exact since 2019).
const gasConstant = units.Avogadro * units.Boltzmann

// energyPerK returns the activation energy, in the unit, of Ea/R = 1 K.
func energyPerK(unit EnergyUnit) (float64, error) {
	switch unit {
	case CalPerMol:
		return gasConstant / units.Calorie, nil
	case KcalPerMol:
		return gasConstant / units.Calorie / 1000, nil
	case JPerMol:
		return gasConstant, nil
	case KJPerMol:
		return gasConstant / 1000, nil
	case Kelvin:
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
	if u.Quantity != Mole && u.Quantity != Molecule {
		return fmt.Errorf("export: unknown quantity %q (use mol or molecule)", u.Quantity)
	}
	return nil
}

// aFactor is the factor that converts an A (or k) with `order` powers of
// cm³ molecule⁻¹ to the output quantity: N_A^order for mol.
func (u Units) aFactor(order int) float64 {
	if u.withDefaults().Quantity == Mole {
		return math.Pow(units.Avogadro, float64(order))
	}
	return 1
}

// arrhenius converts a form to output units: A, b, Ea.
func (u Units) arrhenius(a fit.Arrhenius, order int) (A, b, ea float64) {
	e, _ := energyPerK(u.withDefaults().Energy)
	return a.A * u.aFactor(order), a.N, a.Ta * e
}

// RateFactor returns the factor that converts a rate constant with powers
// powers of cm³ molecule⁻¹ (0 for s⁻¹, 1 for cm³ molecule⁻¹ s⁻¹, 2 for
// cm⁶ molecule⁻² s⁻¹) to the units' quantity: N_A^powers for mol, 1 for
// molecule. It is the one conversion every output of rate constants uses.
func (u Units) RateFactor(powers int) float64 { return u.aFactor(powers) }

// RateLabel names the unit of a rate constant with powers powers of
// cm³ per quantity: "s-1", "cm3 mol-1 s-1", "cm6 molecule-2 s-1", ….
func (u Units) RateLabel(powers int) string {
	q := string(u.withDefaults().Quantity)
	switch powers {
	case 0:
		return "s-1"
	case 1:
		return "cm3 " + q + "-1 s-1"
	}
	return fmt.Sprintf("cm%d %s-%d s-1", 3*powers, q, powers)
}

// EnergyFactor returns the activation energy in the units' energy unit of
// Ea/R = 1 K (R in the unit per mol; 1 for K).
func (u Units) EnergyFactor() float64 {
	e, _ := energyPerK(u.withDefaults().Energy)
	return e
}
