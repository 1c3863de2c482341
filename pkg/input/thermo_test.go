package input

import (
	"errors"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// withThermo is the minimal input with a thermo section appended.
func withThermo(section string) []byte { return []byte(minimal + section) }

const goodThermo = `thermo:
  temperature-range: {from: 300 K, to: 2500 K}
  midpoint: 900 K
  molecules:
    r:
      composition: {C: 2, H: 4}
      formation-enthalpy: {value: 12.54 kcal/mol, at: 298 K}
`

func TestThermoSection(t *testing.T) {
	const tol = 1e-12 // relative: one unit conversion
	m, err := Parse(testFile, withThermo(goodThermo))
	if err != nil {
		t.Fatal(err)
	}
	th, err := m.Thermo()
	if err != nil {
		t.Fatal(err)
	}
	if th.TLow != 300 || th.THigh != 2500 || th.Midpoint != 900 || th.AutoMidpoint {
		t.Errorf("range %+v", th)
	}
	r := th.Molecule("r")
	if r == nil || len(r.Composition) != 2 || r.Composition[0] != (ElementCount{"C", 2}) || r.Composition[1] != (ElementCount{"H", 4}) {
		t.Fatalf("r: %+v", r)
	}
	// 12.54 kcal/mol in cm⁻¹ (1 kcal/mol = 349.7551 cm⁻¹, design.md §2); 298 K
	// is read as the reference temperature 298.15 K.
	if want := 12.54 * units.Cm1PerKcalPerMol; !r.HasFormation || r.FormationT != 298.15 || (r.Formation-want)/want > tol {
		t.Errorf("formation %+v, want %v cm-1 at 298.15 K", r, want)
	}
	if th.Molecule("ts") != nil {
		t.Error("ts has thermo data")
	}

	// No section, and midpoint: auto.
	m, _ = Parse(testFile, []byte(minimal))
	if th, err := m.Thermo(); err != nil || len(th.Molecules) != 0 || th.TLow != 0 {
		t.Errorf("no section: %+v, %v", th, err)
	}
	m, _ = Parse(testFile, withThermo("thermo: {midpoint: auto}\n"))
	if th, err := m.Thermo(); err != nil || !th.AutoMidpoint {
		t.Errorf("midpoint auto: %+v, %v", th, err)
	}
}

// Each bad value names its field, on one line, with a hint.
func TestThermoSectionRefuses(t *testing.T) {
	for _, tc := range []struct {
		name, old, new, path, msg string
	}{
		{"unknown element", "{C: 2, H: 4}", "{C: 2, Hx: 4}", "thermo.molecules.r.composition.Hx", "not a chemical element"},
		{"capitals", "{C: 2, H: 4}", "{C: 2, CL: 4}", "thermo.molecules.r.composition.CL", "did you mean Cl"},
		{"zero count", "{C: 2, H: 4}", "{C: 2, H: 0}", "thermo.molecules.r.composition.H", "count must be from 1"},
		{"fractional count", "{C: 2, H: 4}", "{C: 2, H: 4.5}", "thermo.molecules.r.composition.H", "not a whole number"},
		{"twice", "{C: 2, H: 4}", "{C: 2, H: 4, C: 1}", "thermo.molecules.r.composition.C", "given twice"},
		{"list", "{C: 2, H: 4}", "[C, H]", "thermo.molecules.r.composition", "expected a mapping"},
		{"not a molecule", "    r:\n      composition", "    x:\n      composition", "thermo.molecules.x", "not a molecule of this file"},
		{"transition state", "    r:\n      composition", "    ts:\n      composition", "thermo.molecules.ts", "transition state"},
		{"reference temperature", "at: 298 K", "at: 500 K", "thermo.molecules.r.formation-enthalpy.at", "not a reference temperature"},
		{"no unit", "12.54 kcal/mol", "12.54", "thermo.molecules.r.formation-enthalpy.value", "no unit"},
		{"unit slip", "12.54 kcal/mol", "1254000 kcal/mol", "thermo.molecules.r.formation-enthalpy.value", "beyond"},
		{"no at", ", at: 298 K}", "}", "thermo.molecules.r.formation-enthalpy.at", "missing"},
		{"range backwards", "{from: 300 K, to: 2500 K}", "{from: 3000 K, to: 2500 K}", "thermo.temperature-range.to", "not above"},
		{"range unit", "{from: 300 K, to: 2500 K}", "{from: 300 C, to: 2500 K}", "thermo.temperature-range.from", "unknown unit"},
		{"midpoint word", "midpoint: 900 K", "midpoint: middle", "thermo.midpoint", ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if strings.Count(goodThermo, tc.old) != 1 {
				t.Fatalf("%q does not occur once", tc.old)
			}
			m, err := Parse(testFile, withThermo(strings.Replace(goodThermo, tc.old, tc.new, 1)))
			if err == nil {
				_, err = m.Thermo()
			}
			var fe *FieldError
			if !errors.As(err, &fe) || fe.Path != tc.path || !strings.Contains(err.Error(), tc.msg) || strings.Contains(err.Error(), "\n") {
				t.Errorf("error %v; want one line at %s with %q", err, tc.path, tc.msg)
			}
		})
	}
}

// An unknown key in the section is refused by Parse itself, with the keys
// that exist.
func TestThermoUnknownKey(t *testing.T) {
	_, err := Parse(testFile, withThermo(strings.Replace(goodThermo, "midpoint:", "mid-point:", 1)))
	var fe *FieldError
	if !errors.As(err, &fe) || fe.Path != "thermo.mid-point" || !strings.Contains(fe.Hint, "did you mean midpoint") {
		t.Errorf("error %v", err)
	}
}
