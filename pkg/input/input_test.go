package input

import (
	"errors"
	"io/fs"
	"math"
	"os"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/units"
	"go.yaml.in/yaml/v3"
	"gonum.org/v1/gonum/floats/scalar"
)

// minimal is the smallest complete input; each bad-input case below breaks it
// with one textual edit. Every line that a case edits occurs once.
const minimal = `title: minimal test input
molecules:
  r:
    mass: 28.05 amu
    vibrations: {unit: cm-1, values: [3000, 1500, 1000]}
    rotation: {constants: {unit: cm-1, values: [4.8, 1.0, 0.8]}, symmetry: 2}
    optical-isomers: 1
    lennard-jones: {sigma: 4.2 angstrom, epsilon: 230 K}
  ts:
    energy: 40 kcal/mol
    imaginary-frequency: 800 cm-1
    vibrations: {unit: cm-1, values: [2900, 1200]}
    rotation: {constants: {unit: cm-1, values: [4.0, 0.9, 0.7]}, symmetry: 1}
reaction:
  reactant: r
  via: ts
  products: [a, b]
  path-degeneracy: auto
bath:
  gas: Ar
energy-transfer:
  model: exponential-down
  alpha-300: 250 cm-1
  alpha-exponent: 0.85
grid:
  temperatures: {from: 300 K, to: 1500 K, points: 5}
  pressures: {unit: bar, values: [1, 0.1, 10]}
fits: [troe]
energy-grid:
  fine-grain: 1 cm-1
  grain: 10 cm-1
`

const testFile = "test.yaml"

// edit returns minimal with old replaced by new; old must occur exactly once.
func edit(t *testing.T, old, new string) []byte {
	t.Helper()
	if n := strings.Count(minimal, old); n != 1 {
		t.Fatalf("edit: %q occurs %d times in the minimal input, want 1", old, n)
	}
	return []byte(strings.Replace(minimal, old, new, 1))
}

func TestMinimalIsValid(t *testing.T) {
	m, err := Parse(testFile, []byte(minimal))
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Warnings) != 0 {
		t.Errorf("warnings: %q", m.Warnings)
	}
}

func TestDemo(t *testing.T) {
	m, err := ReadFile("../../internal/demo/demo.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Warnings) != 0 {
		t.Errorf("the demo gives warnings: %q", m.Warnings)
	}
	reactant, ts := m.ReactantAndTS()
	if reactant == nil || ts == nil {
		t.Fatalf("ReactantAndTS = %v, %v", reactant, ts)
	}

	// Unit conversions are exact products, so a relative 1e-6 only covers
	// the 7 digits quoted in docs/design.md §2; lists are checked to 1e-12.
	const (
		quoted = 1e-6
		exact  = 1e-12
	)
	checks := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		// docs/design.md §2: 1 kcal/mol = 349.7551 cm⁻¹.
		{"E0", ts.E0, 42.0 * 349.7551, quoted},
		{"imaginary", ts.Imaginary, 650, exact},
		{"mass", reactant.Mass, 70.09, exact},
		{"vibrations[17]", reactant.Vibrations[17], 260, exact},
		{"rotation A", reactant.Rotors[0].Consts[0], 0.35, exact},
		{"rotation C", ts.Rotors[0].Consts[2], 0.10, exact},
		{"symmetry", reactant.Symmetry, 1, exact},
		{"optical isomers", ts.OpticalIsomers, 1, exact},
		{"sigma", reactant.LJ.Sigma, 5.0, exact},
		{"epsilon", reactant.LJ.Epsilon, 400, exact},
		{"alpha-300", m.Transfer.Alpha300, 250, exact},
		{"alpha-exponent", m.Transfer.AlphaExponent, 0.85, exact},
		{"efficiency", m.Transfer.Efficiency, 1, exact},
		{"fine grain", m.EnergyGrid.Fine, 1, exact},
		{"grain", m.EnergyGrid.Grain, 10, exact},
		{"ceiling", m.EnergyGrid.Ceiling, 0, exact},
		{"path degeneracy", m.Reaction.PathDegeneracy, 0, exact},
	}
	for _, c := range checks {
		if !scalar.EqualWithinAbsOrRel(c.got, c.want, c.tol, c.tol) {
			t.Errorf("%s = %.12g, want %.12g", c.name, c.got, c.want)
		}
	}
	if len(reactant.Vibrations) != 18 || len(ts.Vibrations) != 17 {
		t.Errorf("mode counts %d, %d; want 18, 17", len(reactant.Vibrations), len(ts.Vibrations))
	}
	if r := reactant.Rotors; len(r) != 1 || r[0].Dim != 3 || r[0].Symmetry != 1 {
		t.Errorf("reactant rotors = %+v, want one 3D top with symmetry 1", r)
	}
	if reactant.IsTS || !ts.IsTS {
		t.Errorf("IsTS: reactant %v, ts %v", reactant.IsTS, ts.IsTS)
	}
	if got := strings.Join(m.Fits, ","); got != "troe,plog,chebyshev" {
		t.Errorf("fits = %s", got)
	}
	if got := strings.Join(m.Reaction.Products, ","); got != "frag-a,frag-b" {
		t.Errorf("products = %s", got)
	}
	if m.Bath.Gas != "Ar" || m.Transfer.Model != ExponentialDown {
		t.Errorf("bath %q, model %q", m.Bath.Gas, m.Transfer.Model)
	}
	if m.Molecule("ring") != reactant || m.Molecule("absent") != nil {
		t.Error("Molecule lookup")
	}

	// 16 temperatures from 300 to 2000 K evenly spaced in 1/T, the ends exact.
	temps := m.Temperatures
	if len(temps) != 16 || temps[0] != 300 || temps[15] != 2000 {
		t.Fatalf("temperatures = %v", temps)
	}
	step := (1.0/2000 - 1.0/300) / 15
	for i := 1; i < len(temps); i++ {
		if d := 1/temps[i] - 1/temps[i-1]; math.Abs(d-step) > 1e-12 {
			t.Errorf("1/T[%d] − 1/T[%d] = %.15g K⁻¹, want %.15g", i, i-1, d, step)
		}
	}

	// 19 pressures from 0.001 bar = 100 Pa to 1000 bar = 1e8 Pa, three per
	// decade; the rounding of exp(log) allows a few ulps.
	const logTol = 1e-12
	pres := m.Pressures
	if len(pres) != 19 {
		t.Fatalf("pressures = %v", pres)
	}
	for i, p := range pres {
		want := 100 * math.Pow(10, float64(i)/3)
		if !scalar.EqualWithinRel(p, want, logTol) {
			t.Errorf("pressures[%d] = %.15g Pa, want %g", i, p, want)
		}
	}
}

func TestTestdataDemo(t *testing.T) {
	m, err := ReadFile("../../testdata/demo.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if m.File != "../../testdata/demo.yaml" || len(m.Warnings) != 0 {
		t.Errorf("File %q, warnings %q", m.File, m.Warnings)
	}
}

