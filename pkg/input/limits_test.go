package input

import (
	"errors"
	"fmt"
	"github.com/falloff-kinetics/falloff/pkg/escape"
	"strings"
	"testing"
)

// Every value has a physical range (limits.go): real molecules, gases and
// experiments pass, a value beyond the range is refused at its field. Each
// case gives a value from the world just inside the range and an absurd one
// just outside it. The reference values: H atom 1.008 amu, H2 stretch
// 4161 cm⁻¹ and B = 60.85 cm⁻¹ (Huber & Herzberg, Constants of Diatomic
// Molecules, 1979); helium's first ionization energy 24.587 eV (NIST Atomic
// Spectra Database); He σ = 2.551 Å, ε/k_B = 10.22 K and H2O ε/k_B =
// 809.1 K (Reid, Prausnitz & Poling 1987, App. B); the icosahedral
// symmetry number 60 (C60); the C=C torsional barrier, about 65 kcal/mol
// (from memory); a 6-fold methyl torsion (toluene).
func TestLimits(t *testing.T) {
	const (
		lj    = "lennard-jones: {sigma: 4.2 angstrom, epsilon: 230 K}"
		vib   = "vibrations: {unit: cm-1, values: [3000, 1500, 1000]}"
		rot   = "rotation: {constants: {unit: cm-1, values: [4.8, 1.0, 0.8]}, symmetry: 2}"
		oi    = "    optical-isomers: 1\n"
		pd    = "  path-degeneracy: auto\n"
		gas   = "  gas: Ar\n"
		temps = "temperatures: {from: 300 K, to: 1500 K, points: 5}"
		press = "pressures: {unit: bar, values: [1, 0.1, 10]}"
	)
	torsion := func(fields string) string {
		return oi + "    torsions: [{" + fields + "}]\n"
	}
	harmonics := func(n int) string {
		return torsion("rotational-constant: 5.3 cm-1, barrier-height: 1000 cm-1, periodicity: 3, harmonics: {unit: cm-1, values: [" +
			strings.TrimSuffix(strings.Repeat("1, ", n), ", ") + "]}")
	}
	cases := []struct {
		name, old, new string
		path           string // the field refused; "" if accepted
	}{
		{"H atom mass", "mass: 28.05 amu", "mass: 1.008 amu", ""},
		{"mass below H", "mass: 28.05 amu", "mass: 0.5 amu", "molecules.r.mass"},
		{"mass of 1e6 amu", "mass: 28.05 amu", "mass: 1e6 amu", "molecules.r.mass"},
		{"H2 stretch", vib, "vibrations: {unit: cm-1, values: [4161, 1500, 1000]}", ""},
		{"vibration above any", vib, "vibrations: {unit: cm-1, values: [12000, 1500, 1000]}", "molecules.r.vibrations.values[0]"},
		{"level below He ionization", oi, oi + "    electronic: [{energy: 0 cm-1, degeneracy: 2}, {energy: 24.5 eV, degeneracy: 17}]\n", ""},
		{"level above He ionization", oi, oi + "    electronic: [{energy: 0 cm-1, degeneracy: 2}, {energy: 24.7 eV}]\n", "molecules.r.electronic[1].energy"},
		{"degeneracy 1001", oi, oi + "    electronic: [{energy: 0 cm-1, degeneracy: 1001}]\n", "molecules.r.electronic[0].degeneracy"},
		{"He-like Lennard-Jones", lj, "lennard-jones: {sigma: 2.551 angstrom, epsilon: 10.22 K}", ""},
		{"water-like epsilon", lj, "lennard-jones: {sigma: 2.641 angstrom, epsilon: 809.1 K}", ""},
		{"sigma below any atom", lj, "lennard-jones: {sigma: 0.5 angstrom, epsilon: 230 K}", "molecules.r.lennard-jones.sigma"},
		{"epsilon below any", lj, "lennard-jones: {sigma: 4.2 angstrom, epsilon: 0.5 K}", "molecules.r.lennard-jones.epsilon"},
		{"epsilon above any", lj, "lennard-jones: {sigma: 4.2 angstrom, epsilon: 2e4 K}", "molecules.r.lennard-jones.epsilon"},
		{"H2 rotational constant", rot, "rotation: {constants: {unit: cm-1, values: [60.85, 1.0, 0.8]}, symmetry: 2}", ""},
		{"constant above H2", rot, "rotation: {constants: {unit: cm-1, values: [200, 1.0, 0.8]}, symmetry: 2}", "molecules.r.rotation.constants.values[0]"},
		{"inertia giving B above H2", rot, "rotation: {inertia: {unit: amu angstrom2, values: [0.01, 20, 21]}, symmetry: 2}", "molecules.r.rotation.inertia.values[0]"},
		{"icosahedral symmetry", rot, "rotation: {constants: {unit: cm-1, values: [4.8, 1.0, 0.8]}, symmetry: 60}", ""},
		{"symmetry above icosahedral", rot, "rotation: {constants: {unit: cm-1, values: [4.8, 1.0, 0.8]}, symmetry: 61}", "molecules.r.rotation.symmetry"},
		{"centrosymmetric linear", rot, "rotation: {linear: true, constants: {unit: cm-1, values: [0.39]}, symmetry: 2}", ""},
		{"linear with symmetry 3", rot, "rotation: {linear: true, constants: {unit: cm-1, values: [0.39]}, symmetry: 3}", "molecules.r.rotation.symmetry"},
		{"chiral", oi, "    optical-isomers: 2\n", ""},
		{"65 optical isomers", oi, "    optical-isomers: 65\n", "molecules.r.optical-isomers"},
		{"C=C torsion", oi, torsion("rotational-constant: 5.3 cm-1, barrier-height: 65 kcal/mol, periodicity: 2"), ""},
		{"torsion above any bond", oi, torsion("rotational-constant: 5.3 cm-1, barrier-height: 301 kcal/mol, periodicity: 2"), "molecules.r.torsions[0].barrier-height"},
		{"6-fold torsion", oi, torsion("rotational-constant: 5.3 cm-1, barrier-height: 5 cm-1, periodicity: 6"), ""},
		{"13-fold torsion", oi, torsion("rotational-constant: 5.3 cm-1, barrier-height: 5 cm-1, periodicity: 13"), "molecules.r.torsions[0].periodicity"},
		{"32 harmonics", oi, harmonics(32), ""},
		{"33 harmonics", oi, harmonics(33), "molecules.r.torsions[0].harmonics.values"},
		{"phenyl-like torsion", oi, torsion("reduced-moment: 80 amu angstrom2, barrier-height: 1000 cm-1, periodicity: 2"), ""},
		{"torsion heavier than any", oi, torsion("reduced-moment: 1e5 amu angstrom2, barrier-height: 1000 cm-1, periodicity: 2"), "molecules.r.torsions[0].reduced-moment"},
		{"L = 120", pd, "  path-degeneracy: 120\n", ""},
		{"L = 1/120", pd, "  path-degeneracy: 0.00834\n", ""},
		{"L = 1e308", pd, "  path-degeneracy: 1e308\n", "reaction.path-degeneracy"},
		{"L = 1e-4", pd, "  path-degeneracy: 1e-4\n", "reaction.path-degeneracy"},
		{"ion capture rate", gas, gas + "  collision-rate: 2e-9 cm3/molecule/s\n", ""},
		{"collision rate 1e300", gas, gas + "  collision-rate: 1e300 cm3/molecule/s\n", "bath.collision-rate"},
		{"collision rate 1e-14", gas, gas + "  collision-rate: 1e-14 cm3/molecule/s\n", "bath.collision-rate"},
		{"bath of He mass", gas, gas + "  mass: 4.0026 amu\n", ""},
		{"bath mass in kg/mol", gas, gas + "  mass: 0.004 amu\n", "bath.mass"},
		{"5000 K", temps, "temperatures: {from: 300 K, to: 5000 K, points: 5}", ""},
		{"20000 K", temps, "temperatures: {from: 300 K, to: 20000 K, points: 5}", "grid.temperatures.to"},
		{"UHV and 1 kbar", press, "pressures: {unit: Pa, values: [1e-10, 1, 1e8]}", ""},
		{"below 1e-10 Pa", press, "pressures: {unit: Pa, values: [1e-11, 1, 1e8]}", "grid.pressures.values[0]"},
		{"above 10 kbar", press, "pressures: {unit: bar, values: [1, 0.1, 1e5]}", "grid.pressures.values[2]"},
		{"alpha of 2000 cm-1", "alpha-300: 250 cm-1", "alpha-300: 2000 cm-1", ""},
		{"alpha in kcal/mol", "alpha-300: 250 cm-1", "alpha-300: 250 kcal/mol", "energy-transfer.alpha-300"},
		{"alpha exponent 1e3", "alpha-exponent: 0.85", "alpha-exponent: 1000", "energy-transfer.alpha-exponent"},
		{"H-transfer imaginary frequency", "imaginary-frequency: 800 cm-1", "imaginary-frequency: 4000 cm-1", ""},
		{"imaginary frequency 1e6", "imaginary-frequency: 800 cm-1", "imaginary-frequency: 1e6 cm-1", "molecules.ts.imaginary-frequency"},
		{"imaginary frequency 0.5", "imaginary-frequency: 800 cm-1", "imaginary-frequency: 0.5 cm-1", "molecules.ts.imaginary-frequency"},
		{"reaction energy 250 kcal/mol", pd, pd + "  reaction-energy: 250 kcal/mol\n", ""},
		{"reaction energy 400 kcal/mol", pd, pd + "  reaction-energy: 400 kcal/mol\n", "reaction.reaction-energy"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Parse(testFile, edit(t, tc.old, tc.new))
			checkRefusal(t, err, tc.path)
		})
	}
}

