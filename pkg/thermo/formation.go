package thermo

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Element is one element of a species' composition.
type Element struct {
	Symbol string `json:"symbol"`
	Count  int    `json:"count"`
}

// elementIncrement holds H°(298.15 K) − H°(0) of the elements in their
// reference states, in J per mole of atoms: half the value of the diatomic
// gases H2, N2, O2, F2, Cl2; the monatomic gases; graphite, rhombic
// sulfur, crystalline silicon; liquid bromine and crystalline iodine per
// atom (CODATA Key Values for Thermodynamics, Cox, Wagman & Medvedev,
// Hemisphere 1989; from memory). They carry a formation enthalpy given at
// 0 K to 298.15 K.
var elementIncrement = map[string]float64{
	"H":  8468.0 / 2,
	"He": 6197,
	"C":  1050,
	"N":  8670.0 / 2,
	"O":  8680.0 / 2,
	"F":  8825.0 / 2,
	"Ne": 6197,
	"Si": 3217,
	"S":  4412,
	"Cl": 9181.0 / 2,
	"Ar": 6197,
	"Br": 24513.0 / 2,
	"Kr": 6197,
	"I":  13196.0 / 2,
	"Xe": 6197,
}

// FormationAt298 carries a formation enthalpy at 0 K, dfH0 in J mol⁻¹, of
// the species of model m with the composition elems to 298.15 K:
// ΔfH°(298.15 K) = ΔfH°(0) + [H°(298.15 K) − H°(0)]_species −
// Σ n·[H°(298.15 K) − H°(0)]_element (e.g. Curtiss, Raghavachari,
// Redfern & Pople, J. Chem. Phys. 106, 1063, 1997, eq. 2). It needs each
// element's increment, known for H, He, C, N, O, F, Ne, Si, S, Cl, Ar, Br,
// Kr, I and Xe.
func FormationAt298(m *Model, elems []Element, dfH0 float64) (float64, error) {
	if len(elems) == 0 {
		return 0, fmt.Errorf("thermo: species %q: a formation enthalpy at 0 K needs the composition", m.sp.Name)
	}
	h := dfH0 + m.EnthalpyIncrement()
	for _, e := range elems {
		inc, ok := elementIncrement[e.Symbol]
		if !ok {
			return 0, fmt.Errorf("thermo: species %q: no reference-state enthalpy increment for element %s (known: %s); give the formation enthalpy at 298.15 K",
				m.sp.Name, e.Symbol, knownElements())
		}
		h -= float64(e.Count) * inc
	}
	return h, nil
}

func knownElements() string {
	var k []string
	for e := range elementIncrement {
		k = append(k, e)
	}
	sort.Strings(k)
	return strings.Join(k, ", ")
}

// Basis says where a species' H°(298.15 K) comes from.
type Basis string

// Bases of the enthalpy scale.
const (
	// Given: the input's formation enthalpy (at 298.15 K, or at 0 K
	// carried to 298.15 K).
	Given Basis = "given"
	// Derived: from a given one through the reaction energies.
	Derived Basis = "derived"
	// Placeholder: no formation enthalpy reaches the species; its group's
	// scale starts at 0 (see the package comment).
	Placeholder Basis = "placeholder"
)

// Relation is a reaction among species for the enthalpy scale: reactant →
// products with the zero-point-corrected reaction energy DE0 in cm⁻¹ (ΔrH°
// at 0 K). Products lists each product molecule once per occurrence.
type Relation struct {
	Reactant string
	Products []string
	DE0      float64
	Label    string // for messages, e.g. "reaction" or "reaction.competing[1]"
}

// enthalpyScale assigns H°(298.15 K) in J mol⁻¹ to every species of models
// (by name): the given values fixed, the others by propagating ΔrH°(298.15
// K) through rels, a group without any given value started at 0 from its
// first unknown species. It returns each species' value and basis, and notes on
// relations that disagree with the given values.
func enthalpyScale(models map[string]*Model, order []string, given map[string]float64, rels []Relation) (map[string]float64, map[string]Basis, []string) {
	h := map[string]float64{}
	basis := map[string]Basis{}
	for name, v := range given {
		h[name], basis[name] = v, Given
	}
	// ΔrH°(298.15 K) = ΔE0 + Σν[H(298.15) − H(0)]: the reaction energy is
	// ΔrH° at 0 K, and each species' enthalpy rises by its own increment.
	dh := make([]float64, len(rels))
	for i, r := range rels {
		d := r.DE0/units.Cm1PerJoulePerMol - models[r.Reactant].EnthalpyIncrement()
		for _, p := range r.Products {
			d += models[p].EnthalpyIncrement()
		}
		dh[i] = d
	}
	var notes []string
	checked := make([]bool, len(rels))
	propagate := func(b Basis) {
		for changed := true; changed; {
			changed = false
			for i, r := range rels {
				// Σν·H = ΔrH with ν = +1 per product occurrence, −1 for the
				// reactant.
				nu := map[string]float64{r.Reactant: -1}
				for _, p := range r.Products {
					nu[p]++
				}
				rest := dh[i]
				var unknown []string
				for _, s := range sortedKeys(nu) {
					if v, ok := h[s]; ok {
						rest -= nu[s] * v
					} else if nu[s] != 0 {
						unknown = append(unknown, s)
					}
				}
				switch {
				case len(unknown) == 0 && !checked[i]:
					checked[i] = true
					if math.Abs(rest) > disagreeJ {
						notes = append(notes, fmt.Sprintf("%s: the formation enthalpies given differ by %.2f kJ/mol from the reaction energy (which gives ΔrH°(298.15 K) = %.2f kJ/mol); equilibrium constants from the polynomials then differ from K_c of the partition functions by a factor exp(%.3g) at 1000 K",
							r.Label, -rest/1000, dh[i]/1000, rest/(R*1000)))
					}
				case len(unknown) == 1:
					h[unknown[0]] = rest / nu[unknown[0]]
					basis[unknown[0]] = b
					changed = true
				}
			}
		}
	}
	propagate(Derived)
	for _, name := range order {
		if _, ok := h[name]; !ok {
			h[name], basis[name] = 0, Placeholder
			propagate(Placeholder)
		}
	}
	return h, basis, notes
}

// disagreeJ is the difference in J mol⁻¹ between given formation
// enthalpies and a reaction energy worth a note: 10 J/mol is about 1e-3
// of RT at 1000 K in ln K.
const disagreeJ = 10.0

func sortedKeys(m map[string]float64) []string {
	k := make([]string, 0, len(m))
	for s := range m {
		k = append(k, s)
	}
	sort.Strings(k)
	return k
}