func TestReadFileMissing(t *testing.T) {
	_, err := ReadFile("testdata/no-such-file.yaml")
	if !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("err = %v, want fs.ErrNotExist", err)
	}
}

// TestConversions checks the unit conversions of single fields against
// values worked out by hand.
func TestConversions(t *testing.T) {
	// B = h/(8π²cI): with CODATA 2018 h, c and m_u, I = 16.857629 amu Å²
	// gives B = 1.000000 cm⁻¹.
	const inertiaTol = 1e-6
	// GHz and MHz: B[cm⁻¹] = B[Hz]/c with c = 29.9792458 GHz cm (exact).
	const exact = 1e-12
	rotation := "rotation: {constants: {unit: cm-1, values: [4.8, 1.0, 0.8]}, symmetry: 2}"
	cases := []struct {
		name, old, new string
		get            func(m *Model) []float64
		want           []float64
		tol            float64
	}{
		{"inertia", rotation, "rotation: {inertia: {unit: amu*angstrom^2, values: [16.857629, 16.857629, 16.857629]}, symmetry: 2}",
			reactantConsts, []float64{1, 1, 1}, inertiaTol},
		{"linear inertia", rotation, "rotation: {linear: true, inertia: {unit: amu*angstrom^2, values: [16.857629]}, symmetry: 2}",
			reactantConsts, []float64{1}, inertiaTol},
		{"GHz", rotation, "rotation: {constants: {unit: GHz, values: [29.9792458, 59.9584916, 14.9896229]}, symmetry: 2}",
			reactantConsts, []float64{1, 2, 0.5}, exact},
		{"MHz linear", rotation, "rotation: {linear: true, constants: {unit: MHz, values: [29979.2458]}, symmetry: 2}",
			reactantConsts, []float64{1}, exact},
		{"imaginary with i", "imaginary-frequency: 800 cm-1", "imaginary-frequency: 650i cm-1",
			func(m *Model) []float64 { _, ts := m.ReactantAndTS(); return []float64{ts.Imaginary} }, []float64{650}, exact},
		{"imaginary negative", "imaginary-frequency: 800 cm-1", "imaginary-frequency: -650 cm-1",
			func(m *Model) []float64 { _, ts := m.ReactantAndTS(); return []float64{ts.Imaginary} }, []float64{650}, exact},
		// 1 kcal/mol = 349.7551 cm⁻¹ (docs/design.md §2), to its 7 quoted digits.
		{"vibrations in kcal/mol", "vibrations: {unit: cm-1, values: [3000, 1500, 1000]}", "vibrations: {unit: kcal/mol, values: [10, 5, 3]}",
			func(m *Model) []float64 { r, _ := m.ReactantAndTS(); return r.Vibrations }, []float64{3497.551, 1748.7755, 1049.2653}, 1e-6},
		// ε/k_B given as an energy comes back in K: 1 kJ/mol / R = 120.27 K
		// (R = 8.314462618 J/(mol K), CODATA 2018).
		{"epsilon in kJ/mol", "epsilon: 230 K", "epsilon: 1 kJ/mol",
			func(m *Model) []float64 { r, _ := m.ReactantAndTS(); return []float64{r.LJ.Epsilon} }, []float64{1000 / 8.314462618}, 1e-9},
		{"explicit temperatures sorted", "temperatures: {from: 300 K, to: 1500 K, points: 5}", "temperatures: {unit: K, values: [1000, 300, 600]}",
			func(m *Model) []float64 { return m.Temperatures }, []float64{300, 600, 1000}, exact},
		{"pressures sorted, in Pa", "pressures: {unit: bar, values: [1, 0.1, 10]}", "pressures: {unit: Torr, values: [760, 7.6]}",
			func(m *Model) []float64 { return m.Pressures }, []float64{1013.25, 101325}, exact},
		{"single temperature", "temperatures: {from: 300 K, to: 1500 K, points: 5}", "temperatures: {from: 500 K, to: 500 K, points: 1}",
			func(m *Model) []float64 { return m.Temperatures }, []float64{500}, exact},
		{"collision rate", "gas: Ar", "gas: Ar\n  collision-rate: 3.1e-10 cm^3/molecule/s",
			func(m *Model) []float64 { return []float64{m.Bath.CollisionRate} }, []float64{3.1e-10}, exact},
		{"path degeneracy", "path-degeneracy: auto", "path-degeneracy: 2",
			func(m *Model) []float64 { return []float64{m.Reaction.PathDegeneracy} }, []float64{2}, exact},
		{"strong collider", "  model: exponential-down\n  alpha-300: 250 cm-1\n  alpha-exponent: 0.85\n", "  model: strong-collider\n  efficiency: 0.3\n",
			func(m *Model) []float64 { return []float64{m.Transfer.Efficiency} }, []float64{0.3}, exact},
		{"electronic", "    optical-isomers: 1\n", "    optical-isomers: 2\n    electronic: [{energy: 0 cm-1, degeneracy: 2}, {energy: 1 eV, degeneracy: 1}]\n",
			func(m *Model) []float64 {
				r, _ := m.ReactantAndTS()
				return []float64{r.OpticalIsomers, r.Electronic[0].Degeneracy, r.Electronic[1].Energy}
			}, []float64{2, 2, units.Cm1PerEV}, exact},
		{"ceiling", "grain: 10 cm-1", "grain: 20 cm-1\n  ceiling: 30000 cm-1",
			func(m *Model) []float64 { return []float64{m.EnergyGrid.Grain, m.EnergyGrid.Ceiling} }, []float64{20, 30000}, exact},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m, err := Parse(testFile, edit(t, tc.old, tc.new))
			if err != nil {
				t.Fatal(err)
			}
			got := tc.get(m)
			if len(got) != len(tc.want) {
				t.Fatalf("got %v, want %v", got, tc.want)
			}
			for i := range got {
				if !scalar.EqualWithinAbsOrRel(got[i], tc.want[i], tc.tol, tc.tol) {
					t.Errorf("[%d] = %.12g, want %.12g", i, got[i], tc.want[i])
				}
			}
		})
	}
}

func reactantConsts(m *Model) []float64 {
	r, _ := m.ReactantAndTS()
	return r.Rotors[0].Consts
}

// TestLinearRotor checks the rotor shape a linear molecule gets.
func TestLinearRotor(t *testing.T) {
	m, err := Parse(testFile, edit(t, "rotation: {constants: {unit: cm-1, values: [4.8, 1.0, 0.8]}, symmetry: 2}",
		"rotation: {linear: true, constants: {unit: cm-1, values: [0.39]}, symmetry: 2}"))
	if err != nil {
		t.Fatal(err)
	}
	r, _ := m.ReactantAndTS()
	if len(r.Rotors) != 1 || r.Rotors[0].Dim != 2 || r.Rotors[0].Symmetry != 1 || r.Symmetry != 2 {
		t.Errorf("rotors %+v, symmetry %v; want one 2D rotor of symmetry 1 and σ = 2", r.Rotors, r.Symmetry)
	}
}

