package main

import (
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// minCatalogue is the fewest cases the bad-input catalogue may hold, so that
// it cannot shrink silently.
const minCatalogue = 30

// catalogue lists the cases of testdata/bad/ (docs/reliability.md): each
// file is a valid input (testdata/catalogue-base.yaml, or a small k(T,P)
// table for fit) with one defect. For each case the one-line message must
// name the field and quote the value, given here independently of the
// golden message; "" means the message has none (a problem with the whole
// file, or a key that is missing).
//
// "Duplicate frequencies" means a key given twice (duplicate-key-frequencies)
// or a molecule name given twice (duplicate-molecule): both are errors. A
// frequency value repeated within one list is legitimate — the degenerate
// modes of a symmetric molecule — and stays accepted
// (TestDegenerateFrequenciesAccepted).
var catalogue = map[string]struct{ field, value string }{
	"alpha-exponent-not-a-number":              {"energy-transfer.alpha-exponent", "high"},
	"alpha-negative":                           {"energy-transfer.alpha-300", "-250 cm-1"},
	"alpha-tiny-grain":                         {"energy-transfer.alpha-300", "2 cm-1"},
	"bath-missing":                             {"bath", ""},
	"ceiling-below-barrier":                    {"energy-grid.ceiling", "10000 cm-1"},
	"ceiling-below-barrierless":                {"energy-grid.ceiling", "10000 cm-1"},
	"ceiling-too-high-memory":                  {"energy-grid.ceiling", "1e8 cm-1"},
	"duplicate-key-frequencies":                {"molecules.ring.vibrations", "vibrations"},
	"duplicate-molecule":                       {"molecules.ring", "ring"},
	"efficiency-with-exponential-down":         {"energy-transfer.efficiency", "0.3"},
	"empty-file":                               {"", ""},
	"energy-no-unit":                           {"molecules.ring-TS.energy", "42.0"},
	"energy-unit-wrong-dimension":              {"molecules.ring-TS.energy", "42.0 angstrom"},
	"fine-grain-above-lowest-frequency":        {"energy-grid.fine-grain", "200 cm-1"},
	"fine-grain-too-small-memory":              {"energy-grid.fine-grain", "0.001 cm-1"},
	"fit-form-twice":                           {"fits[2]", "troe"},
	"fits-without-pressures":                   {"fits[0]", "troe"},
	"frequency-negative":                       {"molecules.ring.vibrations.values[9]", "-1100"},
	"frequency-no-unit":                        {"molecules.ring-TS.imaginary-frequency", "650"},
	"frequency-unknown-unit":                   {"molecules.ring.vibrations.unit", "wavenumbers"},
	"frequency-zero":                           {"molecules.ring.vibrations.values[17]", "0"},
	"hindered-inertia-tiny":                    {"molecules.ring.torsions[0].reduced-moment", "3.2e-6 amu angstrom2"},
	"huge-number":                              {"molecules.ring-TS.energy", "1e400 kcal/mol"},
	"imaginary-frequency-zero":                 {"molecules.ring-TS.imaginary-frequency", "0 cm-1"},
	"key-without-value":                        {"molecules.ring.mass", ""},
	"lennard-jones-missing":                    {"molecules.ring.lennard-jones", ""},
	"lennard-jones-missing-epsilon":            {"molecules.ring.lennard-jones.epsilon", ""},
	"mass-missing":                             {"molecules.ring.mass", ""},
	"mass-negative":                            {"molecules.ring.mass", "-70.09 amu"},
	"mass-unknown-unit":                        {"molecules.ring.mass", "70.09 kg"},
	"me-grain-too-small-memory":                {"energy-grid.master-equation-grain", "1 cm-1"},
	"missing-title":                            {"title", ""},
	"nan-value":                                {"energy-transfer.alpha-300", "NaN cm-1"},
	"negative-barrier":                         {"molecules.ring-TS.energy", "-4.2 kcal/mol"},
	"path-degeneracy-negative":                 {"reaction.path-degeneracy", "-2"},
	"pressure-negative":                        {"grid.pressures.values[0]", "-1"},
	"pressures-range-and-list":                 {"grid.pressures.unit", "bar"},
	"pressures-reversed":                       {"grid.pressures.from", "1000 bar"},
	"reactant-unknown":                         {"reaction.reactant", "rnig"},
	"rotation-two-constants":                   {"molecules.ring.rotation.constants.values", "[0.35, 0.15]"},
	"rotational-constant-unit-wrong-dimension": {"molecules.ring.rotation.constants.unit", "amu*angstrom^2"},
	"stable-species-imaginary":                 {"molecules.ring.imaginary-frequency", "650 cm-1"},
	"symmetry-zero":                            {"molecules.ring.rotation.symmetry", "0"},
	"tab-indent":                               {"", ""},
	"temperature-duplicate":                    {"grid.temperatures.values[2]", "300"},
	"temperature-in-pressure-unit":             {"grid.temperatures.from", "300 bar"},
	"temperature-zero":                         {"grid.temperatures.values[0]", "0"},
	"temperatures-empty":                       {"grid.temperatures.values", "[]"},
	"temperatures-missing":                     {"grid.temperatures", ""},
	"temperatures-one-point-range":             {"grid.temperatures.points", "1"},
	"temperatures-points-fraction":             {"grid.temperatures.points", "12.5"},
	"temperatures-reversed":                    {"grid.temperatures.from", "2500 K"},
	"title-list":                               {"title", "[Ring opening, invented]"},
	"top-level-list":                           {"", ""},
	"ts-energy-absurd":                         {"molecules.ring-TS.energy", "14690 kcal/mol"},
	"ts-negative-frequency":                    {"molecules.ring-TS.vibrations.values[17]", "-650"},
	"ts-without-imaginary-but-tunnelling":      {"reaction.tunnelling", "wigner"},
	"two-documents":                            {"", ""},
	"unknown-bath":                             {"bath.gas", "Xe"},
	"unknown-fit-form":                         {"fits[0]", "tore"},
	"unknown-key-competing":                    {"reaction.competing[0].prodcuts", "prodcuts"},
	"unknown-key-energy-grid":                  {"energy-grid.fine-grian", "fine-grian"},
	"unknown-key-no-suggestion":                {"molecules.ring.colour", "colour"},
	"unknown-key-top-level":                    {"fit", "fit"},
	"unknown-key-torsion":                      {"molecules.ring.torsions[0].barrier-hieght", "barrier-hieght"},
	"unknown-key-vibration":                    {"molecules.ring.vibration", "vibration"},
	"unknown-model":                            {"energy-transfer.model", "exponential-dwon"},
	"via-not-ts":                               {"reaction.via", "ring"},
	"vibration-not-a-number":                   {"molecules.ring.vibrations.values[10]", "1O20"},
	"vibration-with-unit":                      {"molecules.ring.vibrations.values[10]", "1020 cm-1"},
	"vibrations-bare-list":                     {"molecules.ring.vibrations", ""},
	"vibrations-no-unit":                       {"molecules.ring.vibrations.unit", ""},
	"vibrations-wrong-type":                    {"molecules.ring.vibrations", "3010 cm-1"},
	"yaml-syntax":                              {"", ""},

	// k(T,P) tables for fit: the field is the column (or the header).
	"fit-empty":                 {"", ""},
	"fit-missing-column":        {"k/<unit>", "T/K,P/atm"},
	"fit-nan-k":                 {"column 3 (k/cm3/mol/s)", "NaN"},
	"fit-negative-k":            {"column 3 (k/cm3/mol/s)", "-2.858e+13"},
	"fit-non-numeric-k":         {"column 3 (k/cm3/mol/s)", "fast"},
	"fit-short-row":             {"column 3", "1000,1"},
	"fit-too-few-rows":          {"", ""},
	"fit-unit-in-row":           {"column 3 (k/cm3/mol/s)", "2.858e+13 cm3/mol/s"},
	"fit-unknown-pressure-unit": {"column 2", "P/psi"},
	"fit-replicates-disagree":   {"", "300,1,1.196e+16"},

	// Hostile input (issue 14): values beyond any physical range, names
	// that would act on the terminal or break field paths and mechanism
	// files, YAML aliases that would never end or expand a few lines into
	// billions of values, text too long to echo whole.
	"alias-bomb":                        {"", ""},
	"alias-self":                        {"", ""},
	"alpha-exponent-huge":               {"energy-transfer.alpha-exponent", "1000"},
	"alpha-huge":                        {"energy-transfer.alpha-300", "250 kcal/mol"},
	"barrierless-a-huge":                {"reaction.barrierless.A", "1e30 s-1"},
	"barrierless-energy-zero":           {"reaction.barrierless.energy", "0 kcal/mol"},
	"barrierless-n-huge":                {"reaction.barrierless.n", "100"},
	"bath-gas-name-escape":              {"bath.gas", "Ar\u001b[2J"},
	"bath-mass-tiny":                    {"bath.mass", "0.04 amu"},
	"collision-rate-huge":               {"bath.collision-rate", "1e300 cm3/molecule/s"},
	"collision-rate-tiny":               {"bath.collision-rate", "1e-20 cm3/molecule/s"},
	"eckart-competing-above-barrier":    {"reaction.competing[0].reaction-energy", "47 kcal/mol"},
	"eckart-products-above-barrier":     {"reaction.reaction-energy", "50 kcal/mol"},
	"eckart-products-at-barrier":        {"reaction.reaction-energy", "42.0 kcal/mol"},
	"electronic-degeneracy-huge":        {"molecules.ring.electronic[0].degeneracy", "100000"},
	"electronic-level-above-ionization": {"molecules.ring.electronic[1].energy", "30 eV"},
	"electronic-level-absurd":           {"molecules.ring.electronic[1].energy", "1e19 cm-1"},
	"fit-escape-cell":                   {"column 3 (k/cm3/mol/s)", "\u001b[2Jfast"},
	"fit-escape-header":                 {"column 2", "P/\u001b[31matm"},
	"fit-long-cell":                     {"column 3 (k/cm3/mol/s)", "888888888888888888888888888888888888888888888888888888888888"},
	"imaginary-frequency-huge":          {"molecules.ring-TS.imaginary-frequency", "1e6 cm-1"},
	"lennard-jones-epsilon-huge":        {"molecules.ring.lennard-jones.epsilon", "400 kcal/mol"},
	"lennard-jones-epsilon-tiny":        {"molecules.ring.lennard-jones.epsilon", "1e-300 K"},
	"lennard-jones-sigma-unit-slip":     {"molecules.ring.lennard-jones.sigma", "500 angstrom"},
	"linear-symmetry-three":             {"molecules.ring.rotation.symmetry", "3"},
	"mass-tiny":                         {"molecules.ring.mass", "1e-300 amu"},
	"name-dot":                          {"molecules.ring.mass", "ring.mass"},
	"name-escape":                       {"molecules.ring-TS", "ring-TS\u001b[31m"},
	"name-leading-star":                 {"reaction.products[1]", "*frag-b"},
	"name-line-separator":               {"reaction.competing[0].name", "open\u2028ring"},
	"name-next-line":                    {"molecules.ring\\u0085TS", "ring\u0085TS"},
	"name-space-in-product":             {"reaction.products[1]", "frag b"},
	"name-trailing-colon":               {"molecules.ring-TS:", "ring-TS:"},
	"name-vertical-tab":                 {"reaction.products[1]", "frag\u000bb"},
	"optical-isomers-huge":              {"molecules.ring.optical-isomers", "1000"},
	"path-degeneracy-huge":              {"reaction.path-degeneracy", "1e308"},
	"pressure-too-high":                 {"grid.pressures.to", "1e9 bar"},
	"reaction-energy-absurd":            {"reaction.reaction-energy", "1e6 kcal/mol"},
	"rotational-constant-in-mhz":        {"molecules.ring.rotation.constants.values[0]", "10493"},
	"same-ts-twice":                     {"reaction.competing[0].via", "ring-TS"},
	"symmetry-huge":                     {"molecules.ring.rotation.symmetry", "1000"},
	"temperature-too-high":              {"grid.temperatures.to", "1e7 K"},
	"temperature-too-low-for-barrier":   {"grid.temperatures.from", "10 K"},
	"title-control-character":           {"title", "Ring \u001b[2Jopening of an invented cyclic molecule (demo data, invented)"},
	"title-line-break":                  {"title", "Ring opening of an invented cyclic molecule\n(demo data, invented)\n"},
	"torsion-barrier-huge":              {"molecules.ring.torsions[0].barrier-height", "1e10 cm-1"},
	"torsion-barrier-unit-slip":         {"molecules.ring.torsions[0].barrier-height", "1000 kcal/mol"},
	"torsion-basis-too-large":           {"molecules.ring.torsions[0]", ""},
	"torsion-harmonic-huge":             {"molecules.ring.torsions[0].harmonics.values[1]", "1e20"},
	"torsion-harmonics-too-many":        {"molecules.ring.torsions[0].harmonics.values", ""},
	"torsion-moment-huge":               {"molecules.ring.torsions[0].reduced-moment", "1e5 amu angstrom2"},
	"torsion-periodicity-huge":          {"molecules.ring.torsions[0].periodicity", "100000"},
	"ts-energy-below-grain":             {"molecules.ring-TS.energy", "100 cm-1"},
	"ts-energy-zero":                    {"molecules.ring-TS.energy", "0 kcal/mol"},
	"vibration-absurd":                  {"molecules.ring.vibrations.values[17]", "1e19"},
	"vibration-in-wrong-unit":           {"molecules.ring.vibrations.values[0]", "3010"},
}

// errorLines returns the lines of stderr that are not warnings.
func errorLines(stderr string) []string {
	var out []string
	for _, l := range strings.Split(strings.TrimRight(stderr, "\n"), "\n") {
		if l != "" && !strings.HasPrefix(l, "warning:") {
			out = append(out, l)
		}
	}
	return out
}

// TestBadInputCatalogue runs every file of testdata/bad/ through its verb
// (check for inputs, fit for tables): each must exit 1 with one line on
// stderr, warnings aside, that names the file, the field and the value and
// equals the golden message testdata/bad/NAME.golden (rewritten by
// -update). Every input is also run through rates, which must refuse it with
// the same line before doing any work: nothing on stdout, nothing written.
func TestBadInputCatalogue(t *testing.T) {
	t.Chdir("../..") // messages name the files as from the repository root
	var files []string
	for _, pattern := range []string{"testdata/bad/*.yaml", "testdata/bad/*.csv"} {
		m, err := filepath.Glob(pattern)
		if err != nil {
			t.Fatal(err)
		}
		files = append(files, m...)
	}
	if len(files) < minCatalogue {
		t.Fatalf("%d cases in testdata/bad, want at least %d", len(files), minCatalogue)
	}
	var names []string
	for _, f := range files {
		names = append(names, strings.TrimSuffix(filepath.Base(f), filepath.Ext(f)))
	}
	for name := range catalogue {
		if !slices.Contains(names, name) {
			t.Errorf("%s is in the catalogue table but not in testdata/bad", name)
		}
	}

	for i, path := range files {
		name := names[i]
		t.Run(name, func(t *testing.T) {
			want, ok := catalogue[name]
			if !ok {
				t.Fatalf("testdata/bad/%s has no entry in the catalogue table (give its field and value)", filepath.Base(path))
			}
			verb := "check"
			if filepath.Ext(path) == ".csv" {
				verb = "fit"
			}
			code, out, errs := runCLI(t, verb, path)
			lines := errorLines(errs)
			if code != exitInput || len(lines) != 1 || out != "" {
				t.Fatalf("%s: exit %d (want %d), stdout %q, stderr %q (want one line)", verb, code, exitInput, out, errs)
			}
			line := lines[0]
			if !strings.Contains(line, path) {
				t.Errorf("the message does not name the file %s: %s", path, line)
			}
			if !strings.Contains(line, want.field) {
				t.Errorf("the message does not name the field %s: %s", want.field, line)
			}
			if want.value != "" && !strings.Contains(line, strconv.Quote(want.value)) {
				t.Errorf("the message does not quote the value %q: %s", want.value, line)
			}
			goldenLine(t, strings.TrimSuffix(path, filepath.Ext(path))+".golden", line)

			if verb != "check" {
				return
			}
			dir := t.TempDir()
			code, out, errs = runCLI(t, "rates", path, "--out", dir)
			if got := errorLines(errs); code != exitInput || len(got) != 1 || got[0] != line || out != "" {
				t.Errorf("rates: exit %d, stdout %q, stderr %q; want exit 1 and the line of check", code, out, errs)
			}
			if entries, err := os.ReadDir(dir); err != nil || len(entries) > 0 {
				t.Errorf("rates wrote into --out before refusing the input: %v %v", entries, err)
			}
		})
	}
}

// goldenLine compares a one-line message with the golden file at path, or
// rewrites it under -update.
func goldenLine(t *testing.T, path, line string) {
	t.Helper()
	if *update {
		if err := os.WriteFile(path, []byte(line+"\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./cmd/falloff -update to create it)", err)
	}
	if line != strings.TrimSuffix(string(want), "\n") {
		t.Errorf("message differs from %s; run with -update and review the diff\ngot:  %s\nwant: %s", path, line, want)
	}
}

// The base of the catalogue is valid and quiet, so that each file's one
// defect is the only problem in it. Repeated frequency values are
// degenerate modes, not duplicates: they are accepted (HCN's bend is
// doubly degenerate, 713 cm-1 twice, in testdata/hcn-isomerization.yaml).
func TestDegenerateFrequenciesAccepted(t *testing.T) {
	base := "../../testdata/catalogue-base.yaml"
	code, _, errs := runCLI(t, "check", base)
	if code != exitOK || errs != "" {
		t.Fatalf("check %s: exit %d, stderr %q", base, code, errs)
	}
	text, err := os.ReadFile(base)
	if err != nil {
		t.Fatal(err)
	}
	degenerate := filepath.Join(t.TempDir(), "degenerate.yaml")
	// Two modes of the reactant at 1450 cm-1 and two of the TS at 1430.
	s := strings.Replace(string(text), "1480, 1450,", "1450, 1450,", 1)
	s = strings.Replace(s, "1470, 1430,", "1430, 1430,", 1)
	if s == string(text) {
		t.Fatal("the edits did not apply")
	}
	if err := os.WriteFile(degenerate, []byte(s), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{degenerate, hcnFile} {
		if code, _, errs := runCLI(t, "check", f); code != exitOK || errs != "" {
			t.Errorf("check %s: exit %d, stderr %q", f, code, errs)
		}
	}
}

// fit --forms "" names no form: a usage error in one line that lists the
// forms, not the "%!w(<nil>)" of a wrapped nil error.
func TestFitFormsEmpty(t *testing.T) {
	table := "../../testdata/bad/fit-nan-k.csv"
	for _, forms := range []string{"", ","} {
		code, out, errs := runCLI(t, "fit", table, "--forms", forms)
		lines := errorLines(errs)
		if code != exitUsage || out != "" || len(lines) != 1 || strings.Contains(errs, "%!") || !strings.Contains(errs, "troe") {
			t.Errorf("--forms %q: exit %d, stdout %q, stderr %q; want exit %d and one line listing the forms", forms, code, out, errs, exitUsage)
		}
	}
}
