package thermo_test

import (
	"fmt"

	"github.com/falloff-kinetics/falloff/pkg/thermo"
)

// The thermochemistry of CO2 from its partition functions, and its NASA
// polynomials.
func Example() {
	co2, _ := thermo.BuiltIn("CO2")
	m, err := thermo.New(&co2.Species, 3000)
	if err != nil {
		fmt.Println(err)
		return
	}
	p := m.At(1000)
	fmt.Printf("1000 K: Cp %.2f J/(mol K), S %.2f J/(mol K), H-H298 %.2f kJ/mol\n", p.Cp, p.S, p.H/1000)
	poly, fe, err := thermo.Fit(m, co2.FormationEnthalpy, thermo.FitOptions{Range: thermo.DefaultRange})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("NASA7 %g-%g-%g K, largest Cp error %.2f %%, H(298.15 K) = %.2f kJ/mol\n",
		poly.TLow, poly.TMid, poly.THigh, fe.CpPct, thermo.R*298.15*poly.HRT(298.15)/1000)
	// Output:
	// 1000 K: Cp 54.15 J/(mol K), S 269.28 J/(mol K), H-H298 33.38 kJ/mol
	// NASA7 200-1000-3000 K, largest Cp error 0.11 %, H(298.15 K) = -393.51 kJ/mol
}
