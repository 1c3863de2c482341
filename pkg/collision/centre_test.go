package collision

import (
	"math"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

// With the strong collider and one value of k(E) above the threshold, the
// falloff curve is Lindemann's: k = k∞·Pr/(1+Pr) with no broadening, so
// Fcent = 1 at Pr = 1 (Lindemann, Trans. Faraday Soc. 17, 598, 1922;
// Hinshelwood's steady-state form). The exact eigenvalue departs from the
// steady state by O(λ/ω) = O(f), f the thermal fraction above E0 (about
// 1e-6 at 800 K for E0 = 13300 cm⁻¹; Fcent − 1 measured 5.6e-7); at the
// centre d ln k/d ln P = ½, so p½ moves by twice that. A realistic k(E) rising with E gives
// Fcent < 1 (Troe, J. Phys. Chem. 83, 114, 1979): checked for CH3NC, with
// Fcent between 0.1 and 1, and the pressure of Pr = 1 at [M] = k∞/k0.
func TestFcentAndPrOne(t *testing.T) {
	const lindemannTol = 2e-6 // O(f) departure from the steady state, f ≈ 1e-6
	ch, _ := testChannel(t, 60000)
	flat := ch
	flat.TS = nil
	flat.Micro = func(g rrkm.Grains, tK float64) (*rrkm.Micro, error) {
		m := rrkm.RRKM(ch.Reactant, ch.TS, 1, g)
		for i := range m.K {
			if m.K[i] > 0 {
				m.K[i] = 1e6 // s⁻¹ on every reactive grain
			}
		}
		return m, nil
	}
	col := Collider{Fixed: 3e-10}
	temps := []float64{800}
	ps := []float64{1, 1e2, 1e4, 1e6}
	for _, tc := range []struct {
		name    string
		ch      Channel
		lo, hi  float64
		exactly bool
	}{
		{"one k(E): Lindemann", flat, 1 - lindemannTol, 1 + lindemannTol, true},
		{"RRKM k(E)", ch, 0.1, 1, false},
	} {
		res, err := Run(tc.ch, col, Transfer{Strong: true}, temps, ps, Options{SkipConvergence: true})
		if err != nil {
			t.Fatal(err)
		}
		row := res.Rows[0]
		t.Logf("%s: Fcent = %.12g, p½/p(Pr=1) = %.9g", tc.name, row.Fcent, row.HalfPressure/row.PrOne)
		if !(row.Fcent >= tc.lo && row.Fcent <= tc.hi) {
			t.Errorf("%s: Fcent = %.9g, want in [%g, %g]", tc.name, row.Fcent, tc.lo, tc.hi)
		}
		m := row.KInfME / row.K0 // [M] at Pr = 1, molecules cm⁻³
		if want := m * 1e6 * 1.380649e-23 * row.T; math.Abs(row.PrOne/want-1) > 1e-12 {
			t.Errorf("%s: Pr = 1 at %.9g Pa, want %.9g Pa", tc.name, row.PrOne, want)
		}
		if tc.exactly && math.Abs(row.HalfPressure/row.PrOne-1) > 2*lindemannTol {
			t.Errorf("%s: p½ = %.9g Pa and Pr = 1 at %.9g Pa: Lindemann's curve has them equal", tc.name, row.HalfPressure, row.PrOne)
		}
	}
}