func TestBadInput(t *testing.T) {
	transfer := "  model: exponential-down\n  alpha-300: 250 cm-1\n  alpha-exponent: 0.85\n"
	cases := []struct {
		name, old, new string
		path, value    string // must appear in the message ("" for none)
		hint           string // must appear in the hint, if not ""
	}{
		{"missing unit", "energy: 40 kcal/mol", "energy: 42", "molecules.ts.energy", "42", "kcal/mol"},
		{"unknown unit", "mass: 28.05 amu", "mass: 28.05 amus", "molecules.r.mass", "28.05 amus", "amu"},
		{"wrong dimension", "energy: 40 kcal/mol", "energy: 40 angstrom", "molecules.ts.energy", "40 angstrom", "cm-1"},
		{"not a number", "alpha-300: 250 cm-1", "alpha-300: lots cm-1", "energy-transfer.alpha-300", "lots cm-1", ""},
		{"list without unit", "vibrations: {unit: cm-1, values: [3000, 1500, 1000]}", "vibrations: {values: [3000, 1500, 1000]}", "molecules.r.vibrations.unit", "", "cm-1"},
		{"list not a mapping", "vibrations: {unit: cm-1, values: [3000, 1500, 1000]}", "vibrations: [3000, 1500, 1000]", "molecules.r.vibrations", "", "unit"},
		{"zero frequency", "values: [3000, 1500, 1000]", "values: [3000, 0, 1000]", "molecules.r.vibrations.values[1]", "0", ""},
		// A letter O for a zero is a mistyped number, not a unit.
		{"letter O in a frequency", "values: [3000, 1500, 1000]", "values: [3000, 15O0, 1000]", "molecules.r.vibrations.values[1]", "15O0", "plain number"},
		{"unit on a frequency", "values: [3000, 1500, 1000]", "values: [3000, 1500cm-1, 1000]", "molecules.r.vibrations.values[1]", "1500cm-1", "once for the whole list"},
		{"NaN frequency", "values: [3000, 1500, 1000]", "values: [3000, .nan, 1000]", "molecules.r.vibrations.values[1]", ".nan", ""},
		{"negative frequency in stable species", "values: [3000, 1500, 1000]", "values: [3000, -1500, 1000]", "molecules.r.vibrations.values[1]", "-1500", "is this a transition state?"},
		{"negative frequency in TS", "values: [2900, 1200]", "values: [2900, -800]", "molecules.ts.vibrations.values[1]", "-800", "imaginary-frequency"},
		{"zero imaginary frequency", "imaginary-frequency: 800 cm-1", "imaginary-frequency: 0 cm-1", "molecules.ts.imaginary-frequency", "0 cm-1", ""},
		{"imaginary frequency in stable species", "    optical-isomers: 1\n", "    optical-isomers: 1\n    imaginary-frequency: 500 cm-1\n", "molecules.r.imaginary-frequency", "500 cm-1", "energy"},
		{"two rotational constants", "values: [4.8, 1.0, 0.8]", "values: [4.8, 1.0]", "molecules.r.rotation.constants.values", "[4.8, 1.0]", "linear: true"},
		{"linear with three constants", "rotation: {constants: {unit: cm-1, values: [4.8, 1.0, 0.8]}", "rotation: {linear: true, constants: {unit: cm-1, values: [4.8, 1.0, 0.8]}", "molecules.r.rotation.constants.values", "[4.8, 1.0, 0.8]", ""},
		{"zero rotational constant", "values: [4.8, 1.0, 0.8]", "values: [4.8, 0, 0.8]", "molecules.r.rotation.constants.values[1]", "0", ""},
		{"negative moment of inertia", "constants: {unit: cm-1, values: [4.8, 1.0, 0.8]}", "inertia: {unit: amu*angstrom^2, values: [3.5, -16.9, 21.1]}", "molecules.r.rotation.inertia.values[1]", "-16.9", ""},
		{"rotational constant in wrong unit", "constants: {unit: cm-1, values: [4.8, 1.0, 0.8]}", "constants: {unit: amu, values: [4.8, 1.0, 0.8]}", "molecules.r.rotation.constants.unit", "amu", "GHz"},
		{"symmetry zero", "symmetry: 2}", "symmetry: 0}", "molecules.r.rotation.symmetry", "0", ""},
		{"optical isomers zero", "optical-isomers: 1", "optical-isomers: 0", "molecules.r.optical-isomers", "0", ""},
		{"optical isomers fractional", "optical-isomers: 1", "optical-isomers: 1.5", "molecules.r.optical-isomers", "1.5", ""},
		{"negative E0", "energy: 40 kcal/mol", "energy: -5 kcal/mol", "molecules.ts.energy", "-5 kcal/mol", "zero-point level"},
		// 13990 cm-1 is 40 kcal/mol: the number written with the wrong unit.
		{"E0 above any bond energy", "energy: 40 kcal/mol", "energy: 13990 kcal/mol", "molecules.ts.energy", "13990 kcal/mol", `write "13990 cm-1" (40 kcal/mol)`},
		{"E0 above any bond energy in cm-1", "energy: 40 kcal/mol", "energy: 120000 cm-1", "molecules.ts.energy", "120000 cm-1", "check the unit"},
		{"barrierless threshold above any bond energy", "  path-degeneracy: auto\n", "  path-degeneracy: auto\n  competing:\n    - {barrierless: {A: 1e15 s-1, energy: 400 kcal/mol}, products: [c, d]}\n", "reaction.competing[0].barrierless.energy", "400 kcal/mol", "check the unit"},
		{"E0 beyond floating point", "energy: 40 kcal/mol", "energy: 1e400 kcal/mol", "molecules.ts.energy", "1e400 kcal/mol", "exponent"},
		{"electronic without ground level", "    optical-isomers: 1\n", "    electronic: [{energy: 100 cm-1, degeneracy: 2}]\n", "molecules.r.electronic", "", "0 cm-1"},
		{"epsilon without unit", "epsilon: 230 K", "epsilon: 230", "molecules.r.lennard-jones.epsilon", "230", "K"},
		{"reactant missing", "  reactant: r\n", "", "reaction.reactant", "", "r, ts"},
		{"reactant not a molecule", "reactant: r", "reactant: q", "reaction.reactant", "q", "r, ts"},
		{"reactant misspelt", "reactant: r", "reactant: R", "reaction.reactant", "R", "did you mean r?"},
		{"reactant is a TS", "reactant: r", "reactant: ts", "reaction.reactant", "ts", ""},
		{"via missing", "  via: ts\n", "", "reaction.via", "", ""},
		{"via not a TS", "via: ts", "via: r", "reaction.via", "r", "energy:"},
		{"reactant without mass", "    mass: 28.05 amu\n", "", "molecules.r.mass", "", ""},
		{"path degeneracy zero", "path-degeneracy: auto", "path-degeneracy: 0", "reaction.path-degeneracy", "0", ""},
		{"path degeneracy not a number", "path-degeneracy: auto", "path-degeneracy: many", "reaction.path-degeneracy", "many", "auto"},
		{"unknown top-level key", "fits: [troe]\n", "fits: [troe]\ncolour: blue\n", "colour", "colour", "title"},
		{"misspelt key", "    vibrations: {unit: cm-1, values: [3000", "    vibration: {unit: cm-1, values: [3000", "molecules.r.vibration", "vibration", "did you mean vibrations?"},
		{"misspelt nested key", "alpha-exponent: 0.85", "alpha-exp: 0.85", "energy-transfer.alpha-exp", "alpha-exp", "did you mean alpha-exponent?"},
		{"key given twice", "  via: ts\n", "  via: ts\n  via: ts\n", "reaction.via", "via", ""},
		{"key without value", "  gas: Ar", "  gas:", "bath.gas", "", ""},
		{"zero temperature", "from: 300 K", "from: 0 K", "grid.temperatures.from", "0 K", ""},
		{"temperature in Celsius", "from: 300 K", "from: 27 C", "grid.temperatures.from", "27 C", "K"},
		{"from above to", "from: 300 K", "from: 3000 K", "grid.temperatures.from", "3000 K", "swap"},
		{"no points", "points: 5", "points: 0", "grid.temperatures.points", "0", ""},
		{"one point for a range", "points: 5", "points: 1", "grid.temperatures.points", "1", ""},
		{"negative pressure", "values: [1, 0.1, 10]", "values: [1, -0.1, 10]", "grid.pressures.values[1]", "-0.1", ""},
		{"duplicate temperature", "temperatures: {from: 300 K, to: 1500 K, points: 5}", "temperatures: {unit: K, values: [300, 400, 300]}", "grid.temperatures.values[2]", "300", ""},
		{"range and list mixed", "points: 5}", "points: 5, unit: K}", "grid.temperatures.unit", "K", "one form"},
		{"temperatures missing", "  temperatures: {from: 300 K, to: 1500 K, points: 5}\n", "", "grid.temperatures", "", ""},
		{"unknown fit", "fits: [troe]", "fits: [trow]", "fits[0]", "trow", "did you mean troe?"},
		{"pressure fit without pressures", "  pressures: {unit: bar, values: [1, 0.1, 10]}\n", "", "fits[0]", "troe", "pressures"},
		{"unknown energy-transfer model", "model: exponential-down", "model: exponential", "energy-transfer.model", "exponential", "exponential-down"},
		{"alpha-300 zero", "alpha-300: 250 cm-1", "alpha-300: 0 cm-1", "energy-transfer.alpha-300", "0 cm-1", ""},
		{"efficiency above one", transfer, "  model: strong-collider\n  efficiency: 1.5\n", "energy-transfer.efficiency", "1.5", ""},
		{"efficiency zero", transfer, "  model: strong-collider\n  efficiency: 0\n", "energy-transfer.efficiency", "0", ""},
		{"collision rate in wrong unit", "gas: Ar", "gas: Ar\n  collision-rate: 3.1e-10 cm3/s", "bath.collision-rate", "3.1e-10 cm3/s", "cm3/molecule/s"},
		{"fine grain zero", "fine-grain: 1 cm-1", "fine-grain: 0 cm-1", "energy-grid.fine-grain", "0 cm-1", ""},
		{"grain below fine grain", "grain: 10 cm-1", "grain: 0.5 cm-1", "energy-grid.grain", "0.5 cm-1", ""},
		{"unknown tunnelling", "  path-degeneracy: auto\n", "  path-degeneracy: auto\n  tunnelling: quantum\n", "reaction.tunnelling", "quantum", "wigner"},
		{"eckart without reaction energy", "  path-degeneracy: auto\n", "  path-degeneracy: auto\n  tunnelling: eckart\n", "reaction.tunnelling", "eckart", "reaction-energy"},
		{"competing channel without via", "  path-degeneracy: auto\n", "  path-degeneracy: auto\n  competing:\n    - {products: [c]}\n", "reaction.competing[0].via", "", "barrierless"},
		{"competing channel unknown ts", "  path-degeneracy: auto\n", "  path-degeneracy: auto\n  competing:\n    - {via: nowhere, products: [c]}\n", "reaction.competing[0].via", "nowhere", ""},
		{"barrierless negative n", "  path-degeneracy: auto\n", "  path-degeneracy: auto\n  competing:\n    - {barrierless: {A: 1e15 s-1, n: -1, energy: 80 kcal/mol}, products: [c, d]}\n", "reaction.competing[0].barrierless.n", "-1", ""},
		{"barrierless A without unit", "  path-degeneracy: auto\n", "  path-degeneracy: auto\n  competing:\n    - {barrierless: {A: 1e15, energy: 80 kcal/mol}, products: [c, d]}\n", "reaction.competing[0].barrierless.A", "1e15", "s-1"},
		{"master-equation grain below fine grain", "grain: 10 cm-1", "grain: 10 cm-1\n  master-equation-grain: 0.5 cm-1", "energy-grid.master-equation-grain", "0.5 cm-1", ""},
		{"fine grain above lowest frequency", "  fine-grain: 1 cm-1\n  grain: 10 cm-1\n", "  fine-grain: 1100 cm-1\n  grain: 2000 cm-1\n", "energy-grid.fine-grain", "1100 cm-1", "finer fine-grain"},
		{"ceiling below barrier", "grain: 10 cm-1", "grain: 10 cm-1\n  ceiling: 10 kcal/mol", "energy-grid.ceiling", "10 kcal/mol", ""},
		{"title missing", "title: minimal test input\n", "", "title", "", ""},
		{"empty file", minimal, "", "", "", ""},
		{"only a comment", minimal, "# nothing here\n", "", "", ""},
		{"not YAML", minimal, "title: [unclosed\nmolecules: {\n", "", "", ""},
		{"tab indentation", "    mass: 28.05 amu\n", "\tmass: 28.05 amu\n", "", "", "tabs"},
		{"not a mapping", minimal, "just some text\n", "", "", ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m, err := Parse(testFile, edit(t, tc.old, tc.new))
			if err == nil {
				t.Fatalf("no error; warnings %q", m.Warnings)
			}
			var fe *FieldError
			if !errors.As(err, &fe) {
				t.Fatalf("error %v (%T) is not a *FieldError", err, err)
			}
			msg := err.Error()
			t.Log(msg)
			if strings.Contains(msg, "\n") {
				t.Errorf("message is not a single line: %q", msg)
			}
			if !strings.HasPrefix(msg, testFile) {
				t.Errorf("message does not start with the file name: %q", msg)
			}
			if fe.Path != tc.path {
				t.Errorf("Path = %q, want %q", fe.Path, tc.path)
			}
			if !strings.Contains(msg, tc.path) || !strings.Contains(msg, tc.value) {
				t.Errorf("message %q lacks the path %q or the value %q", msg, tc.path, tc.value)
			}
			if tc.value != "" && fe.Value != tc.value {
				t.Errorf("Value = %q, want %q", fe.Value, tc.value)
			}
			if !strings.Contains(fe.Hint, tc.hint) {
				t.Errorf("Hint = %q, want it to mention %q", fe.Hint, tc.hint)
			}
		})
	}
}