// checkRefusal checks that err is nil when path is "", and otherwise a
// one-line *FieldError at path.
func checkRefusal(t *testing.T, err error, path string) {
	t.Helper()
	var fe *FieldError
	switch {
	case path == "" && err != nil:
		t.Errorf("refused: %v", err)
	case path == "":
	case !errors.As(err, &fe):
		t.Errorf("err = %v, want a *FieldError at %s", err, path)
	case fe.Path != path || strings.ContainsAny(err.Error(), "\r\n"):
		t.Errorf("err = %v, want one line at %s", err, path)
	}
}

// Checks across sections: the Eckart barrier needs its products below the
// transition state; a threshold must lie above the master-equation grain
// at the highest temperature (kT/5 = 208.5 cm⁻¹ at 1500 K, with k_B/hc =
// 0.6950348 cm⁻¹/K, CODATA 2018); exp(−E0/kT) at the lowest temperature
// must stay above e^−500 (E0 = 40 kcal/mol = 13990.2 cm⁻¹ gives 40.26 K);
// a transition state serves one channel.
func TestCrossLimits(t *testing.T) {
	const pd = "  path-degeneracy: auto\n"
	eckart := func(dE string) string {
		return pd + "  reaction-energy: " + dE + "\n  tunnelling: eckart\n"
	}
	cases := []struct {
		name, old, new string
		path           string
	}{
		{"products just below the barrier", pd, eckart("39.9 kcal/mol"), ""},
		{"products at the barrier", pd, eckart("40 kcal/mol"), "reaction.reaction-energy"},
		{"products above the barrier", pd, eckart("41 kcal/mol"), "reaction.reaction-energy"},
		{"E0 just above kT/5", "energy: 40 kcal/mol", "energy: 210 cm-1", ""},
		{"E0 just below kT/5", "energy: 40 kcal/mol", "energy: 207 cm-1", "molecules.ts.energy"},
		{"E0 = 0", "energy: 40 kcal/mol", "energy: 0 cm-1", "molecules.ts.energy"},
		{"E0 = 0 without pressures", "  pressures: {unit: bar, values: [1, 0.1, 10]}\nfits: [troe]\n", "fits: [arrhenius]\n", ""},
		{"E0 above a given grain", "  grain: 10 cm-1\n", "  grain: 10 cm-1\n  master-equation-grain: 150 cm-1\n", ""},
		{"lowest temperature 41 K", "from: 300 K", "from: 41 K", ""},
		{"lowest temperature 39 K", "from: 300 K", "from: 39 K", "grid.temperatures.from"},
		{"the same TS twice", pd, pd + "  competing: [{via: ts, products: [c]}]\n", "reaction.competing[0].via"},
		{"barrierless threshold 0", "  via: ts\n", "  barrierless: {A: 1e15 s-1, energy: 0 cm-1}\n", "reaction.barrierless.energy"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			doc := edit(t, tc.old, tc.new)
			if tc.name == "E0 = 0 without pressures" {
				doc = []byte(strings.Replace(string(doc), "energy: 40 kcal/mol", "energy: 0 cm-1", 1))
			}
			_, err := Parse(testFile, doc)
			checkRefusal(t, err, tc.path)
		})
	}
}

