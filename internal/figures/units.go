package figures

import (
	"strconv"

	"github.com/falloff-kinetics/falloff/pkg/export"
)

// Units are the units the figures show: a pressure unit and the quantity
// of rate constants (per mol or per molecule). Every axis takes its label
// from them, so a number and its unit come from one place.
type Units struct {
	Pressure  string  // e.g. "bar"
	PaPerUnit float64 // Pa in one Pressure unit
	Quantity  export.Units
}

// P converts a pressure in Pa to the Pressure unit.
func (u Units) P(pa float64) float64 { return pa / u.PaPerUnit }

// Rate converts a rate constant with powers factors of cm³ molecule⁻¹ to
// the quantity unit.
func (u Units) Rate(x float64, powers int) float64 { return x * u.Quantity.RateFactor(powers) }

// RateUnit names the unit of such a rate constant.
func (u Units) RateUnit(powers int) string { return u.Quantity.RateLabel(powers) }

// num formats a number with 4 significant digits, as labels do.
func num(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }

// numE formats an energy in cm⁻¹: whole wavenumbers, or 4 significant
// digits below 100 cm⁻¹.
func numE(x float64) string {
	if x >= 100 || x <= -100 {
		return strconv.FormatFloat(x, 'f', 0, 64)
	}
	return num(x)
}

// DefaultTemperatures picks up to three temperatures: lowest, middle, highest.
func DefaultTemperatures(n int) []int {
	if n <= 3 {
		idx := make([]int, n)
		for i := range idx {
			idx[i] = i
		}
		return idx
	}
	return []int{0, n / 2, n - 1}
}