// Model.FieldError places a later check's error at the field's line with its
// value as written; TemperaturePath names the field behind each temperature.
func TestModelFieldError(t *testing.T) {
	m, err := Parse(testFile, []byte(minimal))
	if err != nil {
		t.Fatal(err)
	}
	fe := m.FieldError("bath.gas", errors.New("not in the table"), "give its data")
	if got, want := fe.Error(), `test.yaml:20: bath.gas: "Ar": not in the table (hint: give its data)`; got != want {
		t.Errorf("got  %s\nwant %s", got, want)
	}
	if !m.Has("energy-grid.fine-grain") || m.Has("energy-grid.ceiling") {
		t.Error("Has")
	}
	paths := []string{"grid.temperatures.from", "grid.temperatures", "grid.temperatures", "grid.temperatures", "grid.temperatures.to"}
	for i, want := range paths {
		if got := m.TemperaturePath(i); got != want {
			t.Errorf("TemperaturePath(%d) = %q, want %q", i, got, want)
		}
	}
	// A list is sorted on reading; the path keeps the index as written.
	m, err = Parse(testFile, edit(t, "temperatures: {from: 300 K, to: 1500 K, points: 5}", "temperatures: {unit: K, values: [900, 300, 600]}"))
	if err != nil {
		t.Fatal(err)
	}
	if got := m.TemperaturePath(len(m.Temperatures) - 1); got != "grid.temperatures.values[0]" {
		t.Errorf("path of the highest temperature %q, want grid.temperatures.values[0]", got)
	}
}

