package units

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/unit/constant"
)

// The exact SI constants agree with gonum's copy of CODATA 2018
// (gonum.org/v1/gonum/unit/constant), an independent transcription.
func TestConstantsMatchGonum(t *testing.T) {
	cases := []struct {
		name      string
		got, want float64
	}{
		{"h", Planck, float64(constant.Planck)},
		{"k_B", Boltzmann, float64(constant.Boltzmann)},
		{"N_A", Avogadro, float64(constant.Avogadro)},
		{"c", LightSI, float64(constant.LightSpeedInVacuum)},
		{"m_u", AtomicMass, float64(constant.AtomicMass)},
	}
	for _, tc := range cases {
		if tc.got != tc.want {
			t.Errorf("%s = %v, gonum has %v", tc.name, tc.got, tc.want)
		}
	}
}

// Derived conversions against the values quoted in docs/design.md §2, which are
// the CODATA 2018 values rounded to the digits shown; the tolerance is half a
// unit in the last quoted digit.
func TestDerivedConversions(t *testing.T) {
	cases := []struct {
		name      string
		got, want float64
		abs       float64
	}{
		{"k_B/hc cm-1/K", KelvinToCm1, 0.695034800, 0.5e-9},
		{"kcal/mol in cm-1", Cm1PerKcalPerMol, 349.7551, 0.5e-4},
		{"kJ/mol in cm-1", Cm1PerKJPerMol, 83.59347, 0.5e-5},
		{"eV in cm-1", Cm1PerEV, 8065.544, 0.5e-3},
		// 1 cm⁻¹ = 29.9792458 GHz (exact, from c).
		{"GHz in cm-1", 1 / Cm1PerGHz, 29.9792458, 1e-12},
		// B·I = h/(8π²c) = 16.857629 amu Å² cm⁻¹ (from memory; follows from CODATA 2018).
		{"B*I amu A^2 cm-1", RotConstFromInertia, 16.857629, 1e-5},
	}
	for _, tc := range cases {
		if math.Abs(tc.got-tc.want) > tc.abs {
			t.Errorf("%s = %.10g, want %.10g ± %g", tc.name, tc.got, tc.want, tc.abs)
		}
	}
}

func TestParse(t *testing.T) {
	const tol = 1e-12 // pure multiplications by exact factors
	cases := []struct {
		text string
		dim  Dimension
		want float64
	}{
		{"500 cm-1", Energy, 500},
		{"1 kcal/mol", Energy, Cm1PerKcalPerMol},
		{"4.184 kJ/mol", Energy, Cm1PerKcalPerMol},
		{"4184 J/mol", Energy, Cm1PerKcalPerMol},
		{"1000 cal/mol", Energy, Cm1PerKcalPerMol},
		{"1 eV", Energy, Cm1PerEV},
		{"100 K", Energy, 100 * KelvinToCm1},
		{"300 K", Temperature, 300},
		{"86.13 amu", Mass, 86.13},
		{"28 g/mol", Mass, 28},
		{"3.47 angstrom", Length, 3.47},
		{"0.347 nm", Length, 3.47},
		{"29.9792458 GHz", RotConst, 1},
		{"16.857629 amu*angstrom^2", Inertia, 16.857629},
		{"1 atm", Pressure, 101325},
		{"760 Torr", Pressure, 101325},
		{"1e-3 bar", Pressure, 100},
		{"  2.5E+2   cm-1 ", Energy, 250},
		{"1e15 s-1", Rate, 1e15},
		{"60 min-1", Rate, 1},
	}
	for _, tc := range cases {
		got, err := Parse(tc.text, tc.dim)
		if err != nil {
			t.Errorf("Parse(%q): %v", tc.text, err)
			continue
		}
		if !scalar.EqualWithinAbsOrRel(got, tc.want, tol, tol) {
			t.Errorf("Parse(%q) = %.15g, want %.15g", tc.text, got, tc.want)
		}
	}
}