// A torsion whose levels would need a basis beyond the solver's is refused
// at the reader, not in the middle of a count (or as a panic in its
// partition function): a heavy torsion with harmonics at 1500 K.
func TestTorsionBasisRefused(t *testing.T) {
	const oi = "    optical-isomers: 1\n"
	for _, tc := range []struct {
		b, path string
	}{
		{"5.3 cm-1", ""},
		{"0.01 cm-1", "molecules.r.torsions[0]"},
	} {
		doc := edit(t, oi, oi+"    torsions: [{rotational-constant: "+tc.b+", barrier-height: 1000 cm-1, periodicity: 1, harmonics: {unit: cm-1, values: [100, 50]}}]\n")
		_, err := Parse(testFile, doc)
		t.Run(tc.b, func(t *testing.T) { checkRefusal(t, err, tc.path) })
	}
}

// Names: species and channel names keep to letters, digits and -_(),'*,
// as mechanism names do (CH2(S), n-C3H7, C3H6O(1,2), OH*); whatever would
// act on a terminal, break a field path or a mechanism file is refused,
// and the message shows it escaped.
func TestNames(t *testing.T) {
	good := []string{"n-C3H7", "CH2(S)", "OH*", "C3H5'", "C3H6O(1,2)", "1-C4H8", "(CH3)3CO", "x_1", strings.Repeat("C", 64)}
	bad := []struct{ name, shown string }{
		{"ring.mass", `'.'`},
		{"x[1]", `'['`},
		{"ring:", `':'`},
		{"*ring", `'*'`},
		{"-ring", `'-'`},
		{"a#b", `'#'`},
		{"a+b", `'+'`},
		{"a=b", `'='`},
		{"a/b", `'/'`},
		{"α-pinene", `'α'`},
		{"ring\x1b[31m", `'\x1b'`},
		{"ring\vx", `'\v'`},
		{"ring\u0085x", `'\u0085'`},
		{"ring\u2028x", `'\u2028'`},
		{"ring\u202ex", `'\u202e'`},
		{strings.Repeat("C", 65), "65 characters"},
	}
	for _, n := range good {
		t.Run("accepted "+n, func(t *testing.T) {
			doc := edit(t, "  products: [a, b]\n", fmt.Sprintf("  products: [a, %q]\n", n))
			if _, err := Parse(testFile, doc); err != nil {
				t.Errorf("product %q refused: %v", n, err)
			}
			doc = []byte(strings.Replace(strings.Replace(minimal, "  ts:\n", fmt.Sprintf("  %q:\n", n), 1), "  via: ts\n", fmt.Sprintf("  via: %q\n", n), 1))
			if _, err := Parse(testFile, doc); err != nil {
				t.Errorf("molecule %q refused: %v", n, err)
			}
		})
	}
	for _, tc := range bad {
		t.Run(fmt.Sprintf("refused %q", tc.name), func(t *testing.T) {
			quoted := fmt.Sprintf("%q", tc.name)
			for _, doc := range []struct{ path, text string }{
				{"reaction.products[1]", strings.Replace(minimal, "  products: [a, b]\n", "  products: [a, "+quoted+"]\n", 1)},
				{"molecules." + tc.name, strings.Replace(strings.Replace(minimal, "  ts:\n", "  "+quoted+":\n", 1), "  via: ts\n", "  via: "+quoted+"\n", 1)},
				{"reaction.competing[0].name", strings.Replace(minimal, "  path-degeneracy: auto\n", "  path-degeneracy: auto\n  competing: [{name: "+quoted+", barrierless: {A: 1e15 s-1, energy: 50 kcal/mol}}]\n", 1)},
				{"bath.gas", strings.Replace(minimal, "  gas: Ar\n", "  gas: "+quoted+"\n", 1)},
			} {
				_, err := Parse(testFile, []byte(doc.text))
				var fe *FieldError
				if !errors.As(err, &fe) || fe.Path != doc.path {
					t.Errorf("%s: err = %v, want a FieldError at %s", doc.path, err, doc.path)
					continue
				}
				msg := err.Error()
				if !strings.Contains(msg, tc.shown) || strings.ContainsFunc(msg, escape.NotPrintable) {
					t.Errorf("%s: message %q does not show %s escaped", doc.path, msg, tc.shown)
				}
			}
		})
	}
}

// The title is one line of printable text.
func TestTitle(t *testing.T) {
	for _, tc := range []struct {
		title string
		ok    bool
	}{
		{`"Ring opening of α-pinene, 1000 K"`, true},
		{`"a\e[2Jb"`, false},
		{`"one\ntwo"`, false},
		{`"one\Ltwo"`, false},
		{`"` + strings.Repeat("x", 201) + `"`, false},
	} {
		_, err := Parse(testFile, edit(t, "title: minimal test input", "title: "+tc.title))
		if (err == nil) != tc.ok {
			t.Errorf("title %s: err = %v, want ok = %v", tc.title, err, tc.ok)
		}
		if err != nil && strings.ContainsFunc(err.Error(), escape.NotPrintable) {
			t.Errorf("title %s: message %q holds a raw control character", tc.title, err)
		}
	}
}