// Competing channels, barrierless channels and tunnelling are read with
// their units converted.
func TestChannelsAndTunnelling(t *testing.T) {
	// A second transition state, ts2, for the first competing channel.
	withTS2 := strings.Replace(minimal, "reaction:\n", `  ts2:
    energy: 45 kcal/mol
    imaginary-frequency: 900 cm-1
    vibrations: {unit: cm-1, values: [2950, 1300]}
reaction:
`, 1)
	m, err := Parse(testFile, []byte(strings.Replace(withTS2, "  path-degeneracy: auto\n", `  path-degeneracy: auto
  reaction-energy: 20 kcal/mol
  tunnelling: eckart
  competing:
    - {via: ts2, products: [c], path-degeneracy: 2, tunnelling: wigner}
    - {name: loose, barrierless: {A: 2e15 s-1, T0: 298 K, n: 0.5, energy: 80 kcal/mol}, products: [d, e]}
`, 1)))
	if err != nil {
		t.Fatal(err)
	}
	rx := m.Reaction
	if rx.Tunnelling != Eckart || len(rx.Competing) != 2 {
		t.Fatalf("tunnelling %q, %d competing", rx.Tunnelling, len(rx.Competing))
	}
	c0, c1 := rx.Competing[0], rx.Competing[1]
	if c0.Via != "ts2" || c0.PathDegeneracy != 2 || c0.Tunnelling != Wigner || c0.Name != "ts2" {
		t.Errorf("first competing channel %+v", c0)
	}
	b := c1.Barrierless
	if c1.Name != "loose" || b == nil || b.A != 2e15 || b.T0 != 298 || b.N != 0.5 ||
		math.Abs(b.Energy/(80*units.Cm1PerKcalPerMol)-1) > 1e-12 {
		t.Errorf("barrierless channel %+v %+v", c1, b)
	}
}

// ljLine is the line of minimal after which the torsion tests add a
// molecule's torsions.
const ljLine = "    lennard-jones: {sigma: 4.2 angstrom, epsilon: 230 K}\n"

// Torsions are read with their units; the reduced-moment form converts by
// B = h/(8π²cI) (16.857629 amu Å² ↔ 1 cm⁻¹, units.RotConstFromInertia).
func TestTorsions(t *testing.T) {
	m, err := Parse(testFile, edit(t, ljLine, ljLine+`    torsions:
      - {rotational-constant: 5.3 cm-1, barrier-height: 3.0 kcal/mol, periodicity: 3, symmetry-number: 3}
      - {reduced-moment: 16.857629 amu angstrom2, barrier-height: 0 cm-1, periodicity: 2, harmonics: {unit: cm-1, values: [50]}}
`))
	if err != nil {
		t.Fatal(err)
	}
	// The reactant's torsion is one of its 3N−6 modes: 3 vibrations and 2
	// torsions against the transition state's 2 vibrations imply 4, not 2.
	if len(m.Warnings) != 1 || !strings.Contains(m.Warnings[0], "5 real modes (3 vibrations, 2 torsions) imply 4") {
		t.Errorf("warnings %q, want the one about 4 modes", m.Warnings)
	}
	h := m.Molecule("r").Hindered
	const tol = 1e-12 // exact factors; 16.857629 amu Å² is 1 cm⁻¹ to 7 digits
	if len(h) != 2 || h[0].B != 5.3 || h[0].Fold != 3 || h[0].Symmetry != 3 ||
		!scalar.EqualWithinRel(h[0].V0, 3*units.Cm1PerKcalPerMol, tol) ||
		!scalar.EqualWithinAbsOrRel(h[1].B, 1, 1e-6, 1e-6) || h[1].Fold != 2 || len(h[1].Cos) != 1 || h[1].Cos[0] != 50 {
		t.Errorf("torsions %+v", h)
	}
	_, err = Parse(testFile, edit(t, ljLine, ljLine+"    torsions:\n      - {rotational-constant: 5.3 cm-1, barrier-height: -10 cm-1, periodicity: 3}\n"))
	var fe *FieldError
	if !errors.As(err, &fe) || fe.Path != "molecules.r.torsions[0].barrier-height" || fe.Line != 10 {
		t.Errorf("negative barrier: %v, want an error at molecules.r.torsions[0].barrier-height, line 10", err)
	}
}

