package thermo

import (
	"math"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// janafRow is one temperature of a NIST-JANAF table: Cp and S in
// J mol⁻¹ K⁻¹, H − H°(298.15 K) in kJ mol⁻¹.
type janafRow struct {
	t, cp, s, h float64
}

// Tolerances of the rigid-rotor harmonic-oscillator model against the
// tables, which include anharmonicity, rotation–vibration coupling and
// centrifugal distortion. With fundamentals for the frequencies, the model
// is commonly quoted as good to a few tenths of a per cent in Cp near
// room temperature and to a few per cent at 2000 K, where the neglected
// anharmonic terms grow with the population of excited levels (e.g.
// McQuarrie, Statistical Mechanics, 1976, ch. 8; common practice). S and
// H − H298 are integrals of Cp from lower temperatures and deviate less.
const (
	tolCp298  = 0.01  // relative
	tolCp1000 = 0.02  // relative
	tolCp2000 = 0.04  // relative
	tolS      = 0.004 // relative, at every temperature
	tolH1000  = 0.015 // relative
	tolH2000  = 0.03  // relative
)

// The built-in molecules (builtin.go: fundamentals and ground-state
// rotational constants of Herzberg 1945 and Huber & Herzberg 1979, from
// memory) against NIST-JANAF Thermochemical Tables (Chase, 4th ed., J. Phys.
// Chem. Ref. Data Monograph 9, 1998), standard state 1 bar. Values marked
// (t) were read from a transcription of the online tables (janaf.nist.gov,
// tables H-064, C-095, N-023, O-029, C-067, Ar-001: H − H298 at 1000 and
// 2000 K of H2O, CO2, N2, O2; S(1000 K) of H2O; Cp(298.15 K) of H2O, CO2,
// N2, O2, Ar; S(298.15 K) of CH4, CO2) and CODATA Key Values (Cox, Wagman
// & Medvedev 1989: S(298.15 K) of H2O, N2, O2); all others are from memory.
// The CH4 increment at 2000 K (123.085 kJ/mol, from memory) is the least
// certain value here: the model's Cp matches the table's to 0.002 % at 1000
// and 2000 K, which integrates to about 123.6 kJ/mol.
var janaf = map[string][]janafRow{
	"H2O": {{298.15, 33.590, 188.835, 0}, {1000, 41.268, 232.738, 26.000}, {2000, 51.180, 264.769, 72.790}},
	"CO2": {{298.15, 37.129, 213.795, 0}, {1000, 54.308, 269.299, 33.397}, {2000, 60.350, 309.293, 91.439}},
	"CH4": {{298.15, 35.639, 186.251, 0}, {1000, 71.795, 247.549, 38.179}, {2000, 94.399, 305.853, 123.085}},
	"N2":  {{298.15, 29.124, 191.609, 0}, {1000, 32.697, 228.170, 21.463}, {2000, 36.616, 252.074, 56.137}},
	"O2":  {{298.15, 29.376, 205.152, 0}, {1000, 34.870, 243.578, 22.703}, {2000, 37.741, 268.748, 59.175}},
}

func TestAgainstJANAF(t *testing.T) {
	for _, name := range []string{"H2O", "CO2", "CH4", "N2", "O2"} {
		t.Run(name, func(t *testing.T) {
			b, ok := BuiltIn(name)
			if !ok {
				t.Fatalf("no built-in %s", name)
			}
			m, err := New(&b.Species, 3000)
			if err != nil {
				t.Fatal(err)
			}
			for _, row := range janaf[name] {
				p := m.At(row.t)
				tolCp, tolH := tolCp298, 0.0
				switch row.t {
				case 1000:
					tolCp, tolH = tolCp1000, tolH1000
				case 2000:
					tolCp, tolH = tolCp2000, tolH2000
				}
				dCp := (p.Cp - row.cp) / row.cp
				dS := (p.S - row.s) / row.s
				if math.Abs(dCp) > tolCp || math.Abs(dS) > tolS {
					t.Errorf("%v K: Cp %.3f (table %.3f, %+.2f %%), S %.3f (table %.3f, %+.3f %%)",
						row.t, p.Cp, row.cp, 100*dCp, p.S, row.s, 100*dS)
				}
				if row.h != 0 {
					dH := (p.H/1000 - row.h) / row.h
					if math.Abs(dH) > tolH {
						t.Errorf("%v K: H-H298 %.3f kJ/mol (table %.3f, %+.2f %%)", row.t, p.H/1000, row.h, 100*dH)
					}
					t.Logf("%6v K: Cp %+.3f %%, S %+.3f %%, H-H298 %+.3f %%", row.t, 100*dCp, 100*dS, 100*dH)
				} else {
					t.Logf("%6v K: Cp %+.3f %%, S %+.3f %%", row.t, 100*dCp, 100*dS)
				}
			}
		})
	}
}

// A monatomic gas is translation alone: the Sackur–Tetrode entropy
// S = R·[ln((2πmk_BT/h²)^(3/2)·k_BT/p°) + 5/2] (Sackur 1911, Tetrode 1912;
// McQuarrie 1976, eq. 5-20), written here from the CODATA constants, and
// Cp = 5R/2, H − H298 = 5R(T − 298.15 K)/2 exactly. Argon (m = 39.948 u)
// at 298.15 K and 1 bar: S° = 154.846 J mol⁻¹ K⁻¹ (CODATA Key Values,
// Cox, Wagman & Medvedev 1989).
func TestArgonSackurTetrode(t *testing.T) {
	const (
		tolExact = 1e-12 // relative: the same formula, evaluated differently
		tolTable = 2e-5  // relative: the table's last digit, 0.001 of 154.846
	)
	b, _ := BuiltIn("Ar")
	m, err := New(&b.Species, 3000)
	if err != nil {
		t.Fatal(err)
	}
	for _, tk := range []float64{50, 298.15, 1000, 3000} {
		p := m.At(tk)
		mass := 39.948 * units.AtomicMass
		lambda := units.Planck / math.Sqrt(2*math.Pi*mass*units.Boltzmann*tk)
		v := units.Boltzmann * tk / 1e5
		s := R * (math.Log(v/(lambda*lambda*lambda)) + 2.5)
		if math.Abs(p.S/s-1) > tolExact || math.Abs(p.Cp/(2.5*R)-1) > tolExact ||
			math.Abs(p.H-2.5*R*(tk-TRef)) > tolExact*2.5*R*tk {
			t.Errorf("%v K: S %.10g (Sackur–Tetrode %.10g), Cp %.10g (5R/2 = %.10g), H-H298 %.10g", tk, p.S, s, p.Cp, 2.5*R, p.H)
		}
	}
	if s := m.At(TRef).S; math.Abs(s/154.846-1) > tolTable {
		t.Errorf("S(298.15 K) = %.4f, CODATA 154.846", s)
	} else {
		t.Logf("S(298.15 K) = %.5f J/(mol K) (CODATA 154.846)", s)
	}
}

// Two electronic levels add the Schottky heat capacity
// Cv/R = x²·r·e^(−x)/(1 + r·e^(−x))², r = g1/g0, x = ε/kT (McQuarrie
// 1976, problem 5-13; standard result), to the 5R/2 of a free atom.
func TestSchottkyHeatCapacity(t *testing.T) {
	const tol = 1e-12 // relative: closed form against the level sums
	atom := rrkm.Species{Name: "X", Mass: 20, Electronic: []rrkm.Level{{Energy: 0, Degeneracy: 2}, {Energy: 500, Degeneracy: 6}}}
	m, err := New(&atom, 3000)
	if err != nil {
		t.Fatal(err)
	}
	for _, tk := range []float64{50, 300, 720, 3000} {
		x := 500 / units.KT(tk)
		e := 3 * math.Exp(-x)
		want := R * (2.5 + x*x*e/((1+e)*(1+e)))
		if got := m.At(tk).Cp; math.Abs(got/want-1) > tol {
			t.Errorf("%v K: Cp %.12g, Schottky %.12g", tk, got, want)
		}
	}
}

// The analytic derivatives of ln q against central differences in ln T of
// the partition functions of pkg/rrkm (MolecularQ, whose hindered rotors
// solve their levels afresh at every temperature): u = d ln q/d ln T and
// c = u + d²ln q/d(ln T)² for a molecule with every kind of degree of
// freedom. Step 1e-3 in ln T for u: truncation h²·q‴/6 ≈ 1e-7; 2e-2 for
// c, where the noise of the re-solved levels (≈1e-11 in ln Q) divided by
// h² stays below 1e-7 and truncation h²/12·q⁗ is about 1e-5.
func TestDerivativesMatchDifferences(t *testing.T) {
	const (
		tolLnQ = 1e-12 // relative: the same sums
		tolU   = 1e-6  // absolute, in units of 1 (u is of order 10)
		tolC   = 1e-3  // absolute, Cv/R of order 10
	)
	s := rrkm.Species{Name: "mixed", Mass: 60, Symmetry: 2, OpticalIsomers: 2,
		Vibrations: []float64{3000, 1500, 1100, 800, 450, 120},
		Rotors:     []rrkm.Rotor{{Dim: 3, Consts: []float64{1.2, 0.3, 0.25}, Symmetry: 1}},
		Hindered: []rrkm.HinderedRotor{{B: 5.3, V0: 1000, Fold: 3},
			{B: 1.1, V0: 400, Fold: 2, Symmetry: 1, Cos: []float64{-60}}},
		Electronic: []rrkm.Level{{Energy: 0, Degeneracy: 2}, {Energy: 700, Degeneracy: 2}}}
	m, err := New(&s, 3000)
	if err != nil {
		t.Fatal(err)
	}
	lnq := func(tk float64) float64 {
		return math.Log(s.MolecularQ(tk) * units.Boltzmann * tk / StandardPressure * 1e6)
	}
	worstU, worstC := 0.0, 0.0
	defer func() { t.Logf("largest |Δu| %.2g, |Δc| %.2g", worstU, worstC) }()
	for _, tk := range []float64{200, 500, 1500, 2800} {
		r := m.reduced(tk)
		if math.Abs(r.lnq/lnq(tk)-1) > tolLnQ {
			t.Errorf("%v K: ln q %.15g, rrkm %.15g", tk, r.lnq, lnq(tk))
		}
		f := func(u float64) float64 { return lnq(tk * math.Exp(u)) }
		const h1, h2 = 1e-3, 2e-2
		u := (f(h1) - f(-h1)) / (2 * h1)
		d1 := (f(h2) - f(-h2)) / (2 * h2)
		d2 := (f(h2) - 2*f(0) + f(-h2)) / (h2 * h2)
		// d ln q/d ln T includes the 1 of V ∝ T in the volume per molecule;
		// u of this package is the internal and translational energy.
		worstU, worstC = math.Max(worstU, math.Abs(r.u-(u-1))), math.Max(worstC, math.Abs(r.c-(d1-1+d2)))
		if math.Abs(r.u-(u-1)) > tolU || math.Abs(r.c-(d1-1+d2)) > tolC {
			t.Errorf("%v K: u %.9g (differences %.9g), c %.7g (differences %.7g)", tk, r.u, u-1, r.c, d1-1+d2)
		}
	}
}

// The level sums here are those of rrkm.HinderedRotor.Q.
func TestHinderedLevelSumsMatchQ(t *testing.T) {
	const tol = 1e-12 // relative: the same levels summed the same way
	hs := []rrkm.HinderedRotor{{B: 5.3, V0: 1000, Fold: 3}, {B: 0.8, V0: 2500, Fold: 2, Cos: []float64{300}}}
	s := rrkm.Species{Name: "h", Mass: 30, Hindered: hs}
	m, err := New(&s, 2500)
	if err != nil {
		t.Fatal(err)
	}
	for _, tk := range []float64{100, 2500} {
		for i, h := range hs {
			lq, _, _ := levelMoments(m.hindered[i], units.KT(tk))
			if want := h.Q(tk); math.Abs(math.Exp(lq)/want-1) > tol {
				t.Errorf("rotor %d at %v K: Q %.15g, rrkm %.15g", i, tk, math.Exp(lq), want)
			}
		}
	}
}

func TestNewRefuses(t *testing.T) {
	for _, tc := range []struct {
		name string
		s    rrkm.Species
		tMax float64
	}{
		{"no mass", rrkm.Species{Name: "a"}, 1000},
		{"transition state", rrkm.Species{Name: "a", Mass: 10, E0: 100}, 1000},
		{"negative frequency", rrkm.Species{Name: "a", Mass: 10, Vibrations: []float64{-5}}, 1000},
		{"too hot", rrkm.Species{Name: "a", Mass: 10}, 2e4},
		{"NaN", rrkm.Species{Name: "a", Mass: 10}, math.NaN()},
	} {
		if _, err := New(&tc.s, tc.tMax); err == nil {
			t.Errorf("%s: accepted", tc.name)
		}
	}
}
