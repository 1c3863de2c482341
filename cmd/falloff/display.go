package main

import (
	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// display holds the units the user chose for what people read: terminal
// tables, CSV and plot axes (the mechanism files follow the same quantity;
// JSON keeps the library's units, named in its fields). Every rate constant
// and pressure shown goes through it, so a number and its label come from
// one place.
type display struct {
	pressureText, quantityText string

	pressureUnit string  // as the user wrote it, e.g. "bar"
	paPerUnit    float64 // Pa in one pressureUnit
	quantity     export.Units
}

func (d *display) addFlags(fs *pflag.FlagSet) {
	fs.StringVar(&d.pressureText, "pressure-unit", "bar", "pressure unit of tables, CSV and plots: bar, atm, Torr, Pa, kPa, …")
	fs.StringVar(&d.quantityText, "quantity", "mol", "quantity unit of k0, second-order rate constants and mechanism files: mol or molecule")
}

// validate parses the flags once.
func (d *display) validate() error {
	f, err := units.Factor(d.pressureText, units.Pressure)
	if err != nil {
		return usagef("--pressure-unit %q: %v", d.pressureText, err)
	}
	d.pressureUnit, d.paPerUnit = d.pressureText, f
	q, err := export.ParseUnits("", d.quantityText)
	if err != nil {
		return usagef("--quantity %q: use mol or molecule", d.quantityText)
	}
	d.quantity = q
	return nil
}

// p converts a pressure in Pa to the chosen unit.
func (d display) p(pa float64) float64 { return pa / d.paPerUnit }

// rate converts a rate constant with powers factors of cm³ molecule⁻¹ to
// the chosen quantity.
func (d display) rate(x float64, powers int) float64 { return x * d.quantity.RateFactor(powers) }

// rateUnit names the unit of such a rate constant.
func (d display) rateUnit(powers int) string { return d.quantity.RateLabel(powers) }