// A torsion counts as a mode in the check of the transition state's mode
// count (3N−7 against the reactant's 3N−6), whether it is a torsion or a
// vibration: a reactant's torsion that is a vibration of the transition
// state is no cause for a warning.
func TestTorsionCountsAsMode(t *testing.T) {
	const torsion = "    torsions: [{rotational-constant: 5.3 cm-1, barrier-height: 1000 cm-1, periodicity: 3}]\n"
	cases := []struct {
		name, reactantVib, reactantTors, tsVib, tsTors string
		warning                                        string // "" for none
	}{
		{"reactant torsion, TS vibration", "[3000, 1500]", torsion, "[2900, 1200]", "", ""},
		{"torsion on both sides", "[3000, 1500, 1000]", torsion, "[2900, 1200]", torsion, ""},
		{"TS vibration for the imaginary mode", "[3000, 1500]", torsion, "[2900, 1200, 900]", "", "3 real modes, the same number as the reactant r"},
		{"TS torsion, too many modes", "[3000, 1500, 1000]", "", "[2900, 1200]", torsion, "3 real modes (2 vibrations, 1 torsion), the same number"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			doc := strings.Replace(minimal, "values: [3000, 1500, 1000]", "values: "+tc.reactantVib, 1)
			doc = strings.Replace(doc, "values: [2900, 1200]}\n", "values: "+tc.tsVib+"}\n"+tc.tsTors, 1)
			doc = strings.Replace(doc, ljLine, ljLine+tc.reactantTors, 1)
			m, err := Parse(testFile, []byte(doc))
			if err != nil {
				t.Fatal(err)
			}
			switch {
			case tc.warning == "" && len(m.Warnings) > 0:
				t.Errorf("warnings %q, want none", m.Warnings)
			case tc.warning != "" && (len(m.Warnings) != 1 || !strings.Contains(m.Warnings[0], tc.warning)):
				t.Errorf("warnings %q, want one with %q", m.Warnings, tc.warning)
			}
		})
	}
}

// The hindered-rotor keys of the previous release (hindered-rotors,
// constant, inertia, barrier, fold, symmetry, fourier) still parse, to the
// same molecules as the new names, with one warning per old name that
// names the file, the field and the new name.
func TestTorsionsOldNames(t *testing.T) {
	newDoc := edit(t, ljLine, ljLine+`    torsions:
      - {rotational-constant: 5.3 cm-1, barrier-height: 3.0 kcal/mol, periodicity: 3, symmetry-number: 3}
      - {reduced-moment: 3.2 amu*angstrom^2, barrier-height: 250 cm-1, periodicity: 2, harmonics: {unit: cm-1, values: [50, -10]}}
`)
	oldDoc := edit(t, ljLine, ljLine+`    hindered-rotors:
      - {constant: 5.3 cm-1, barrier: 3.0 kcal/mol, fold: 3, symmetry: 3}
      - {inertia: 3.2 amu*angstrom^2, barrier: 250 cm-1, fold: 2, fourier: {unit: cm-1, values: [50, -10]}}
`)
	mNew, err := Parse(testFile, newDoc)
	if err != nil {
		t.Fatal(err)
	}
	mOld, err := Parse(testFile, oldDoc)
	if err != nil {
		t.Fatal(err)
	}
	for i := range mNew.Molecules {
		if !reflect.DeepEqual(mNew.Molecules[i].Species, mOld.Molecules[i].Species) {
			t.Errorf("%s: old names give %+v, new names %+v", mNew.Molecules[i].Name, mOld.Molecules[i].Species, mNew.Molecules[i].Species)
		}
	}
	if len(mNew.Molecules[0].Hindered) != 2 {
		t.Fatalf("%d torsions, want 2", len(mNew.Molecules[0].Hindered))
	}
	// The warnings of the new file (the mode count) come after those about
	// old names.
	renames := mOld.Warnings[:len(mOld.Warnings)-len(mNew.Warnings)]
	want := []struct{ path, old, new string }{
		{"molecules.r.hindered-rotors", "hindered-rotors", "torsions"},
		{"molecules.r.hindered-rotors[0].constant", "constant", "rotational-constant"},
		{"molecules.r.hindered-rotors[0].barrier", "barrier", "barrier-height"},
		{"molecules.r.hindered-rotors[0].fold", "fold", "periodicity"},
		{"molecules.r.hindered-rotors[0].symmetry", "symmetry", "symmetry-number"},
		{"molecules.r.hindered-rotors[1].inertia", "inertia", "reduced-moment"},
		{"molecules.r.hindered-rotors[1].fourier", "fourier", "harmonics"},
	}
	if len(renames) != len(want) {
		t.Fatalf("warnings %q, want %d about old names", mOld.Warnings, len(want))
	}
	for i, w := range want {
		got := renames[i]
		t.Log(got)
		if !strings.HasPrefix(got, testFile+":") || !strings.Contains(got, " "+w.path+": ") ||
			!strings.Contains(got, strconv.Quote(w.old)) || !strings.Contains(got, "old name of "+w.new+" ") || strings.Contains(got, "\n") {
			t.Errorf("warning %q should name %s, %s, %q and %s on one line", got, testFile, w.path, w.old, w.new)
		}
	}
	// barrier and fold appear twice: one warning each, counting the other.
	if !strings.Contains(renames[2], "1 more place") || strings.Contains(renames[1], "more place") {
		t.Errorf("repeated old names: %q, %q", renames[2], renames[1])
	}
}

// A key written under its old and its new name at once is an error.
func TestTorsionsBothNames(t *testing.T) {
	cases := []struct{ name, torsions, path string }{
		{"block", "    torsions: []\n    hindered-rotors: [{constant: 5.3 cm-1, barrier: 0 cm-1}]\n", "molecules.r.hindered-rotors"},
		{"key", "    torsions: [{rotational-constant: 5.3 cm-1, barrier-height: 0 cm-1, barrier: 0 cm-1}]\n", "molecules.r.torsions[0].barrier"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Parse(testFile, edit(t, ljLine, ljLine+tc.torsions))
			var fe *FieldError
			if !errors.As(err, &fe) || fe.Path != tc.path || !strings.Contains(fe.Error(), "new name") {
				t.Errorf("got %v, want an error at %s about the new name", err, tc.path)
			}
		})
	}
}

