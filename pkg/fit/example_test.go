package fit_test

import (
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// A k(T,P) grid from the GRI-Mech 3.0 Troe parameters of H+CH3(+M)
// (Smith et al., 1999), k in cm³ mol⁻¹ s⁻¹, fitted by three forms.
func ExampleFitAll() {
	rc := units.Avogadro * units.Boltzmann / units.Calorie // R in cal/mol/K
	gri := fit.Falloff{
		High: fit.Arrhenius{A: 1.39e16, N: -0.534, Ta: 536 / rc},
		Low:  fit.Arrhenius{A: 2.62e33 / units.Avogadro, N: -4.76, Ta: 2440 / rc}, // per molecule cm⁻³
		Troe: &fit.Troe{A: 0.783, T3: 74, T1: 2941, T2: 6964, HasT2: true},
	}
	var temps, press []float64
	for T := 300.0; T <= 2500; T += 200 {
		temps = append(temps, T)
	}
	for e := -2.0; e <= 2; e += 0.5 {
		press = append(press, math.Pow(10, e)*units.AtmPa)
	}
	k := make([][]float64, len(temps))
	for i, T := range temps {
		for _, P := range press {
			k[i] = append(k[i], gri.Eval(T, P))
		}
	}
	res, err := fit.FitAll(fit.FromGrid(temps, press, k, "cm3/mol/s"), []fit.FormName{fit.FormTroe, fit.FormPLOG, fit.FormChebyshev}, fit.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("recommended:", res.Recommended)
	fmt.Printf("troe: T2 fitted %v, max error below 0.01 %%: %v\n", res.Troe.Troe.HasT2, res.Troe.MaxErrorPct < 0.01)
	fmt.Printf("valid for %g–%g K\n", res.Troe.TRange[0], res.Troe.TRange[1])
	// Output:
	// recommended: troe
	// troe: T2 fitted true, max error below 0.01 %: true
	// valid for 300–2500 K
}
