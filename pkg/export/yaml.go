package export

import (
	"bytes"
	"fmt"
	"strconv"
	"strings"
	"unicode"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// yf writes a float as YAML reads it, e.g. 1.39e+16 or -0.534, with up to 10
// significant digits (enough for Ea in J/mol to keep exp(−Ea/RT) to 1e-7).
// The mantissa always has a decimal point ("1.0e+10", not "1e+10"), which
// YAML 1.1 readers need to see a float rather than a string.
func yf(x float64) string {
	s := strconv.FormatFloat(x, 'g', 10, 64)
	if i := strings.IndexAny(s, "eE"); i >= 0 && !strings.Contains(s[:i], ".") {
		s = s[:i] + ".0" + s[i:]
	}
	return s
}

// yamlString writes s as a YAML scalar, quoted where YAML needs it (a name
// with ':' or starting with '*'), through the YAML library.
func yamlString(s string) string {
	b, err := yaml.Marshal(s)
	if err != nil {
		return strconv.Quote(s)
	}
	return strings.TrimSuffix(string(b), "\n")
}

// YAML returns a Cantera YAML reactions file (a units block and a reactions
// list) for the reactions rs. Reference it from a phase with
// `reactions: [FILE/reactions]` (see PhaseSkeleton).
func YAML(h Header, u Units, rs []Reaction) ([]byte, error) {
	if err := u.Check(); err != nil {
		return nil, err
	}
	u = u.withDefaults()
	var b bytes.Buffer
	for _, l := range h.lines() {
		for _, w := range wrap(l, 76) {
			fmt.Fprintf(&b, "# %s\n", w)
		}
	}
	fmt.Fprintf(&b, "\nunits: {length: cm, time: s, quantity: %s, activation-energy: %s}\n\nreactions:\n", yamlQuantity(u.Quantity), u.Energy)
	dup := duplicates(rs)
	for i, r := range rs {
		if err := r.check(); err != nil {
			return nil, err
		}
		if r.Note != "" {
			for _, w := range wrap(r.Note, 76) {
				fmt.Fprintf(&b, "# %s\n", w)
			}
		}
		fmt.Fprintf(&b, "- equation: %s\n", yamlString(r.equation(true)))
		if dup[i] {
			b.WriteString("  duplicate: true\n")
		}
		arr := func(a fit.Arrhenius, order int) string {
			A, n, ea := u.arrhenius(a, order)
			return fmt.Sprintf("{A: %s, b: %s, Ea: %s}", yf(A), yf(n), yf(ea))
		}
		switch f := r.Form.(type) {
		case *fit.Arrhenius:
			fmt.Fprintf(&b, "  rate-constant: %s\n", arr(*f, r.Order-1))
		case *fit.Falloff:
			fmt.Fprintf(&b, "  type: falloff\n  low-P-rate-constant: %s\n  high-P-rate-constant: %s\n",
				arr(f.Low, r.Order), arr(f.High, r.Order-1))
			if t := f.Troe; t != nil {
				fmt.Fprintf(&b, "  Troe: {A: %s, T3: %s, T1: %s", yf(t.A), yf(t.T3), yf(t.T1))
				if t.HasT2 {
					fmt.Fprintf(&b, ", T2: %s", yf(t.T2))
				}
				b.WriteString("}\n")
			}
			if s := f.SRI; s != nil {
				fmt.Fprintf(&b, "  SRI: {A: %s, B: %s, C: %s", yf(s.A), yf(s.B), yf(s.C))
				if s.D != 0 && (s.D != 1 || s.E != 0) {
					fmt.Fprintf(&b, ", D: %s, E: %s", yf(s.D), yf(s.E))
				}
				b.WriteString("}\n")
			}
		case *fit.PLOG:
			b.WriteString("  type: pressure-dependent-Arrhenius\n  rate-constants:\n")
			for _, e := range f.Entries {
				for _, a := range e.Terms {
					A, n, ea := u.arrhenius(a, r.Order-1)
					fmt.Fprintf(&b, "  - {P: %s atm, A: %s, b: %s, Ea: %s}\n", yf(e.P/units.AtmPa), yf(A), yf(n), yf(ea))
				}
			}
		case *fit.Chebyshev:
			fmt.Fprintf(&b, "  type: Chebyshev\n  temperature-range: [%s, %s]\n  pressure-range: [%s atm, %s atm]\n  data:\n",
				yf(f.Tmin), yf(f.Tmax), yf(f.Pmin/units.AtmPa), yf(f.Pmax/units.AtmPa))
			for _, row := range chebyshevData(f, u, r.Order) {
				b.WriteString("  - [")
				for j, c := range row {
					if j > 0 {
						b.WriteString(", ")
					}
					b.WriteString(strconv.FormatFloat(c, 'g', 10, 64))
				}
				b.WriteString("]\n")
			}
		}
		if err := writeUserFields(&b, r.UserFields); err != nil {
			return nil, err
		}
	}
	return b.Bytes(), nil
}

// PhaseSkeleton returns a small complete Cantera YAML file showing how a
// phase references a reactions file; the user fills in elements, species and
// thermodynamic data, which falloff does not know.
func PhaseSkeleton(reactionsFile string, species []string) []byte {
	var b bytes.Buffer
	b.WriteString("# Skeleton of a complete Cantera input that uses the fitted reactions.\n")
	b.WriteString("# Fill in the elements and the species with their thermodynamic data,\n")
	b.WriteString("# and add the rest of the mechanism's reactions.\n\n")
	b.WriteString("phases:\n- name: gas\n  thermo: ideal-gas\n  elements: [C, H, O, N, Ar]   # edit\n  species: [")
	for i, s := range species {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(flowString(s))
	}
	fmt.Fprintf(&b, "]\n  kinetics: gas\n  reactions: [%s/reactions]\n  state: {T: 300.0, P: 1 atm}\n\nspecies: []  # add each species with its thermo data\n", reactionsFile)
	return b.Bytes()
}

// Phase returns a Cantera phase file that loads as a complete mechanism:
// an ideal gas with the elements, every species of speciesFile (a file
// with a species list, SpeciesYAML) and the reactions of reactionsFile
// among them, with the header h as comments.
func Phase(h Header, reactionsFile, speciesFile string, elements []string) []byte {
	var b bytes.Buffer
	for _, l := range h.lines() {
		for _, w := range wrap(l, 76) {
			fmt.Fprintf(&b, "# %s\n", w)
		}
	}
	b.WriteString("\nphases:\n- name: gas\n  thermo: ideal-gas\n  elements: [")
	for i, e := range elements {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(flowString(e))
	}
	// Species and reactions come from the other files: a list entry
	// FILE/SECTION: all (or declared-species), as Cantera's YAML phases
	// include them.
	fmt.Fprintf(&b, "]\n  species:\n  - %s: all\n  kinetics: gas\n  reactions:\n  - %s: declared-species\n  state: {T: 300.0, P: 1 atm}\n",
		yamlString(speciesFile+"/species"), yamlString(reactionsFile+"/reactions"))
	return b.Bytes()
}

// flowString writes s as a scalar inside a YAML flow sequence ([a, b]):
// plain if it is made of letters, digits and "_-()." and YAML reads it back
// as the same string (not a number or a boolean), else double-quoted: flow
// context gives more characters a meaning than block context (yamlString)
// does (", [ ] { }", and '?' opening a key). Go's quoting of printable text
// is YAML's.
func flowString(s string) string {
	plain := s != "" && yamlString(s) == s
	for _, r := range s {
		if !unicode.IsLetter(r) && !unicode.IsDigit(r) && !strings.ContainsRune("_-().", r) {
			plain = false
		}
	}
	if plain {
		return s
	}
	return strconv.Quote(s)
}

// yamlQuantity is the quantity unit as Cantera's YAML units block spells
// it: "mol", or "molec" for molecules (its unit parser knows kmol, mol and
// molec; "molecule" makes it refuse the whole file).
func yamlQuantity(q QuantityUnit) string {
	if q == Molecule {
		return "molec"
	}
	return "mol"
}
