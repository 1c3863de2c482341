package rrkm

import (
	"fmt"
	"math"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/units"
	"gonum.org/v1/gonum/floats/scalar"
)

// Inputs for the identity tests. The reactant data are literature values
// (from memory): HCN fundamentals and B from Herzberg, Infrared and Raman
// Spectra (1945); CH3NC fundamentals and rotational constants after
// Shimanouchi, NSRDS-NBS 39 (1972). The transition states are illustrative.
// The identity is exact for any input, so the data need not be accurate.
func hcnPair() (*Species, *Species) {
	r := &Species{Name: "HCN", Mass: 27.03, Vibrations: []float64{3311, 2097, 713, 713},
		Rotors: []Rotor{{Dim: 2, Consts: []float64{1.478}, Symmetry: 1}}, Symmetry: 1}
	ts := &Species{Name: "HCN-TS", Mass: 27.03, E0: 16600, Vibrations: []float64{2600, 1250},
		Rotors: []Rotor{{Dim: 3, Consts: []float64{21.0, 1.55, 1.44}, Symmetry: 1}}, Symmetry: 1}
	return r, ts
}

func ch3ncPair() (*Species, *Species) {
	r := &Species{Name: "CH3NC", Mass: 41.05,
		Vibrations: []float64{3014, 2966, 2966, 2166, 1467, 1467, 1429, 1129, 1129, 945, 263, 263},
		Rotors:     []Rotor{{Dim: 3, Consts: []float64{5.25, 0.3357, 0.3357}, Symmetry: 1}}, Symmetry: 3}
	ts := &Species{Name: "CH3NC-TS", Mass: 41.05, E0: 13300,
		Vibrations: []float64{3050, 2990, 2990, 2100, 1450, 1450, 1400, 1100, 1100, 600, 280},
		Rotors:     []Rotor{{Dim: 3, Consts: []float64{1.9, 0.42, 0.38}, Symmetry: 1}}, Symmetry: 1}
	return r, ts
}

// ethanePair is ethane with its torsion as a hindered methyl rotor and an
// illustrative transition state with two hindered rotors, one of them with a
// Fourier series. Ethane's other 17 fundamentals, its rotational constants,
// B ≈ 10.5 cm⁻¹ for the torsion (I_CH3/2 ≈ 1.6 amu Å²) and V0 ≈ 1024 cm⁻¹
// are from memory (Shimanouchi 1972; Herzberg 1945). The TST identity is
// exact for any input, so the data need not be accurate.
func ethanePair() (*Species, *Species) {
	r := &Species{Name: "C2H6", Mass: 30.07,
		Vibrations: []float64{2954, 1388, 995, 2896, 1379, 2969, 2969, 1468, 1468, 1190, 1190,
			2985, 2985, 1469, 1469, 822, 822},
		Rotors:   []Rotor{{Dim: 3, Consts: []float64{2.671, 0.663, 0.663}, Symmetry: 1}},
		Hindered: []HinderedRotor{{B: 10.5, V0: 1024, Fold: 3}}, Symmetry: 6}
	ts := &Species{Name: "C2H6-TS", Mass: 30.07, E0: 30000,
		Vibrations: []float64{2990, 2990, 2950, 2950, 1450, 1450, 1400, 1380, 1100, 1050, 900, 700, 520, 410},
		Rotors:     []Rotor{{Dim: 3, Consts: []float64{2.4, 0.45, 0.44}, Symmetry: 1}},
		Hindered: []HinderedRotor{{B: 10.5, V0: 300, Fold: 3},
			{B: 2.0, V0: 150, Fold: 2, Symmetry: 1, Cos: []float64{30}}}, Symmetry: 1}
	return r, ts
}

// The central consistency check of TST: the Boltzmann average of RRKM k(E),
// (1/Q)∫k(E)ρ(E)e^(−E/kT)dE, equals canonical L(kT/h)(Q‡/Q)e^(−E0/kT)
// (standard result: Holbrook, Pilling & Robertson, Unimolecular Reactions,
// 1996, eq. 4.26; Forst, Unimolecular Reactions, 2003, ch. 6). The issue asks
// for 0.5 %; the grain error on 10 cm⁻¹ grains is O((Δ/kT)²) ≈ 1e-4 at 200 K,
// so the test holds it to 1e-3. The ethane pair carries hindered rotors in
// both species, counted from their levels and in Q from the same levels.
func TestThermalAverageEqualsCanonical(t *testing.T) {
	const tol = 1e-3
	temps := []float64{200, 300, 500, 1000, 2000, 3000}
	for _, pair := range []func() (*Species, *Species){hcnPair, ch3ncPair, ethanePair} {
		r, ts := pair()
		t.Run(r.Name, func(t *testing.T) {
			ceiling := ts.E0 + 40*kT(3000)
			rc, tc := countPair(t, r, ts, ceiling)
			l := PathDegeneracy(r, ts)
			m := RRKM(rc, tc, l, GrainsTo(10, ceiling-10))
			worst := 0.0
			defer func() { t.Logf("%s: worst |<k(E)>/k∞ − 1| = %.2g", r.Name, worst) }()
			for _, tK := range temps {
				got, want := m.ThermalK(tK), KInf(r, ts, l, tK)
				worst = math.Max(worst, math.Abs(got/want-1))
				if !scalar.EqualWithinRel(got, want, tol) {
					t.Errorf("%v K: <k(E)> = %.6g, k∞ = %.6g s-1 (ratio %.6f)", tK, got, want, got/want)
				}
			}
		})
	}
}