// A misspelt key at any level gets a suggestion when a key is close; a
// misspelling of an old name suggests the new one.
func TestUnknownKeySuggestions(t *testing.T) {
	torsion := func(keys string) (string, string) {
		return ljLine, ljLine + "    torsions: [{" + keys + "}]\n"
	}
	comp := func(entry string) (string, string) {
		return "  path-degeneracy: auto\n", "  path-degeneracy: auto\n  competing:\n    - " + entry + "\n"
	}
	type tc struct {
		name, old, new, path, suggestion string
	}
	cases := []tc{
		{"top level", "title: minimal", "titel: minimal", "titel", "title"},
		{"molecule", "optical-isomers: 1", "optical-isomer: 1", "molecules.r.optical-isomer", "optical-isomers"},
		{"list", "vibrations: {unit: cm-1, values: [3000", "vibrations: {units: cm-1, values: [3000", "molecules.r.vibrations.units", "unit"},
		{"rotation", "symmetry: 2}", "symetry: 2}", "molecules.r.rotation.symetry", "symmetry"},
		{"electronic level", "    optical-isomers: 1\n", "    optical-isomers: 1\n    electronic: [{energy: 0 cm-1, degenracy: 1}]\n", "molecules.r.electronic[0].degenracy", "degeneracy"},
		{"lennard-jones", "epsilon: 230 K", "epsilom: 230 K", "molecules.r.lennard-jones.epsilom", "epsilon"},
		{"reaction", "  products: [a, b]\n", "  product: [a, b]\n", "reaction.product", "products"},
		{"bath", "  gas: Ar", "  gass: Ar", "bath.gass", "gas"},
		{"energy-transfer", "alpha-exponent: 0.85", "alpha-exponen: 0.85", "energy-transfer.alpha-exponen", "alpha-exponent"},
		{"grid", "  temperatures: {from", "  temperature: {from", "grid.temperature", "temperatures"},
		{"grid range", "points: 5", "point: 5", "grid.temperatures.point", "points"},
		{"energy-grid", "  fine-grain: 1 cm-1", "  fine-grian: 1 cm-1", "energy-grid.fine-grian", "fine-grain"},
	}
	add := func(name, path, suggestion string, edit func(string) (string, string), arg string) {
		old, new := edit(arg)
		cases = append(cases, tc{name, old, new, path, suggestion})
	}
	add("torsion", "molecules.r.torsions[0].barrier-hieght", "barrier-height", torsion, "rotational-constant: 5.3 cm-1, barrier-hieght: 0 cm-1")
	add("torsion, old name misspelt", "molecules.r.torsions[0].barier", "barrier-height", torsion, "rotational-constant: 5.3 cm-1, barier: 0 cm-1")
	add("torsion, abbreviated", "molecules.r.torsions[0].period", "periodicity", torsion, "rotational-constant: 5.3 cm-1, barrier-height: 0 cm-1, period: 3")
	add("competing channel", "reaction.competing[0].prodcuts", "products", comp, "{via: ts, prodcuts: [c]}")
	add("barrierless", "reaction.competing[0].barrierless.enrgy", "energy", comp, "{barrierless: {A: 1e15 s-1, enrgy: 80 kcal/mol}, products: [c]}")
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Parse(testFile, edit(t, c.old, c.new))
			var fe *FieldError
			if !errors.As(err, &fe) {
				t.Fatalf("got %v, want a *FieldError", err)
			}
			t.Log(err)
			if fe.Path != c.path || !strings.HasPrefix(fe.Hint, "did you mean "+c.suggestion+"?") {
				t.Errorf("Path %q, Hint %q; want %s and a suggestion of %s", fe.Path, fe.Hint, c.path, c.suggestion)
			}
			if strings.Contains(fe.Hint, "hindered-rotors") || strings.Contains(fe.Hint, "fourier") {
				t.Errorf("the hint lists an old key name: %s", fe.Hint)
			}
		})
	}
}

// Every mapping of the file has a shape for messages about a value of the
// wrong kind and the keys of an unknown-key hint: each struct type reached
// from rawFile, and each list or map of them, is in shapes.
func TestShapesCoverRawTypes(t *testing.T) {
	seen := map[reflect.Type]bool{}
	var walk func(reflect.Type)
	walk = func(tp reflect.Type) {
		for tp.Kind() == reflect.Pointer {
			tp = tp.Elem()
		}
		if seen[tp] || tp == reflect.TypeFor[yaml.Node]() {
			return
		}
		seen[tp] = true
		switch tp.Kind() {
		case reflect.Slice, reflect.Map:
			if _, ok := shapes[tp]; !ok {
				t.Errorf("shapes lacks %v", tp)
			}
			walk(tp.Elem())
		case reflect.Struct:
			if _, ok := shapes[tp]; !ok {
				t.Errorf("shapes lacks %v", tp)
			}
			for i := range tp.NumField() {
				walk(tp.Field(i).Type)
			}
		}
	}
	walk(reflect.TypeFor[rawFile]())
}

// Tunnelling needs the transition state's imaginary frequency.
func TestTunnellingNeedsImaginaryFrequency(t *testing.T) {
	doc := strings.Replace(strings.Replace(minimal, "    imaginary-frequency: 800 cm-1\n", "", 1),
		"  path-degeneracy: auto\n", "  path-degeneracy: auto\n  tunnelling: wigner\n", 1)
	_, err := Parse(testFile, []byte(doc))
	var fe *FieldError
	if !errors.As(err, &fe) || fe.Path != "reaction.tunnelling" || !strings.Contains(fe.Hint, "imaginary-frequency") {
		t.Errorf("got %v", err)
	}
}

// A bare number where a unit is needed names the units that would do.
func TestNoUnitHint(t *testing.T) {
	_, err := Parse(testFile, edit(t, "energy: 40 kcal/mol", "energy: 42"))
	var fe *FieldError
	if !errors.As(err, &fe) {
		t.Fatalf("err = %v, want a *FieldError", err)
	}
	if !errors.Is(err, units.ErrNoUnit) {
		t.Errorf("err = %v does not wrap units.ErrNoUnit", err)
	}
	for _, u := range []string{"cm-1", "kcal/mol", "kJ/mol", "eV", "K"} {
		if !strings.Contains(fe.Hint, u) {
			t.Errorf("hint %q does not list %s", fe.Hint, u)
		}
	}
}

func TestFieldErrorFormat(t *testing.T) {
	cases := []struct {
		name string
		err  *FieldError
		want string
	}{
		{"full", &FieldError{File: "a.yaml", Line: 7, Path: "molecules.x.mass", Value: "70", Hint: "write 70 amu", Err: errors.New("no unit")},
			`a.yaml:7: molecules.x.mass: "70": no unit (hint: write 70 amu)`},
		{"no line, no value, no hint", &FieldError{File: "a.yaml", Path: "title", Err: errors.New("missing")},
			`a.yaml: title: missing`},
		{"whole file", &FieldError{File: "a.yaml", Err: errors.New("the file is empty")},
			`a.yaml: the file is empty`},
		{"line breaks folded", &FieldError{File: "a.yaml", Path: "title", Value: "two\nlines", Err: errors.New("bad\nthing")},
			`a.yaml: title: "two\nlines": bad thing`},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.err.Error(); got != tc.want {
				t.Errorf("got  %s\nwant %s", got, tc.want)
			}
		})
	}
}

