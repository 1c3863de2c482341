package main

import (
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/input"
)

const (
	moldenWater = "../../pkg/qcread/testdata/water.molden"       // measured fundamentals, hand-written file
	moldenTS    = "../../pkg/qcread/testdata/ts_invented.molden" // invented
)

// import prints a block that the input parser reads, and merges into a
// valid input file so that it stays valid, replacing the molecule named.
func TestImportPrintsAndMerges(t *testing.T) {
	code, out, errs := runCLI(t, "import", "--energy", "R=-76.4", "--energy", "TS=-76.35", "R="+moldenWater, "TS="+moldenTS)
	if code != exitOK || !strings.Contains(out, "molecules:") || !strings.Contains(out, "energy: 25.70") {
		t.Fatalf("exit %d\n%s\n%s", code, out, errs)
	}
	if !strings.Contains(errs, "imported TS from") || !strings.Contains(errs, "not yet a complete input") {
		t.Errorf("stderr %q: want the summary and the note on what is missing", errs)
	}

	dir := t.TempDir()
	target := filepath.Join(dir, "r.yaml")
	src, err := os.ReadFile(ch3ncFile)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(target, src, 0o644); err != nil {
		t.Fatal(err)
	}
	// A stable species named like the reactant replaces it: still valid.
	code, _, errs = runCLI(t, "import", "--into", target, "CH3NC="+moldenWater)
	if code != exitOK || !strings.Contains(errs, "CH3NC replaced") {
		t.Fatalf("merge: exit %d, stderr %q", code, errs)
	}
	m, err := input.ReadFile(target)
	if err != nil {
		t.Fatalf("merged file: %v", err)
	}
	if got := m.Molecules[0]; got.Name != "CH3NC" || len(got.Vibrations) != 3 {
		t.Errorf("merged CH3NC has %d vibrations, want water's 3", len(got.Vibrations))
	}
	// A merge that would break the file (the reactant becomes a transition
	// state) is refused and leaves the file as it was.
	before, _ := os.ReadFile(target)
	code, _, errs = runCLI(t, "import", "--into", target, "--reactant", "W", "--energy", "W=-76.4", "--energy", "CH3NC=-76.3", "W="+moldenWater, "CH3NC="+moldenTS)
	after, _ := os.ReadFile(target)
	if code != exitInput || !strings.Contains(errs, "would not be a valid input") || string(before) != string(after) {
		t.Errorf("breaking merge: exit %d, stderr %q, file changed %v", code, errs, string(before) != string(after))
	}
}

func TestImportFailures(t *testing.T) {
	dir := t.TempDir()
	junk := filepath.Join(dir, "junk.out")
	if err := os.WriteFile(junk, []byte("hello\nworld\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	checkFailures(t, []failCase{
		{"no files", []string{"import"}, exitUsage, "at least one"},
		{"scale", []string{"import", "--scale", "9.6", moldenWater}, exitUsage, "--scale 9.6"},
		{"energy", []string{"import", "--energy", "R=abc", moldenWater}, exitUsage, `--energy "R=abc"`},
		{"symmetry", []string{"import", "--symmetry", "R=0", moldenWater}, exitUsage, `--symmetry "R=0"`},
		{"format", []string{"import", "--format", "gjf", moldenWater}, exitUsage, `--format "gjf"`},
		{"bad name", []string{"import", "a b=" + moldenWater}, exitUsage, "species name"},
		{"same name", []string{"import", moldenWater, moldenWater}, exitUsage, `"water"`},
		{"missing", []string{"import", filepath.Join(dir, "none.molden")}, exitInput, "none.molden: no such file"},
		{"unrecognised", []string{"import", junk}, exitInput, "junk.out: not recognised"},
		{"folder", []string{"import", dir}, exitInput, "not a regular file"},
		{"TS alone", []string{"import", moldenTS}, exitInput, "transition state alone"},
	})
}

// An xtb --hess output holds no geometry: refused alone, read with --xyz
// (the recorded run of xtb 6.5.1 on testdata/xtb/h2o_opt.xyz).
func TestImportXtbHessWithXYZ(t *testing.T) {
	const dir = "../../pkg/qcread/testdata/xtb/"
	if code, _, errs := runCLI(t, "import", "W="+dir+"h2o_hess.out"); code != exitInput || !strings.Contains(errs, "no geometry") || !strings.Contains(errs, "--xyz W=FILE.xyz") {
		t.Errorf("--hess output alone: exit %d, stderr %q", code, errs)
	}
	code, out, errs := runCLI(t, "import", "W="+dir+"h2o_hess.out", "--xyz", "W="+dir+"h2o_opt.xyz")
	if code != exitOK || !strings.Contains(out, "GFN2-xTB") || !strings.Contains(out, "symmetry: 2") {
		t.Errorf("with --xyz: exit %d, stderr %q\n%s", code, errs, out)
	}
	if code, _, errs := runCLI(t, "import", "W="+dir+"h2o_hess.out", "--xyz", "Q="+dir+"h2o_opt.xyz"); code != exitUsage || !strings.Contains(errs, "not among") {
		t.Errorf("--xyz for an unknown species: exit %d, stderr %q", code, errs)
	}
}

// The validation input's molecules are what the import makes of the
// recorded Psi4 runs (testdata/ch3nc-qc) with the CCSD(T) energies its
// header names: the file is traceable to the program outputs. And the
// rejected first transition-state search of those runs, a real second-
// order saddle point (573i and 211i cm⁻¹), is refused.
func TestImportCH3NCValidation(t *testing.T) {
	const qc = "../../testdata/ch3nc-qc/"
	code, out, errs := runCLI(t, "import", "-q", "CH3NC="+qc+"ch3nc_opt_freq.out", "TS="+qc+"ts_opt_freq.out", "CH3CN="+qc+"ch3cn_opt_freq.out",
		"--energy", "CH3NC=-132.489070549470455", "--energy", "TS=-132.425641680896490", "--energy", "CH3CN=-132.527786170215222")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	text := "title: t\nbath: {gas: Ar}\nenergy-transfer: {model: strong-collider}\ngrid: {temperatures: {unit: K, values: [500]}}\n" + out
	got, err := input.Parse("imported", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	want, err := input.ReadFile("../../testdata/ch3nc-validation.yaml")
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"CH3NC", "TS", "CH3CN"} {
		g, w := got.Molecule(name), want.Molecule(name)
		if g == nil || w == nil || g.E0 != w.E0 || g.Imaginary != w.Imaginary || g.Mass != w.Mass || g.Symmetry != w.Symmetry ||
			!slices.Equal(g.Vibrations, w.Vibrations) || !slices.Equal(g.Rotors[0].Consts, w.Rotors[0].Consts) {
			t.Errorf("%s: imported %+v, the validation file has %+v", name, g, w)
		}
	}
	if got.Reaction.ReactionEnergy != want.Reaction.ReactionEnergy {
		t.Errorf("reaction energy %g, file %g", got.Reaction.ReactionEnergy, want.Reaction.ReactionEnergy)
	}
	code, _, errs = runCLI(t, "import", "R="+qc+"ch3nc_opt_freq.out", "TS="+qc+"rejected-second-order-saddle/ts_opt_freq.out")
	if code != exitInput || !strings.Contains(errs, "2 imaginary frequencies") {
		t.Errorf("second-order saddle: exit %d, stderr %q", code, errs)
	}
}
