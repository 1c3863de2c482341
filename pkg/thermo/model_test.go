package thermo

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

const ringFile = "testdata/ring-thermo.yaml" // invented data

func loadRing(t *testing.T) *input.Model {
	t.Helper()
	m, err := input.ReadFile(ringFile)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// K_c of the input's reaction from the NASA polynomials (exp(−ΔG°/RT) at
// 1 bar, converted to concentrations) equals K_c from the partition
// functions (rrkm.EquilibriumConstant, as the recombination direction uses
// it) to within the fits' errors: |Δ ln K| ≤ Σ_species (max|ΔH|/RT +
// max|ΔS|/R), the bound FitError gives. Exact statistical mechanics
// (McQuarrie 1976, eq. 9-13): the two differ only by the fits.
func TestEquilibriumConstantFromPolynomials(t *testing.T) {
	m := loadRing(t)
	set, err := FromModel(m, Options{})
	if err != nil {
		t.Fatal(err)
	}
	r, a, b := set.Entry("ring"), set.Entry("frag-a"), set.Entry("frag-b")
	bound := 0.0
	for _, e := range []*Entry{r, a, b} {
		bound += e.Fit.HRT + e.Fit.SR
	}
	worst := 0.0
	for tk := 200.0; tk <= 3000; tk += 50 {
		want := rrkm.EquilibriumConstant(&m.Molecule("ring").Species,
			[]*rrkm.Species{&m.Molecule("frag-a").Species, &m.Molecule("frag-b").Species}, m.Reaction.ReactionEnergy, tk)
		got := EquilibriumConstant([]*NASA7{r.NASA}, []*NASA7{a.NASA, b.NASA}, tk)
		d := math.Abs(math.Log(got / want))
		worst = math.Max(worst, d)
		if d > bound {
			t.Errorf("%v K: K_c %.6g from the polynomials, %.6g from the partition functions (|Δ ln K| %.3g > bound %.3g)", tk, got, want, d, bound)
		}
	}
	t.Logf("largest |Δ ln K_c| %.2g (bound from the fit errors %.2g)", worst, bound)
}

// The input's formation enthalpies: ring at 0 K carried to 298.15 K,
// frag-b at 298.15 K, frag-a through the reaction energy; Ar built in.
func TestFromModelEnthalpies(t *testing.T) {
	const tol = 1e-6 // J/mol: sums of the same numbers
	m := loadRing(t)
	set, err := FromModel(m, Options{})
	if err != nil {
		t.Fatal(err)
	}
	r, a, b, ar := set.Entry("ring"), set.Entry("frag-a"), set.Entry("frag-b"), set.Entry("Ar")
	if r == nil || a == nil || b == nil || ar == nil || set.Entry("ring-TS") != nil {
		t.Fatalf("species %v", names(set))
	}
	// ring: −60 kJ/mol at 0 K + its increment − 5 C(graphite) − 5 H2.
	wantR := -60000 + r.Increment - 5*1050 - 10*8468.0/2
	if r.Basis != Given || math.Abs(r.H298-wantR) > tol {
		t.Errorf("ring: %v %v, want given %v", r.Basis, r.H298, wantR)
	}
	if b.Basis != Given || b.H298 != 52470 {
		t.Errorf("frag-b: %v %v", b.Basis, b.H298)
	}
	// ΔrH(298.15 K) = ΔE0 + Σν(H298 − H0).
	drh := m.Reaction.ReactionEnergy/units.Cm1PerJoulePerMol + a.Increment + b.Increment - r.Increment
	if a.Basis != Derived || math.Abs(a.H298-(drh+r.H298-b.H298)) > tol {
		t.Errorf("frag-a: %v %v, want derived %v", a.Basis, a.H298, drh+r.H298-b.H298)
	}
	if ar.Basis != Given || ar.H298 != 0 || len(ar.Composition) != 1 {
		t.Errorf("Ar: %+v", ar)
	}
}

func names(s *Set) []string {
	var n []string
	for _, e := range s.Species {
		n = append(n, e.Name)
	}
	return n
}

// ΔfH° at 0 K carried to 298.15 K with the model's increment and the
// elements' (CODATA Key Values, Cox, Wagman & Medvedev 1989): NIST-JANAF
// gives ΔfH°(0) and ΔfH°(298.15 K) of CH4 −66.911 and −74.873 kJ/mol
// (C-067; the first from memory), H2O −238.921 and −241.826 (H-064; the
// first from memory), CO2 −393.151 and −393.522 (C-095). The model's
// increments differ from the tables' by up to ~0.02 kJ/mol; the elements'
// are the tables' own, so 0.05 kJ/mol covers it.
func TestFormationAt298(t *testing.T) {
	const tol = 50 // J/mol
	for _, tc := range []struct {
		name         string
		dfH0, dfH298 float64 // kJ/mol
	}{
		{"CH4", -66.911, -74.873}, {"H2O", -238.921, -241.826}, {"CO2", -393.151, -393.522},
	} {
		b, _ := BuiltIn(tc.name)
		m, _ := New(&b.Species, 3000)
		got, err := FormationAt298(m, b.Composition, 1000*tc.dfH0)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-1000*tc.dfH298) > tol {
			t.Errorf("%s: ΔfH°(298.15 K) %.3f kJ/mol, JANAF %.3f", tc.name, got/1000, tc.dfH298)
		}
		t.Logf("%s: %.3f kJ/mol (JANAF %.3f)", tc.name, got/1000, tc.dfH298)
	}
	b, _ := BuiltIn("CH4")
	m, _ := New(&b.Species, 3000)
	if _, err := FormationAt298(m, []Element{{"Fe", 1}}, 0); err == nil {
		t.Error("an element without an increment accepted")
	}
	if _, err := FormationAt298(m, nil, 0); err == nil {
		t.Error("no composition accepted")
	}
}

