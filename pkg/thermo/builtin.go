package thermo

import (
	"sort"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

// BuiltInSpecies is a common gas with the data its thermochemistry needs:
// the molecule in the rigid-rotor harmonic-oscillator model, its
// composition and its formation enthalpy.
type BuiltInSpecies struct {
	Species     rrkm.Species
	Composition []Element
	// FormationEnthalpy is ΔfH°(298.15 K) in J mol⁻¹.
	FormationEnthalpy float64
	Source            string
}

// Sources of the built-in data (all from memory).
const (
	srcHerzberg = "vibrational fundamentals and ground-state rotational constants: Herzberg, Molecular Spectra and Molecular Structure II (1945) and Huber & Herzberg, Constants of Diatomic Molecules (1979); ΔfH°: CODATA Key Values (Cox, Wagman & Medvedev 1989) and NIST-JANAF (Chase 1998); from memory"
	srcAtom     = "mass (IUPAC standard atomic weight), a single electronic level; ΔfH° = 0 (reference state)"
)

// builtIn are the bath gases of pkg/collision's table with the data for
// their thermochemistry. H2 is left out: its classical rotor (kT/B = 3.4 at
// 298 K) misses Cp by several per cent, and its ortho/para spin statistics
// are not in the model.
var builtIn = []BuiltInSpecies{
	{Species: rrkm.Species{Name: "He", Mass: 4.002602}, Composition: []Element{{"He", 1}}, Source: srcAtom},
	{Species: rrkm.Species{Name: "Ne", Mass: 20.1797}, Composition: []Element{{"Ne", 1}}, Source: srcAtom},
	{Species: rrkm.Species{Name: "Ar", Mass: 39.948}, Composition: []Element{{"Ar", 1}}, Source: srcAtom},
	{Species: rrkm.Species{Name: "Kr", Mass: 83.798}, Composition: []Element{{"Kr", 1}}, Source: srcAtom},
	{Species: rrkm.Species{Name: "N2", Mass: 28.0134, Vibrations: []float64{2329.91},
		Rotors: []rrkm.Rotor{{Dim: 2, Consts: []float64{1.98957}, Symmetry: 1}}, Symmetry: 2},
		Composition: []Element{{"N", 2}}, Source: srcHerzberg},
	// O2: X³Σg⁻ (g = 3), a¹Δg at 7918.1 cm⁻¹ (g = 2), b¹Σg⁺ at 13195.1 cm⁻¹.
	{Species: rrkm.Species{Name: "O2", Mass: 31.9988, Vibrations: []float64{1556.38},
		Rotors: []rrkm.Rotor{{Dim: 2, Consts: []float64{1.43768}, Symmetry: 1}}, Symmetry: 2,
		Electronic: []rrkm.Level{{Energy: 0, Degeneracy: 3}, {Energy: 7918.1, Degeneracy: 2}, {Energy: 13195.1, Degeneracy: 1}}},
		Composition: []Element{{"O", 2}}, Source: srcHerzberg},
	// CO2: ν1 (Fermi-resonance centre), ν2 (doubly degenerate bend), ν3.
	{Species: rrkm.Species{Name: "CO2", Mass: 44.0095, Vibrations: []float64{1333, 667, 667, 2349},
		Rotors: []rrkm.Rotor{{Dim: 2, Consts: []float64{0.39021}, Symmetry: 1}}, Symmetry: 2},
		Composition: []Element{{"C", 1}, {"O", 2}}, FormationEnthalpy: -393510, Source: srcHerzberg},
	// H2O: ν1, ν2, ν3; A, B, C of the ground state.
	{Species: rrkm.Species{Name: "H2O", Mass: 18.01528, Vibrations: []float64{3657.05, 1594.75, 3755.93},
		Rotors: []rrkm.Rotor{{Dim: 3, Consts: []float64{27.8806, 14.5218, 9.2777}, Symmetry: 1}}, Symmetry: 2},
		Composition: []Element{{"H", 2}, {"O", 1}}, FormationEnthalpy: -241826, Source: srcHerzberg},
	// CH4: ν1 (a1), ν2 (e), ν3 (t2), ν4 (t2); spherical top, σ = 12.
	{Species: rrkm.Species{Name: "CH4", Mass: 16.0425,
		Vibrations: []float64{2917, 1534, 1534, 3019, 3019, 3019, 1306, 1306, 1306},
		Rotors:     []rrkm.Rotor{{Dim: 3, Consts: []float64{5.241, 5.241, 5.241}, Symmetry: 1}}, Symmetry: 12},
		Composition: []Element{{"C", 1}, {"H", 4}}, FormationEnthalpy: -74873, Source: srcHerzberg},
}

// BuiltIn returns the built-in data of a common gas (He, Ne, Ar, Kr, N2, O2,
// CO2, H2O, CH4; case-insensitive), for a bath gas that the input does not
// describe.
func BuiltIn(name string) (BuiltInSpecies, bool) {
	for _, b := range builtIn {
		if strings.EqualFold(b.Species.Name, name) {
			b.Species.Vibrations = append([]float64(nil), b.Species.Vibrations...)
			return b, true
		}
	}
	return BuiltInSpecies{}, false
}

// BuiltInNames lists the built-in species.
func BuiltInNames() []string {
	var n []string
	for _, b := range builtIn {
		n = append(n, b.Species.Name)
	}
	sort.Strings(n)
	return n
}