// At threshold only the transition state's ground level is open, W‡ = 1, so
// k(E) = L/(h·ρ(E)) (RRKM, a fact of the theory): k·ρ/c = L on every grain
// whose whole width lies between E0 and E0 + the lowest TS level.
func TestThresholdRate(t *testing.T) {
	r, ts := ch3ncPair()
	ts.Rotors = nil // pure vibrational TS: W‡ is a step of 1 at E0
	rc, _ := NewCounter(r, 1, 20000)
	tc, _ := NewCounter(ts, 1, 20000)
	g := GrainsTo(10, 19000)
	m := RRKM(rc, tc, 3, g)
	for i := range g.N {
		lo, hi := g.Energy(i)-5, g.Energy(i)+5
		if lo > ts.E0 && hi < ts.E0+280 {
			if got := m.K[i] * m.Counts[i] / g.Width / units.LightCm; !scalar.EqualWithinRel(got, 3, 1e-12) {
				t.Errorf("grain %v cm-1: k·ρ/c = %v, want L = 3", g.Energy(i), got)
			}
		}
	}
}

// Reaction-path degeneracy L = σ_R·m‡/(σ‡·m_R) (Pollak & Pechukas, J. Am.
// Chem. Soc. 100, 2984, 1978): e.g. CH4 → CH3 + H through a C3v TS has
// L = 12/3 = 4, the number of equivalent H atoms.
func TestPathDegeneracy(t *testing.T) {
	cases := []struct {
		sr, mr, sts, mts, want float64
	}{
		{12, 1, 3, 1, 4},
		{2, 1, 1, 2, 4}, // a chiral TS from an achiral C2 reactant: 2·2
		{1, 1, 1, 1, 1},
		{3, 1, 1, 1, 3},
	}
	for _, tc := range cases {
		r := &Species{Symmetry: tc.sr, OpticalIsomers: tc.mr}
		ts := &Species{Symmetry: tc.sts, OpticalIsomers: tc.mts}
		if got := PathDegeneracy(r, ts); got != tc.want {
			t.Errorf("σR=%v mR=%v σ‡=%v m‡=%v: L = %v, want %v", tc.sr, tc.mr, tc.sts, tc.mts, got, tc.want)
		}
	}
}

// Translational partition function per volume of Ar at 298.15 K:
// 1/Λ³ = (2πmkT/h²)^(3/2) with the thermal wavelength Λ(Ar, 298 K) = 16.0 pm
// quoted in Atkins' Physical Chemistry (from memory); 3 significant figures,
// so the tolerance is 0.5 %.
func TestTranslationalQ(t *testing.T) {
	ar := &Species{Mass: 39.948}
	got := ar.TranslationalQ(298.15) * 1e6 // per m³
	if want := math.Pow(16.0e-12, -3); !scalar.EqualWithinRel(got, want, 0.005) {
		t.Errorf("q_trans/V = %.4g m-3, want %.4g", got, want)
	}
	// Exact scaling: ∝ (mT)^(3/2).
	if r := ar.TranslationalQ(4*298.15) / ar.TranslationalQ(298.15); math.Abs(r-8) > 1e-12 {
		t.Errorf("T scaling %v, want 8", r)
	}
}

func ExampleRRKM() {
	// Methyl isocyanide with an illustrative transition state.
	r, ts := ch3ncPair()
	rc, _ := NewCounter(r, 1, 40000)
	tc, _ := NewCounter(ts, 1, 40000)
	l := PathDegeneracy(r, ts)
	m := RRKM(rc, tc, l, GrainsTo(10, 39000))
	fmt.Printf("L = %g\n", l)
	fmt.Printf("k(20000 cm-1) = %.3g s-1\n", m.K[2000])
	fmt.Printf("<k(E)>/k∞ at 500 K = %.4f\n", m.ThermalK(500)/KInf(r, ts, l, 500))
	// Output:
	// L = 3
	// k(20000 cm-1) = 1.06e+10 s-1
	// <k(E)>/k∞ at 500 K = 1.0000
}

// countPair counts a reactant and transition state on a 1 cm⁻¹ fine grain up
// to ceiling cm⁻¹.
func countPair(t testing.TB, r, ts *Species, ceiling float64) (*Counter, *Counter) {
	t.Helper()
	rc, err := NewCounter(r, 1, ceiling)
	if err != nil {
		t.Fatal(err)
	}
	tc, err := NewCounter(ts, 1, ceiling)
	if err != nil {
		t.Fatal(err)
	}
	return rc, tc
}