// The enthalpy scale on invented relations: A → B + B (a product twice),
// A → C with C given (overdetermined, disagreeing: a note), D alone
// (placeholder).
func TestEnthalpyScale(t *testing.T) {
	mk := func(name string, mass float64) *Model {
		m, err := New(&rrkm.Species{Name: name, Mass: mass}, 1000)
		if err != nil {
			t.Fatal(err)
		}
		return m
	}
	models := map[string]*Model{"A": mk("A", 40), "B": mk("B", 20), "C": mk("C", 40), "D": mk("D", 10)}
	de0 := 100000 * units.Cm1PerJoulePerMol // 100 kJ/mol
	rels := []Relation{
		{Reactant: "A", Products: []string{"B", "B"}, DE0: de0, Label: "r1"},
		{Reactant: "A", Products: []string{"C"}, DE0: 0, Label: "r2"},
	}
	h, basis, notes := enthalpyScale(models, []string{"A", "B", "C", "D"}, map[string]float64{"A": 1000, "C": 5000}, rels)
	inc := func(n string) float64 { return models[n].EnthalpyIncrement() }
	// 2·H(B) − H(A) = 100 kJ/mol + 2·inc(B) − inc(A).
	wantB := (1000 + 100000 + 2*inc("B") - inc("A")) / 2
	if basis["B"] != Derived || math.Abs(h["B"]-wantB) > 1e-6 {
		t.Errorf("B: %v %v, want derived %v", basis["B"], h["B"], wantB)
	}
	if basis["D"] != Placeholder || h["D"] != 0 {
		t.Errorf("D: %v %v", basis["D"], h["D"])
	}
	if len(notes) != 1 || !strings.Contains(notes[0], "r2") || !strings.Contains(notes[0], "4.00 kJ/mol") {
		t.Errorf("notes %q", notes)
	}
}

// Bad values in the thermo section name their field; a range the caller
// sets badly is a RangeError.
func TestFromModelRefuses(t *testing.T) {
	m := loadRing(t)
	src := string(m.Source)
	for _, tc := range []struct {
		name, old, new, path string
	}{
		{"midpoint outside", "midpoint: 1000 K", "midpoint: 5000 K", "thermo.midpoint"},
		{"range beyond", "to: 3000 K}", "to: 20000 K}", "thermo.temperature-range"},
		{"0 K without composition", "composition: {C: 5, H: 10}\n", "", "thermo.molecules.ring.formation-enthalpy"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			mm, err := input.Parse("ring.yaml", []byte(strings.Replace(src, tc.old, tc.new, 1)))
			if err != nil {
				t.Fatal(err)
			}
			_, err = FromModel(mm, Options{})
			var fe *input.FieldError
			if !errors.As(err, &fe) || fe.Path != tc.path {
				t.Errorf("error %v, want a FieldError at %s", err, tc.path)
			}
		})
	}
	_, err := FromModel(m, Options{Range: Range{TMid: 100}})
	var re *RangeError
	if !errors.As(err, &re) {
		t.Errorf("midpoint 100 K from options: %v, want a RangeError", err)
	}
}
