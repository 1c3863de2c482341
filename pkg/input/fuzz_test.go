package input

import (
	"bytes"
	"errors"
	"fmt"
	"github.com/falloff-kinetics/falloff/pkg/escape"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// fuzzSeeds are hand-made inputs for FuzzParse beside the real files: each
// one edits the minimal input at a place the parser has to get right.
var fuzzSeeds = []struct{ old, new string }{
	{"energy: 40 kcal/mol", "energy: 1e400 kcal/mol"},
	{"energy: 40 kcal/mol", "energy: 1e308 kcal/mol"},
	{"energy: 40 kcal/mol", "energy: .nan kcal/mol"},
	{"energy: 40 kcal/mol", "energy: .inf"},
	{"energy: 40 kcal/mol", "energy: [40, kcal/mol]"},
	{"mass: 28.05 amu", "mass: 28,05 amu"},
	{"mass: 28.05 amu", "mass: {value: 28.05}"},
	{"values: [3000, 1500, 1000]", "values: [3000, NaN, 1000]"},
	{"values: [3000, 1500, 1000]", "values: [1e308, 1500, 1000]"},
	{"vibrations: {unit: cm-1, values: [3000,", "vibrations: {unit: hartree, values: [3000,"},
	{"values: [4.8, 1.0, 0.8]", "values: [4.8, 1e-320, 0.8]"},
	{"rotation: {constants: {unit: cm-1, values: [4.8, 1.0, 0.8]}, symmetry: 2}",
		"rotation: {inertia: {unit: amu*angstrom^2, values: [3.5, 1e-310, 21]}, symmetry: 2}"},
	{"epsilon: 230 K", "epsilon: 1.5e308 cm-1"},
	{"sigma: 4.2 angstrom", "sigma: 4.2 Å"},
	{"sigma: 4.2 angstrom", "sigma: 4.2 \u212b"},
	{"temperatures: {from: 300 K, to: 1500 K, points: 5}", "temperatures: {from: 1e-320 K, to: 1500 K, points: 5}"},
	{"temperatures: {from: 300 K, to: 1500 K, points: 5}", "temperatures: {from: 300 K, to: 300.00000000000006 K, points: 5}"},
	{"temperatures: {from: 300 K, to: 1500 K, points: 5}", "temperatures: {from: 300 K, to: 1500 K, points: 100000}"},
	{"temperatures: {from: 300 K, to: 1500 K, points: 5}", "temperatures: {unit: K, values: [300, 300.00000000000006, 1e308]}"},
	{"pressures: {unit: bar, values: [1, 0.1, 10]}", "pressures: {from: 1e-320 Pa, to: 1e308 atm, points: 7}"},
	{"pressures: {unit: bar, values: [1, 0.1, 10]}", "pressures: {unit: bar, values: [1, 1e308, 10]}"},
	{"alpha-exponent: 0.85", "alpha-exponent: 1e400"},
	{"fits: [troe]", "fits: troe"},
	{"fits: [troe]", "fits: [troe, troe]"},
	{"  gas: Ar\n", "  gas: Ar\n  collision-rate: 3.1e-10 cm3/molecule/s\n"},
	{"    optical-isomers: 1\n", "    optical-isomers: 1\n    electronic: [{energy: 0 cm-1, degeneracy: 2}, {energy: 1e308 eV}]\n"},
	{"    optical-isomers: 1\n", "    optical-isomers: 1\n    hindered-rotors: [{constant: 5.3 cm-1, barrier: 1000 cm-1, fold: 3, symmetry: 3, fourier: {unit: cm-1, values: [-50, 10]}}]\n"},
	{"    optical-isomers: 1\n", "    optical-isomers: 1\n    hindered-rotors: [{inertia: 1e-310 amu*angstrom^2, barrier: 1000 cm-1}]\n"},
	{"    optical-isomers: 1\n", "    optical-isomers: 1\n    torsions: [{rotational-constant: 5.3 cm-1, barrier-height: 1000 cm-1, periodicity: 3, symmetry-number: 3, harmonics: {unit: cm-1, values: [-50, 10]}}]\n"},
	{"    optical-isomers: 1\n", "    optical-isomers: 1\n    torsions: [{reduced-moment: 1e-310 amu angstrom2, barrier: 1000 cm-1, fold: 3}]\n"},
	{"  via: ts\n", "  barrierless: {A: 1e15 s-1, T0: 300 K, n: 0.5, energy: 85 kcal/mol}\n"},
	{"  path-degeneracy: auto\n", "  path-degeneracy: auto\n  competing:\n    - {via: ts, products: [c]}\n    - {barrierless: {A: 1e308 ms-1}}\n"},
	{"energy-grid:\n", "energy-grid: &g\n"},
	{"title: minimal test input", "title: &t [a, *t]"},
	{"title: minimal test input", "title: &t a\nx: [*t, *t, *t, *t, *t]"},
	{"title: minimal test input", "title: minimal test input\nb0: &b0 [x, x, x, x, x, x, x, x, x, x]\nb1: &b1 [*b0, *b0, *b0, *b0, *b0, *b0, *b0, *b0, *b0, *b0]\nb2: &b2 [*b1, *b1, *b1, *b1, *b1, *b1, *b1, *b1, *b1, *b1]\nb3: [*b2, *b2, *b2, *b2, *b2, *b2, *b2, *b2, *b2, *b2]"},
	{"vibrations: {unit: cm-1, values: [3000, 1500, 1000]}", "vibrations: &v {unit: cm-1, values: [3000, 1500, 1000]}"},
	{"vibrations: {unit: cm-1, values: [2900, 1200]}", "vibrations: {<<: *v}"},
	{"  gas: Ar\n", "  gas: &gas Ar\n  *gas : 1\n"},
	{"    optical-isomers: 1\n", "    optical-isomers: &one 1\n    electronic: [{energy: 0 cm-1, degeneracy: *one}, {energy: 24.5 eV, degeneracy: *one}]\n"},
	{"  products: [a, b]\n", "  products: [a, \"b\\e[31m\", \"c\\Ld\", \"e.f\", \"*g\", \"h:\"]\n"},
	{"energy: 40 kcal/mol", "energy: 0 kcal/mol"},
	{"  path-degeneracy: auto\n", "  path-degeneracy: auto\n  reaction-energy: 40 kcal/mol\n  tunnelling: eckart\n"},
	{"  path-degeneracy: auto\n", "  path-degeneracy: 1e308\n  competing: [{via: ts}]\n"},
	{"    optical-isomers: 1\n", "    optical-isomers: 1\n    torsions: [{rotational-constant: 0.01 cm-1, barrier-height: 1e10 cm-1, periodicity: 100000, harmonics: {unit: cm-1, values: [1e20, 1, 1, 1]}}]\n"},
	{"  grain: 10 cm-1\n", ""},
}

// fuzzFiles are the real inputs, relative to this package's directory.
var fuzzFiles = []string{"../../testdata/*.yaml", "../../internal/demo/demo.yaml", "../../internal/demo/network.yaml"}

// FuzzParse checks Parse on arbitrary bytes and file names: it never
// panics; an error is a *FieldError for the file given, with a one-line
// message; an accepted file gives a Model whose numbers are all finite, whose
// grids are positive and strictly ascending, and which keeps the promises of
// the Model's documentation. It does not count states or solve anything, so
// that each run stays cheap.
func FuzzParse(f *testing.F) {
	for _, pattern := range fuzzFiles {
		paths, err := filepath.Glob(pattern)
		if err != nil || len(paths) == 0 {
			f.Fatalf("seed files %s: %v (found %d)", pattern, err, len(paths))
		}
		for _, path := range paths {
			data, err := os.ReadFile(path)
			if err != nil {
				f.Fatal(err)
			}
			f.Add(filepath.Base(path), data)
		}
	}
	f.Add(testFile, []byte(minimal))
	for _, s := range fuzzSeeds {
		if strings.Count(minimal, s.old) != 1 {
			f.Fatalf("seed edit %q occurs %d times in the minimal input, want 1", s.old, strings.Count(minimal, s.old))
		}
		f.Add(testFile, []byte(strings.Replace(minimal, s.old, s.new, 1)))
	}
	f.Add(testFile, []byte(strings.ReplaceAll(minimal, "\n", "\r\n")))
	f.Add(testFile, append([]byte("\ufeff"), minimal...))
	f.Add(testFile, []byte(minimal[:len(minimal)/2]))
	f.Add("", []byte{})
	f.Add("dir/ünïcode file.yaml", []byte("---\n"))

	f.Fuzz(func(t *testing.T, name string, data []byte) {
		m, err := Parse(name, data)
		if err != nil {
			if m != nil {
				t.Errorf("Parse returned a model and the error %v", err)
			}
			checkParseError(t, name, err)
			return
		}
		checkModel(t, name, data, m)
	})
}

// checkParseError checks the documented form of Parse's errors.
func checkParseError(t *testing.T, name string, err error) {
	t.Helper()
	var fe *FieldError
	if !errors.As(err, &fe) {
		t.Fatalf("error %q is a %T, not a *FieldError", err, err)
	}
	if fe.File != name {
		t.Errorf("FieldError.File = %q, want the name given, %q", fe.File, name)
	}
	if fe.Err == nil {
		t.Errorf("FieldError %q has no Err", err)
	}
	msg := err.Error()
	if msg == "" || msg == name {
		t.Errorf("error message %q says nothing beyond the file name", msg)
	}
	// The message writes the file name as given, so only a name without a
	// line break can give a one-line message.
	if !strings.ContainsAny(name, "\r\n") && strings.ContainsAny(msg, "\r\n") {
		t.Errorf("error message is not one line: %q", msg)
	}
	// Whatever the file holds, nothing reaches the terminal raw.
	if strings.ContainsFunc(msg, escape.NotPrintable) {
		t.Errorf("error message holds a raw control or format character: %q", msg)
	}
}

// checkModel checks what the Model's documentation promises of a Model
// from Parse.
func checkModel(t *testing.T, name string, data []byte, m *Model) {
	t.Helper()
	checkFinite(t, "Model", reflect.ValueOf(m).Elem())
	if m.File != name || !bytes.Equal(m.Source, data) {
		t.Errorf("File = %q, Source %d bytes; want %q and the %d bytes given", m.File, len(m.Source), name, len(data))
	}
	if strings.TrimSpace(m.Title) == "" || strings.ContainsFunc(m.Title, escape.NotPrintable) {
		t.Errorf("title %q accepted", m.Title)
	}
	// Every name keeps to the safe set (field paths, mechanism files,
	// terminals).
	names := []string{m.Bath.Gas}
	names = append(names, m.Reaction.Products...)
	for _, mol := range m.Molecules {
		names = append(names, mol.Name)
	}
	for _, c := range m.Reaction.Competing {
		names = append(names, c.Products...)
		if c.Name != "barrierless" {
			names = append(names, c.Name)
		}
	}
	for _, n := range names {
		if _, why, bad := badNameRune(n); n != "" && bad || len(n) > maxNameLen {
			t.Errorf("name %q accepted: %s", n, why)
		}
	}
	// Every threshold keeps exp(−E0/kT) representable and, with pressures,
	// a grain below it.
	for _, th := range m.thresholds() {
		if x := th.e0 / (0.6950348 * m.Temperatures[0]); x > maxExponent {
			t.Errorf("%s: E0/kT = %g at the lowest temperature accepted", th.name, x)
		}
		if m.Pressures != nil && m.EnergyGrid.MEGrain == 0 && th.e0 < 0.6950348*m.Temperatures[len(m.Temperatures)-1]/5*(1-1e-9) {
			t.Errorf("%s: threshold %g cm-1 below kT/5 at the highest temperature accepted", th.name, th.e0)
		}
	}
	if len(m.Temperatures) == 0 {
		t.Error("no temperatures")
	}
	checkAxis(t, "Temperatures", m.Temperatures)
	if m.Pressures != nil && len(m.Pressures) == 0 {
		t.Error("Pressures is empty but not nil")
	}
	checkAxis(t, "Pressures", m.Pressures)

	if net := m.Network; net != nil {
		// A network: the reference is a well at 0, every step starts from
		// a well and ends at a well or fragment set, and no transition
		// state lies below either end of its step.
		if w := net.Well(net.Reference); w == nil || w.Energy != 0 {
			t.Errorf("reference %q is not a well at energy 0", net.Reference)
		}
		for _, st := range net.Steps {
			from, to := net.EnergyOf(st.From), net.EnergyOf(st.To)
			if net.Well(st.From) == nil || math.IsNaN(to) {
				t.Errorf("step %+v: unknown ends", st)
			}
			if ts := m.Molecule(st.Via); st.Barrierless == nil && (ts == nil || !ts.IsTS || ts.E0 < math.Max(from, to)) {
				t.Errorf("step %+v: transition state missing or below an end", st)
			}
		}
	} else {
		checkReaction(t, m)
	}
	checkEnergyGridAndMolecules(t, m, name)
}

// checkReaction checks the one well's reaction of an accepted model.
func checkReaction(t *testing.T, m *Model) {
	t.Helper()
	reactant, ts := m.ReactantAndTS()
	switch {
	case reactant == nil:
		t.Errorf("reactant %q is not among the molecules", m.Reaction.Reactant)
	case reactant.IsTS || !(reactant.Mass > 0) || reactant.Vibrations == nil:
		t.Errorf("reactant %q: IsTS %v, mass %v, %d vibrations", reactant.Name, reactant.IsTS, reactant.Mass, len(reactant.Vibrations))
	}
	switch {
	case m.Reaction.Barrierless != nil && (ts != nil || m.Reaction.Via != ""):
		t.Errorf("barrierless main channel with a transition state %q", m.Reaction.Via)
	case m.Reaction.Barrierless == nil && ts == nil:
		t.Errorf("transition state %q is not among the molecules", m.Reaction.Via)
	case ts != nil && (!ts.IsTS || ts.E0 < 0 || ts.Vibrations == nil):
		t.Errorf("transition state %q: IsTS %v, E0 %v, %d vibrations", ts.Name, ts.IsTS, ts.E0, len(ts.Vibrations))
	}
}

// checkEnergyGridAndMolecules is the rest of the accepted model's checks.
func checkEnergyGridAndMolecules(t *testing.T, m *Model, name string) {
	t.Helper()
	g := m.EnergyGrid
	if !(g.Fine > 0) || g.Grain < g.Fine || g.MEGrain < 0 || g.MEGrain > 0 && g.MEGrain < g.Fine || g.Ceiling < 0 {
		t.Errorf("energy grid %+v: want 0 < fine ≤ grain, master-equation grain 0 or ≥ fine, ceiling ≥ 0", g)
	}
	for _, mol := range m.Molecules {
		for i, v := range mol.Vibrations {
			// crossCheck: the fine grain resolves every vibration.
			if !(v >= g.Fine) {
				t.Errorf("%s: vibrations[%d] = %v cm-1, below the fine grain %v cm-1", mol.Name, i, v, g.Fine)
			}
		}
		if mol.Mass < 0 || mol.Imaginary < 0 || mol.Symmetry < 1 || mol.OpticalIsomers < 1 {
			t.Errorf("%s: mass %v, imaginary %v, symmetry %v, optical isomers %v", mol.Name, mol.Mass, mol.Imaginary, mol.Symmetry, mol.OpticalIsomers)
		}
		for i, h := range mol.Hindered {
			if err := h.Validate(); err != nil {
				t.Errorf("%s: torsions[%d] accepted but invalid: %v", mol.Name, i, err)
			}
			if size, limit := h.BasisSize(m.countTop()); size > limit {
				t.Errorf("%s: torsions[%d] accepted but its levels need a basis of %d (at most %d)", mol.Name, i, size, limit)
			}
		}
		for i, l := range mol.Electronic {
			if l.Energy > heliumIonizationCm1 {
				t.Errorf("%s: electronic[%d] at %g cm-1 accepted", mol.Name, i, l.Energy)
			}
		}
	}
	if tr := m.Transfer; !(tr.Efficiency > 0 && tr.Efficiency <= 1) {
		t.Errorf("collision efficiency %v outside (0, 1]", tr.Efficiency)
	}
	if !strings.ContainsAny(name, "\r\n") {
		for _, w := range m.Warnings {
			if strings.ContainsAny(w, "\r\n") {
				t.Errorf("warning is not one line: %q", w)
			}
		}
	}
}

// checkAxis checks that a grid axis is positive and strictly ascending.
func checkAxis(t *testing.T, what string, xs []float64) {
	t.Helper()
	for i, x := range xs {
		if !(x > 0) || i > 0 && !(x > xs[i-1]) {
			t.Errorf("%s = %v: not positive and strictly ascending at [%d]", what, xs, i)
			return
		}
	}
}

// checkFinite reports any float64 in v, followed through structs, pointers
// and slices, that is NaN or infinite; path names it.
func checkFinite(t *testing.T, path string, v reflect.Value) {
	t.Helper()
	switch v.Kind() {
	case reflect.Float64:
		if x := v.Float(); math.IsNaN(x) || math.IsInf(x, 0) {
			t.Errorf("%s = %v", path, x)
		}
	case reflect.Pointer:
		if !v.IsNil() {
			checkFinite(t, path, v.Elem())
		}
	case reflect.Struct:
		for i := range v.NumField() {
			checkFinite(t, path+"."+v.Type().Field(i).Name, v.Field(i))
		}
	case reflect.Slice:
		if v.Type().Elem().Kind() == reflect.Uint8 {
			return // Source
		}
		for i := range v.Len() {
			checkFinite(t, fmt.Sprintf("%s[%d]", path, i), v.Index(i))
		}
	}
}
