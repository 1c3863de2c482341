package job

import (
	"encoding/json"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/internal/demo"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"gonum.org/v1/gonum/floats/scalar"
)

// summaryOf builds the network of the demo input with the edits in
// replace (old, new pairs, each old occurring once) and returns its summary.
func summaryOf(t *testing.T, replace ...string) *Summary {
	t.Helper()
	text := string(demo.Text)
	for i := 0; i+1 < len(replace); i += 2 {
		if n := strings.Count(text, replace[i]); n != 1 {
			t.Fatalf("%q occurs %d times in the demo input, want 1", replace[i], n)
		}
		text = strings.Replace(text, replace[i], replace[i+1], 1)
	}
	m, err := input.Parse(demo.Name, []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	n, err := New(m)
	if err != nil {
		t.Fatal(err)
	}
	return n.Summary()
}

// The summary carries what the file gives for each molecule: mass,
// Lennard-Jones parameters, electronic levels, torsions, and the factors
// of the path degeneracy, whose product is L = σ_R·m‡/(σ‡·m_R) (Pollak &
// Pechukas, J. Am. Chem. Soc. 100, 2984, 1978): σ_R = 2, σ‡ = 1, m_R = 1,
// m‡ = 2 give L = 4 exactly.
func TestSummaryMolecules(t *testing.T) {
	const tol = 1e-12 // values as written, converted by exact factors
	s := summaryOf(t,
		"symmetry: 1}\n    optical-isomers: 1\n    electronic", "symmetry: 2}\n    optical-isomers: 1\n    electronic",
		"electronic: [{energy: 0 cm-1, degeneracy: 1}]", "electronic: [{energy: 0 cm-1, degeneracy: 2}, {energy: 120 cm-1, degeneracy: 2}]\n"+
			"    torsions: [{rotational-constant: 5.3 cm-1, barrier-height: 1000 cm-1, periodicity: 3}]",
		"0.10]}, symmetry: 1}\n    optical-isomers: 1", "0.10]}, symmetry: 1}\n    optical-isomers: 2",
		"values: [3010,", "values: [",
	)
	if len(s.Molecules) != 2 {
		t.Fatalf("%d molecules", len(s.Molecules))
	}
	r, ts := s.Molecules[0], s.Molecules[1]
	if r.Role != "reactant" || r.MassAmu != 70.09 || r.ElectronicLevels != 2 || r.GroundDegeneracy != 2 {
		t.Errorf("reactant %+v: want mass 70.09 amu, 2 electronic levels, ground degeneracy 2", r)
	}
	if lj := r.LennardJones; lj == nil || lj.SigmaAngstrom != 5.0 || lj.EpsilonK != 400 {
		t.Errorf("reactant Lennard-Jones %+v, want σ = 5 Å, ε/k_B = 400 K", lj)
	}
	if h := r.Torsions; len(h) != 1 || h[0].B != 5.3 || h[0].V0 != 1000 || h[0].Periodicity != 3 || h[0].Symmetry != 3 || h[0].Harmonics != nil {
		t.Errorf("reactant torsions %+v, want one of B 5.3 cm-1, V0 1000 cm-1, periodicity 3, σ 3", r.Torsions)
	}
	if ts.MassAmu != 0 || ts.LennardJones != nil || ts.ElectronicLevels != 1 || ts.GroundDegeneracy != 1 || ts.Torsions == nil || len(ts.Torsions) != 0 {
		t.Errorf("transition state %+v: want no mass, no Lennard-Jones, one level, no torsions", ts)
	}
	f := s.PathFactors
	if s.PathDegeneracyFrom != PathFromSymmetry || f == nil {
		t.Fatalf("path degeneracy from %q, factors %v", s.PathDegeneracyFrom, f)
	}
	if *f != (PathFactors{SigmaReactant: 2, SigmaTS: 1, IsomersReactant: 1, IsomersTS: 2}) {
		t.Errorf("factors %+v, want σ_R 2, σ‡ 1, m_R 1, m‡ 2", *f)
	}
	if !scalar.EqualWithinAbsOrRel(s.PathDegeneracy, 4, tol, tol) ||
		!scalar.EqualWithinAbsOrRel(f.SigmaReactant*f.IsomersTS/(f.SigmaTS*f.IsomersReactant), s.PathDegeneracy, tol, tol) {
		t.Errorf("L = %v, want 4 = σ_R·m‡/(σ‡·m_R)", s.PathDegeneracy)
	}

	// A number in the file is used as it is.
	s = summaryOf(t, "path-degeneracy: auto", "path-degeneracy: 3")
	if s.PathDegeneracyFrom != PathFromFile || s.PathDegeneracy != 3 || s.PathFactors == nil {
		t.Errorf("given L: from %q, L = %v, factors %v", s.PathDegeneracyFrom, s.PathDegeneracy, s.PathFactors)
	}
}

// The new fields are in the JSON under their documented names
// (docs/output.md), torsions as [] when there are none.
func TestSummaryJSONFields(t *testing.T) {
	b, err := json.Marshal(summaryOf(t))
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{`"mass_amu":70.09`, `"torsions":[]`, `"electronic_levels":1`, `"ground_degeneracy":1`,
		`"lennard_jones":{"sigma_angstrom":5,"epsilon_K":400}`, `"path_degeneracy_from":"symmetry"`,
		`"path_degeneracy_factors":{"symmetry_number_reactant":1,"symmetry_number_ts":1,"optical_isomers_reactant":1,"optical_isomers_ts":1}`,
		`"vibrational_modes":18`, `"path_degeneracy":1`} {
		if !strings.Contains(string(b), f) {
			t.Errorf("JSON lacks %s: %s", f, b)
		}
	}
}
