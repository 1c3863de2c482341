package fit

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Rate-constant units against their SI definitions: N_A = 6.02214076e23
// mol⁻¹ exactly (SI 2019), 1 m = 100 cm, 1 L = 1 dm³ = 1000 cm³.
func TestRateUnits(t *testing.T) {
	const tol = 1e-15
	na := units.Avogadro
	for _, c := range []struct {
		in     string
		order  int
		factor float64
	}{
		{"s-1", 1, 1},
		{"1/s", 1, 1},
		{"cm3/mol/s", 2, 1 / na},
		{"cm3 mol-1 s-1", 2, 1 / na},
		{"cm3/molecule/s", 2, 1},
		{"cm3 molecule-1 s-1", 2, 1},
		{"cm^3/mol/s", 2, 1 / na},
		{"m3/mol/s", 2, 1e6 / na},
		{"L/mol/s", 2, 1e3 / na},
		{"cm6/mol2/s", 3, 1 / (na * na)},
		{"cm6 molecule-2 s-1", 3, 1},
	} {
		order, f, err := RateUnits(c.in)
		if err != nil || order != c.order || !scalar.EqualWithinRel(f, c.factor, tol) {
			t.Errorf("%q: order %d, factor %g, %v; want %d, %g", c.in, order, f, err, c.order, c.factor)
		}
	}
	for _, bad := range []string{"", "cm3/s", "mol/L/s", "cm3/mol", "kg/s", "M-1 s-1", "cm3//mol"} {
		if _, _, err := RateUnits(bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}

// Scaled multiplies k by c at every (T, P) for every form: the scaled
// form over the original is c exactly, up to rounding (1e-13).
func TestScaled(t *testing.T) {
	const c, tol = 1.660539e-24, 1e-13
	gri := griHCH3()
	forms := []Form{
		&Arrhenius{A: 1e13, N: 0.5, Ta: 10000},
		&gri,
		&PLOG{Entries: []PlogEntry{{P: 1e3, Terms: []Arrhenius{{A: 1e10, Ta: 5000}, {A: 1e14, N: -1, Ta: 20000}}}, {P: 1e5, Terms: []Arrhenius{{A: 2e10, Ta: 5000}}}}},
		&Chebyshev{Tmin: 300, Tmax: 2500, Pmin: 1e3, Pmax: 1e7, Coef: chebCoef},
	}
	for _, f := range forms {
		s := Scaled(f, c)
		for _, T := range []float64{300, 1000, 2500} {
			for _, P := range []float64{1e3, 1e4, 1e7} {
				if r := s.Eval(T, P) / f.Eval(T, P); math.Abs(r/c-1) > tol {
					t.Errorf("%s at %g K, %g Pa: ratio %g, want %g", f.Name(), T, P, r, c)
				}
			}
		}
	}
	if chebCoef[0][0] != 8.2 {
		t.Error("Scaled changed the original's coefficients")
	}
}
