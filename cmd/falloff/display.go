package main

import (
	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// display holds the units the user chose for what people read: terminal
// tables, CSV and figures (the mechanism files follow the same quantity;
// JSON keeps the library's units, named in its fields). Every rate constant
// and pressure shown goes through its figures.Units, so a number and its
// label come from one place.
type display struct {
	pressureText, quantityText string
	figures.Units
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
	d.Pressure, d.PaPerUnit = d.pressureText, f
	q, err := export.ParseUnits("", d.quantityText)
	if err != nil {
		return usagef("--quantity %q: use mol or molecule", d.quantityText)
	}
	d.Quantity = q
	return nil
}
