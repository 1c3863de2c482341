package rrkm

import (
	"math"
	"testing"
)

// The direct count agrees with the Whitten–Rabinovitch approximation (J. Chem.
// Phys. 38, 2466, 1963) above E ≈ E_z. Whitten and Rabinovitch report errors
// of about 1 % or less for E ≥ E_z on typical molecules (from memory); the
// tolerance of 1.5 % allows for the step structure of a count of ~10³–10⁶
// states. The counted
// density is averaged over E ± 2 %, as a comb of sparse states must be
// before it can be compared with a smooth formula. Frequencies: ethane and
// cyclopropane fundamentals from Shimanouchi,
// Tables of Molecular Vibrational Frequencies, NSRDS-NBS 39 (1972) (from
// memory).
func TestWhittenRabinovitch(t *testing.T) {
	const tolW, tolRho = 0.015, 0.015
	cases := []struct {
		name  string
		freqs []float64
	}{
		{"cyclo-C3H6", []float64{3038, 1479, 1188, 1126, 1070, 3103, 854,
			3025, 3025, 1438, 1438, 1028, 1028, 866, 866, 3082, 3082, 1188, 1188, 739, 739}},
		{"C2H6", []float64{2954, 1388, 995, 289, 2896, 1379, 2969, 2969, 1468, 1468,
			1190, 1190, 2985, 2985, 1469, 1469, 822, 822}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s := &Species{Name: tc.name, Vibrations: tc.freqs}
			ez := s.ZeroPoint()
			c, err := NewCounter(s, 1, 6.2*ez)
			if err != nil {
				t.Fatal(err)
			}
			g := GrainsTo(10, 6*ez)
			worstW, worstR := 0.0, 0.0
			for _, x := range []float64{1, 1.5, 2, 3, 4, 6} {
				e := x * ez
				i := int(math.Round(e / g.Width))
				wr, rr := WhittenRabinovitch(tc.freqs, g.Energy(i))
				dw := math.Abs(c.Sum(g.Energy(i))/wr - 1)
				// Both densities averaged over the same window.
				h := 0.02 * g.Energy(i)
				rho := (c.Sum(g.Energy(i)+h) - c.Sum(g.Energy(i)-h)) / (2 * h)
				wHi, _ := WhittenRabinovitch(tc.freqs, g.Energy(i)+h)
				wLo, _ := WhittenRabinovitch(tc.freqs, g.Energy(i)-h)
				dr := math.Abs(rho/((wHi-wLo)/(2*h)) - 1)
				// The analytic ρ is dW/dE: check it against a central
				// difference (error ~ s²(h/E)²/6 < 1e-6 for h = 1e-4·E; ω has
				// a kink at E' = 1, so that point is skipped).
				hd := 1e-4 * g.Energy(i)
				dHi, _ := WhittenRabinovitch(tc.freqs, g.Energy(i)+hd)
				dLo, _ := WhittenRabinovitch(tc.freqs, g.Energy(i)-hd)
				if d := math.Abs(rr/((dHi-dLo)/(2*hd)) - 1); x != 1 && d > 1e-6 {
					t.Errorf("E = %.1f Ez: WR ρ differs from dW/dE by %.3g", x, d)
				}
				worstW, worstR = math.Max(worstW, dw), math.Max(worstR, dr)
				if dw > tolW || dr > tolRho {
					t.Errorf("E = %.1f Ez: W count/WR - 1 = %.3g, ρ count/WR - 1 = %.3g", x, dw, dr)
				}
			}
			t.Logf("%s: worst |W/W_WR − 1| = %.2g, |ρ/ρ_WR − 1| = %.2g for E ≥ Ez", tc.name, worstW, worstR)
		})
	}
}