// Every spelling of the moment-of-inertia unit means amu Å²; g*cm^2 is
// checked against the CODATA 2018 atomic mass constant, m_u =
// 1.66053906660e-27 kg, so 1 amu Å² = 1.66053906660e-40 g cm².
func TestInertiaSpellings(t *testing.T) {
	const tol = 1e-12 // exact factors; one rounding in the g*cm^2 one
	cases := []struct {
		text string
		want float64 // amu Å²
	}{
		{"3.2 amu angstrom2", 3.2},
		{"3.2 amu Å2", 3.2},
		{"3.2 AMU Angstrom2", 3.2},
		{"3.2 amu*angstrom2", 3.2},
		{"3.2 amu*Å^2", 3.2},
		{"3.2 amu angstrom^2", 3.2},
		{"3.2 amu*angstrom^2", 3.2},
		{"1.66053906660e-40 g*cm^2", 1},
	}
	for _, tc := range cases {
		got, err := Parse(tc.text, Inertia)
		if err != nil {
			t.Errorf("Parse(%q): %v", tc.text, err)
			continue
		}
		if !scalar.EqualWithinAbsOrRel(got, tc.want, tol, tol) {
			t.Errorf("Parse(%q) = %.15g amu Å², want %.15g", tc.text, got, tc.want)
		}
	}
	if got := Inertia.Internal(); got != "amu angstrom2" {
		t.Errorf("Inertia.Internal() = %q, want the plain spelling amu angstrom2", got)
	}
	for _, bad := range []string{"3.2 amu angstrom3", "3.2 amu angstrom"} {
		if _, err := Parse(bad, Inertia); err == nil {
			t.Errorf("Parse(%q) accepted", bad)
		}
	}
}

func TestParseRejects(t *testing.T) {
	cases := []struct {
		text   string
		dim    Dimension
		noUnit bool
	}{
		{"38.4", Energy, true},
		{"38.4 kcal", Energy, false},
		{"300 C", Temperature, false},
		{"3 furlong", Length, false},
		{"kcal/mol", Energy, false},
		{"1e999 K", Temperature, false},
		{"1 atm", Energy, false},
	}
	for _, tc := range cases {
		_, err := Parse(tc.text, tc.dim)
		if err == nil {
			t.Errorf("Parse(%q, %v) accepted", tc.text, tc.dim)
			continue
		}
		if got := errors.Is(err, ErrNoUnit); got != tc.noUnit {
			t.Errorf("Parse(%q): errors.Is(ErrNoUnit) = %v, want %v (%v)", tc.text, got, tc.noUnit, err)
		}
	}
}

// Format is the inverse of Parse.
func TestFormatRoundTrip(t *testing.T) {
	for _, u := range []string{"cm-1", "kcal/mol", "kJ/mol", "J/mol", "eV", "K"} {
		v := 12345.678
		back, err := Parse(Format(v, u, Energy), Energy)
		if err != nil || !scalar.EqualWithinRel(back, v, 1e-14) {
			t.Errorf("%s: %v -> %q -> %v (%v)", u, v, Format(v, u, Energy), back, err)
		}
	}
}

// A finite number whose value in the internal unit overflows is an error,
// not +Inf: 1e308 kcal/mol is 3.5e310 cm⁻¹, beyond math.MaxFloat64.
func TestParseRange(t *testing.T) {
	cases := []struct {
		text string
		dim  Dimension
	}{
		{"1e308 kcal/mol", Energy},
		{"-1e308 hartree", Energy},
		{"1e300 g*cm^2", Inertia},
		{"1e306 atm", Pressure},
	}
	for _, tc := range cases {
		v, err := Parse(tc.text, tc.dim)
		if !errors.Is(err, ErrRange) {
			t.Errorf("Parse(%q, %v) = %v, %v; want ErrRange", tc.text, tc.dim, v, err)
		}
	}
}
