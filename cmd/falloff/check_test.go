package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/job"
)

// writeVariant writes testdata/catalogue-base.yaml with the edits in
// replace (old, new pairs, each old occurring once) into a temporary file.
func writeVariant(t *testing.T, name string, replace ...string) string {
	t.Helper()
	b, err := os.ReadFile("../../testdata/catalogue-base.yaml")
	if err != nil {
		t.Fatal(err)
	}
	text := string(b)
	for i := 0; i+1 < len(replace); i += 2 {
		if n := strings.Count(text, replace[i]); n != 1 {
			t.Fatalf("%q occurs %d times in the catalogue base, want 1", replace[i], n)
		}
		text = strings.Replace(text, replace[i], replace[i+1], 1)
	}
	path := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

const ljLine = "    lennard-jones: {sigma: 5.0 angstrom, epsilon: 400 K}\n"

// check prints each warning once, in its summary on stdout, and nothing on
// stderr; --json carries the same warnings.
func TestCheckWarningsOnce(t *testing.T) {
	file := writeVariant(t, "warn.yaml", "    imaginary-frequency: 650 cm-1\n", "")
	code, out, errs := runCLI(t, "check", file)
	if code != exitOK || errs != "" {
		t.Fatalf("exit %d, stderr %q; want 0 and nothing on stderr", code, errs)
	}
	const w = "transition state without imaginary-frequency"
	if n := strings.Count(out, w); n != 1 {
		t.Errorf("the warning appears %d times in\n%s", n, out)
	}
	code, out, errs = runCLI(t, "check", "--json", file)
	var s job.Summary
	if err := json.Unmarshal([]byte(out), &s); code != exitOK || errs != "" || err != nil {
		t.Fatalf("--json: exit %d, stderr %q, %v", code, errs, err)
	}
	if len(s.Warnings) != 1 || !strings.Contains(s.Warnings[0], w) {
		t.Errorf("--json warnings %q", s.Warnings)
	}
}

// A file with the hindered-rotor keys of the previous release gives the
// same summary as one with the new names, plus one warning per old name
// naming the field and the new name; the summary lists each torsion.
func TestCheckTorsionsOldAndNewNames(t *testing.T) {
	// The reactant's lowest vibration becomes a torsion, so that the mode
	// count (18 against the transition state's 17) stays quiet.
	lowest := "1100, 1020, 950, 870, 780, 640, 520, 410, 260]"
	fewer := "1100, 1020, 950, 870, 780, 640, 520, 410]"
	newFile := writeVariant(t, "new.yaml", lowest, fewer, ljLine, ljLine+
		"    torsions:\n      - {reduced-moment: 3.2 amu angstrom2, barrier-height: 1000 cm-1, periodicity: 3, harmonics: {unit: cm-1, values: [50]}}\n")
	oldFile := writeVariant(t, "old.yaml", lowest, fewer, ljLine, ljLine+
		"    hindered-rotors:\n      - {inertia: 3.2 amu*angstrom^2, barrier: 1000 cm-1, fold: 3, fourier: {unit: cm-1, values: [50]}}\n")
	summary := func(file string) *job.Summary {
		code, out, errs := runCLI(t, "check", "--json", file)
		var s job.Summary
		if err := json.Unmarshal([]byte(out), &s); code != exitOK || errs != "" || err != nil {
			t.Fatalf("%s: exit %d, stderr %q, %v", file, code, errs, err)
		}
		return &s
	}
	sNew, sOld := summary(newFile), summary(oldFile)
	if len(sNew.Warnings) != 0 {
		t.Errorf("new names: warnings %q", sNew.Warnings)
	}
	if len(sOld.Warnings) != 5 {
		t.Errorf("old names: %d warnings %q, want 5 (hindered-rotors, inertia, barrier, fold, fourier)", len(sOld.Warnings), sOld.Warnings)
	}
	for _, w := range sOld.Warnings {
		if !strings.HasPrefix(w, oldFile+":") || !strings.Contains(w, "molecules.ring.hindered-rotors") || !strings.Contains(w, "old name of ") {
			t.Errorf("warning %q should name the file, the field and the new name", w)
		}
	}
	if !reflect.DeepEqual(sNew.Molecules, sOld.Molecules) {
		t.Errorf("old names summarise as\n%+v\nnew names as\n%+v", sOld.Molecules, sNew.Molecules)
	}
	tors := sNew.Molecules[0].Torsions
	// B = 16.857629/I[amu Å²] (units.RotConstFromInertia) = 5.268 cm-1.
	if len(tors) != 1 || tors[0].Periodicity != 3 || tors[0].Symmetry != 3 || tors[0].V0 != 1000 ||
		strings.TrimSpace(num(tors[0].B)) != "5.268" {
		t.Errorf("torsions %+v", tors)
	}
	code, out, _ := runCLI(t, "check", newFile)
	// 17 vibrations and a torsion against the transition state's 17
	// vibrations: the torsion became a vibration, and no warning says
	// otherwise.
	for _, want := range []string{"|         reactant |         17 |        1 |", "\nno warnings\n",
		"  torsion 1: rotational constant 5.268 cm-1, barrier height 1000 cm-1 (2.859 kcal/mol), periodicity 3, symmetry number 3, harmonics [50] cm-1",
		"ring: mass 70.09 amu; 1 electronic level, ground degeneracy 1; Lennard-Jones σ = 5 Å, ε/k_B = 400 K\n"} {
		if code != exitOK || !strings.Contains(out, want) {
			t.Errorf("check output lacks %q:\n%s", want, out)
		}
	}
}

// The path degeneracy line says where L comes from.
func TestCheckPathDegeneracy(t *testing.T) {
	cases := []struct {
		name    string
		replace []string
		want    string
	}{
		{"symmetry", []string{"values: [0.35, 0.15, 0.12]}, symmetry: 1}", "values: [0.35, 0.15, 0.12]}, symmetry: 2}"},
			"path degeneracy: L = σ_R·m‡/(σ‡·m_R) = 2·1/(1·1) = 2 "},
		{"file", []string{"  products: [frag-a, frag-b]\n", "  products: [frag-a, frag-b]\n  path-degeneracy: 3\n"},
			"path degeneracy: L = 3, given in the file (σ_R·m‡/(σ‡·m_R) would give 1·1/(1·1) = 1)"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runCLI(t, "check", writeVariant(t, tc.name+".yaml", tc.replace...))
			if code != exitOK || !strings.Contains(out, tc.want) {
				t.Errorf("exit %d (%s); output lacks %q:\n%s", code, errs, tc.want, out)
			}
		})
	}
	code, out, _ := runCLI(t, "check", barrierlessFile)
	if code != exitOK || !strings.Contains(out, "path degeneracy: L = 1 (a barrierless channel: its A includes L)") {
		t.Errorf("barrierless: exit %d\n%s", code, out)
	}
}