func TestWarnings(t *testing.T) {
	cases := []struct {
		name, old, new string
		path, word     string // the warning names path and mentions word
	}{
		{"TS without imaginary frequency", "    imaginary-frequency: 800 cm-1\n", "", "molecules.ts", "imaginary-frequency"},
		{"same mode count", "values: [2900, 1200]", "values: [2900, 1200, 900]", "molecules.ts.vibrations", "same number"},
		{"two modes fewer", "values: [2900, 1200]", "values: [2900]", "molecules.ts.vibrations", "imply 2"},
		{"large barrier", "energy: 40 kcal/mol", "energy: 200 kcal/mol", "molecules.ts.energy", "unusually large"},
		{"small barrier", "energy: 40 kcal/mol", "energy: 300 cm-1", "molecules.ts.energy", "unusually small"},
		{"low temperature", "from: 300 K", "from: 50 K", "grid.temperatures", "below 100 K"},
		{"high temperature", "to: 1500 K", "to: 6000 K", "grid.temperatures", "above 5000 K"},
		{"TS mass differs", "    energy: 40 kcal/mol\n", "    energy: 40 kcal/mol\n    mass: 30 amu\n", "molecules.ts.mass", "differs"},
		{"TS without rotation", "    rotation: {constants: {unit: cm-1, values: [4.0, 0.9, 0.7]}, symmetry: 1}\n", "", "molecules.ts", "no rotation"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m, err := Parse(testFile, edit(t, tc.old, tc.new))
			if err != nil {
				t.Fatal(err)
			}
			if len(m.Warnings) != 1 {
				t.Fatalf("warnings = %q, want one", m.Warnings)
			}
			w := m.Warnings[0]
			t.Log(w)
			if !strings.HasPrefix(w, testFile+":") || !strings.Contains(w, " "+tc.path+": ") || !strings.Contains(w, tc.word) {
				t.Errorf("warning %q should name %s, %s and mention %q", w, testFile, tc.path, tc.word)
			}
			if strings.Contains(w, "\n") {
				t.Errorf("warning is not a single line: %q", w)
			}
		})
	}
}

// An alias stands for its anchored value, here a rotation shared by the
// reactant and the transition state.
func TestAlias(t *testing.T) {
	doc := strings.Replace(minimal, "rotation: {constants: {unit: cm-1, values: [4.8", "rotation: &rot {constants: {unit: cm-1, values: [4.8", 1)
	doc = strings.Replace(doc, "rotation: {constants: {unit: cm-1, values: [4.0, 0.9, 0.7]}, symmetry: 1}", "rotation: *rot", 1)
	m, err := Parse(testFile, []byte(doc))
	if err != nil {
		t.Fatal(err)
	}
	r, ts := m.ReactantAndTS()
	if ts.Symmetry != 2 || ts.Rotors[0].Consts[0] != r.Rotors[0].Consts[0] {
		t.Errorf("ts rotation %+v, symmetry %v; want the reactant's", ts.Rotors, ts.Symmetry)
	}
}

// spacing: chebyshev puts a range on the Chebyshev–Gauss–Lobatto nodes of
// its reduced coordinate, 1/T for temperatures and log P for pressures:
// the reduced coordinate of point i is cos(iπ/(n−1)) (by definition,
// Trefethen, Approximation Theory and Approximation Practice, 2013, ch. 2),
// the ends exact; an unknown spacing is refused with a suggestion.
func TestChebyshevSpacing(t *testing.T) {
	const nodeTol = 1e-12 // rounding of 1/T and exp(log P)
	text := strings.Replace(string(demoText(t)), "temperatures: {from: 300 K, to: 2000 K, points: 16}",
		"temperatures: {from: 300 K, to: 2000 K, points: 7, spacing: chebyshev}", 1)
	text = strings.Replace(text, "pressures: {from: 0.001 bar, to: 1000 bar, points: 19}",
		"pressures: {from: 0.001 bar, to: 1000 bar, points: 5, spacing: chebyshev}", 1)
	m, err := Parse("cheb.yaml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	reduced := func(x, lo, hi float64) float64 { return (2*x - (lo + hi)) / (hi - lo) }
	for _, ax := range []struct {
		name   string
		vals   []float64
		f      func(float64) float64
		lo, hi float64
		first  float64
	}{
		{"temperatures", m.Temperatures, func(v float64) float64 { return 1 / v }, 1.0 / 2000, 1.0 / 300, 300},
		{"pressures", m.Pressures, math.Log, math.Log(100), math.Log(1e8), 100},
	} {
		n := len(ax.vals)
		if ax.vals[0] != ax.first {
			t.Errorf("%s: first point %v", ax.name, ax.vals[0])
		}
		for i, v := range ax.vals {
			want := math.Cos(math.Pi * float64(i) / float64(n-1))
			if ax.name == "pressures" {
				want = -want // log P rises with i, 1/T falls
			}
			if got := reduced(ax.f(v), ax.lo, ax.hi); math.Abs(got-want) > nodeTol {
				t.Errorf("%s[%d] = %v: reduced %v, want %v", ax.name, i, v, got, want)
			}
		}
	}
	_, err = Parse("bad.yaml", []byte(strings.Replace(text, "points: 7, spacing: chebyshev", "points: 7, spacing: chebychev", 1)))
	if err == nil || !strings.Contains(err.Error(), "did you mean chebyshev") {
		t.Errorf("misspelt spacing: %v", err)
	}
}

// demoText returns the demo input's text.
func demoText(t *testing.T) []byte {
	t.Helper()
	b, err := os.ReadFile("../../internal/demo/demo.yaml")
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// A value holding U+FFFD (the replacement character, printable to
// strconv.Quote) is escaped in messages like every other rune a message
// must not carry raw (found by FuzzReadCSV in the table reader).
func TestReplacementCharacterEscaped(t *testing.T) {
	_, err := Parse("x.yaml", []byte("title: \"\ufffd\"\nmolecules: {r: {mass: \"\ufffd amu\"}}\n"))
	if err == nil {
		t.Fatal("accepted")
	}
	if strings.ContainsRune(err.Error(), '\ufffd') {
		t.Errorf("raw U+FFFD in %q", err.Error())
	}
}

// reaction.rotation: all-active by default; the three treatments read as
// written; anything else refused at the field, with the choices in the hint.
func TestRotationTreatment(t *testing.T) {
	m, err := Parse(testFile, []byte(minimal))
	if err != nil {
		t.Fatal(err)
	}
	if m.Reaction.Rotation != AllActive {
		t.Errorf("default rotation %q, want %q", m.Reaction.Rotation, AllActive)
	}
	for _, r := range []Rotation{AllActive, AdiabaticJ, AdiabaticJAveraged} {
		m, err := Parse(testFile, edit(t, "  path-degeneracy: auto\n", "  path-degeneracy: auto\n  rotation: "+string(r)+"\n"))
		if err != nil || m.Reaction.Rotation != r {
			t.Errorf("rotation: %s read as %q, %v", r, m.Reaction.Rotation, err)
		}
	}
	_, err = Parse(testFile, edit(t, "  path-degeneracy: auto\n", "  path-degeneracy: auto\n  rotation: adiabatic\n"))
	var fe *FieldError
	if !errors.As(err, &fe) || fe.Path != "reaction.rotation" || fe.Value != "adiabatic" || !strings.Contains(fe.Hint, "adiabatic-j") {
		t.Errorf("rotation: adiabatic: %v", err)
	}
}
