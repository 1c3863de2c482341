package thermo

import (
	"math"
	"testing"
)

// griO2 is the O2 entry of GRI-Mech 3.0's thermo file (Smith et al. 1999,
// as distributed with the mechanism; data source code TPIS89, the Gurvich
// tables, whose entropies are for 1 bar), low range 200–1000 K, high
// 1000–3500 K.
var griO2 = NASA7{TLow: 200, TMid: 1000, THigh: 3500,
	Low:  [7]float64{3.78245636e+00, -2.99673416e-03, 9.84730201e-06, -9.68129509e-09, 3.24372837e-12, -1.06394356e+03, 3.65767573e+00},
	High: [7]float64{3.28253784e+00, 1.48308754e-03, -7.57966669e-07, 2.09470555e-10, -2.16717794e-14, -1.08845772e+03, 5.45323129e+00},
}

// The NASA evaluation (CpR, HRT, SR) on a published polynomial against the
// table it was fitted to: GRI-Mech 3.0's O2 against NIST-JANAF O2 (table
// O-029; Cp(298.15 K) and H − H298 read from a transcription of the online
// table, Cp(1000, 2000 K) and S from memory; S shifted from 1 bar to the
// file's 1 atm by −R·ln 1.01325). GRI's fits reproduce their tables to a
// few tenths of a per cent (common practice, no source), so 0.5 % in Cp and
// S and 0.1 kJ/mol in H.
func TestNASAEvaluationGRIO2(t *testing.T) {
	const (
		tolRel = 0.005
		tolH   = 100 // J/mol
	)
	for _, row := range []janafRow{{298.15, 29.376, 205.152, 0}, {1000, 34.870, 243.578, 22.703}, {2000, 37.741, 268.748, 59.175}} {
		cp := R * griO2.CpR(row.t)
		s := R * griO2.SR(row.t)
		h := R*row.t*griO2.HRT(row.t) - R*TRef*griO2.HRT(TRef)
		if math.Abs(cp/row.cp-1) > tolRel || math.Abs(s/row.s-1) > tolRel || math.Abs(h-1000*row.h) > tolH {
			t.Errorf("%v K: Cp %.3f (JANAF %.3f), S %.3f (JANAF %.3f), H-H298 %.1f J/mol (JANAF %.0f)",
				row.t, cp, row.cp, s, row.s, h, 1000*row.h)
		}
		t.Logf("%v K: Cp %+.3f %%, S %+.3f %%, H-H298 %+.1f J/mol", row.t, 100*(cp/row.cp-1), 100*(s/row.s-1), h-1000*row.h)
	}
	// ΔfH°(O2) = 0: H(298.15 K) of the file is zero to its fit.
	if h := R * TRef * griO2.HRT(TRef); math.Abs(h) > tolH {
		t.Errorf("H(298.15 K) = %.1f J/mol, want 0", h)
	}
}

// K_c from polynomials: for A ⇌ B + C with B and C copies of A's
// polynomials and H shifted, K_c = exp(−ΔG°/RT)·(p°/k_BT): checked
// against the formula written out.
func TestEquilibriumConstantUnits(t *testing.T) {
	const tol = 1e-12
	a := griO2
	b := griO2
	b.Low[5] += 1000
	b.High[5] += 1000
	for _, tk := range []float64{500, 1500} {
		dg := (2*b.GRT(tk) - a.GRT(tk)) // ΔG°/RT
		want := math.Exp(-dg) * StandardPressure / (1.380649e-23 * tk) * 1e-6
		if got := EquilibriumConstant([]*NASA7{&a}, []*NASA7{&b, &b}, tk); math.Abs(got/want-1) > tol {
			t.Errorf("%v K: %v, want %v", tk, got, want)
		}
	}
}
