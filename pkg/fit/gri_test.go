package fit

import (
	"math"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// rCal is the gas constant in cal mol⁻¹ K⁻¹ (N_A·k_B/4.184 = 1.987204).
const rCal = units.Avogadro * units.Boltzmann / units.Calorie

// griArrhenius converts A (per mol units), n and Ea in cal/mol, dividing
// A by N_A^molPower to per-molecule concentration units.
func griArrhenius(a, n, eaCal float64, molPower int) Arrhenius {
	return Arrhenius{A: a / math.Pow(units.Avogadro, float64(molPower)), N: n, Ta: eaCal / rCal}
}

// griHCH3 is H+CH3(+M)<=>CH4(+M) of GRI-Mech 3.0 (Smith et al., 1999):
// k∞ = 1.39e16 T^-0.534 exp(−536 cal/mol/RT) cm³ mol⁻¹ s⁻¹, LOW 2.62e33
// T^-4.76 exp(−2440/RT) cm⁶ mol⁻² s⁻¹, TROE .783 74 2941 6964. k is in cm³
// mol⁻¹ s⁻¹; k0 is converted to cm³ mol⁻¹ s⁻¹ × cm³ molecule⁻¹.
func griHCH3() Falloff {
	return Falloff{
		High: griArrhenius(1.39e16, -0.534, 536, 0),
		Low:  griArrhenius(2.62e33, -4.76, 2440, 1),
		Troe: &Troe{A: 0.783, T3: 74, T1: 2941, T2: 6964, HasT2: true},
	}
}

// griCH3CH3 is 2CH3(+M)<=>C2H6(+M) of GRI-Mech 3.0 (Smith et al., 1999):
// k∞ 6.77e16 T^-1.18 exp(−654/RT), LOW 3.40e41 T^-7.03 exp(−2762/RT),
// TROE .619 73.2 1180 9999.
func griCH3CH3() Falloff {
	return Falloff{
		High: griArrhenius(6.77e16, -1.18, 654, 0),
		Low:  griArrhenius(3.40e41, -7.03, 2762, 1),
		Troe: &Troe{A: 0.619, T3: 73.2, T1: 1180, T2: 9999, HasT2: true},
	}
}

// logGrid returns n values from lo to hi evenly spaced in log.
func logGrid(lo, hi float64, n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = lo * math.Pow(hi/lo, float64(i)/float64(n-1))
	}
	return v
}

// linGrid returns n values from lo to hi evenly spaced.
func linGrid(lo, hi float64, n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = lo + (hi-lo)*float64(i)/float64(n-1)
	}
	return v
}

// gridTable evaluates f on temps × pressures (Pa).
func gridTable(f Evaluator, temps, pressures []float64, kUnits string) *Table {
	k := make([][]float64, len(temps))
	for i, T := range temps {
		k[i] = make([]float64, len(pressures))
		for j, P := range pressures {
			k[i][j] = f.Eval(T, P)
		}
	}
	return FromGrid(temps, pressures, k, kUnits)
}

func atm(p ...float64) []float64 {
	out := make([]float64, len(p))
	for i, v := range p {
		out[i] = v * units.AtmPa
	}
	return out
}
