package main

import (
	"bytes"
	"encoding/json"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/internal/demo"
	"github.com/falloff-kinetics/falloff/pkg/input"
)

var update = flag.Bool("update", false, "update golden files")

const hcnFile = "../../testdata/hcn-isomerization.yaml"

// runCLI runs the command in-process and returns the exit code and streams.
func runCLI(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, strings.NewReader(""), &out, &errb)
	return code, out.String(), errb.String()
}

// golden compares got with testdata/name, or rewrites it under -update.
// Goldens are reviewed by eye when they change.
func golden(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./cmd/falloff -update to create it)", err)
	}
	if got != string(want) && !sameNumbers(got, string(want)) {
		t.Errorf("%s differs from the golden file; run with -update and review the diff\ngot:\n%s", name, got)
	}
}

// number matches a decimal number as the reports print them.
var number = regexp.MustCompile(`[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?`)

// fitRow matches a row of a fit-error table: its error columns are
// percentages.
var fitRow = regexp.MustCompile(`^\|\s*(arrhenius|lindemann|troe|sri|plog|chebyshev)\s*\|`)

// sameNumbers reports whether got and want differ only in their numbers'
// last digits, line by line with runs of spaces collapsed (a table's
// column widths follow its numbers): every number within 1e-6 relative.
// The band kernels round differently with and without the processor's
// fused multiply-add (pkg/band), which moves the last digits of k
// (1e-15) and, through ill-conditioned fits, fitted parameters (1e-7) and
// fit errors that are pure rounding (1e-12 %): in a fit-error row, two
// percentages both below 1e-9 % (1e-11 relative, below any fit's
// meaning) are equal (common practice, no source).
func sameNumbers(got, want string) bool {
	gl, wl := strings.Split(got, "\n"), strings.Split(want, "\n")
	if len(gl) != len(wl) {
		return false
	}
	for i := range wl {
		g, w := strings.Join(strings.Fields(gl[i]), " "), strings.Join(strings.Fields(wl[i]), " ")
		if number.ReplaceAllString(g, "#") != number.ReplaceAllString(w, "#") {
			return false
		}
		gn, wn := number.FindAllString(g, -1), number.FindAllString(w, -1)
		for k := range wn {
			a, err1 := strconv.ParseFloat(gn[k], 64)
			b, err2 := strconv.ParseFloat(wn[k], 64)
			if err1 != nil || err2 != nil {
				if gn[k] != wn[k] {
					return false
				}
				continue
			}
			if math.Abs(a-b) <= 1e-6*math.Max(math.Abs(a), math.Abs(b)) {
				continue
			}
			if fitRow.MatchString(wl[i]) && math.Abs(a) < 1e-9 && math.Abs(b) < 1e-9 {
				continue
			}
			return false
		}
	}
	return true
}

func TestTerminalReports(t *testing.T) {
	cases := []struct {
		name string
		args []string
	}{
		{"check-demo.txt", []string{"check", "-q"}},
		{"check-hcn.txt", []string{"check", hcnFile}},
		{"states-hcn.txt", []string{"states", "-q", "--step", "4000 cm-1", "--ceiling", "30000 cm-1", hcnFile}},
		{"micro-hcn.txt", []string{"micro", "-q", hcnFile}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runCLI(t, tc.args...)
			if code != exitOK {
				t.Fatalf("exit %d: %s", code, errs)
			}
			golden(t, tc.name, out)
		})
	}
}

// The demo runs without a file and says so on stderr; `example` prints the
// same input, which parses.
func TestDemoAndExample(t *testing.T) {
	code, out, errs := runCLI(t, "example")
	if code != exitOK || out != string(demo.Text) {
		t.Fatalf("example: exit %d, output differs from the demo", code)
	}
	if _, err := input.Parse("example", []byte(out)); err != nil {
		t.Fatal(err)
	}
	code, _, errs = runCLI(t, "check")
	if code != exitOK || !strings.Contains(errs, "built-in demo") {
		t.Errorf("check with no file: exit %d, stderr %q", code, errs)
	}
}

type microJSON struct {
	Channels []struct {
		Name           string    `json:"name"`
		E0             float64   `json:"E0_cm-1"`
		L              float64   `json:"path_degeneracy"`
		Energies       []float64 `json:"energies_cm-1"`
		K              []float64 `json:"k_per_s"`
		Temperatures   []float64 `json:"temperatures_K"`
		KInf           []float64 `json:"k_inf"`
		KInfIntegrated []float64 `json:"k_inf_integrated"`
	} `json:"channels"`
}

// `micro --json` on the demo prints one JSON object whose thermal average of
// k(E) equals canonical TST at every temperature (the TST identity, Holbrook,
// Pilling & Robertson 1996; 1e-3 covers the O((Δ/kT)²) grain error at 300 K).
func TestMicroJSONDemo(t *testing.T) {
	code, out, errs := runCLI(t, "micro", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if errs != "" {
		t.Errorf("--json wrote to stderr: %q", errs)
	}
	var m microJSON
	dec := json.NewDecoder(strings.NewReader(out))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&struct {
		File     string `json:"file"`
		Note     string `json:"note"`
		Caution  string `json:"caution"`
		Channels any    `json:"channels"`
	}{}); err != nil {
		t.Fatalf("not one JSON object with the contract's fields: %v", err)
	}
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatal(err)
	}
	if len(m.Channels) != 1 {
		t.Fatalf("%d channels", len(m.Channels))
	}
	c := m.Channels[0]
	if len(c.Energies) != len(c.K) || len(c.Temperatures) != len(c.KInf) || len(c.KInf) != len(c.KInfIntegrated) {
		t.Fatal("array lengths differ")
	}
	for i, tK := range c.Temperatures {
		if r := c.KInfIntegrated[i] / c.KInf[i]; math.Abs(r-1) > 1e-3 {
			t.Errorf("%v K: <k(E)>/k∞ = %v", tK, r)
		}
	}
	for i, k := range c.K {
		if c.Energies[i] < c.E0 && k != 0 {
			t.Fatalf("k(%v cm-1) = %v below E0 = %v", c.Energies[i], k, c.E0)
		}
		if i > 0 && k < c.K[i-1] {
			// RRKM k(E) of a single channel rises with energy (W‡ grows
			// faster than ρ above threshold: a fact of the theory).
			t.Fatalf("k(E) falls at %v cm-1", c.Energies[i])
		}
	}
}

// `states --json` follows docs/design.md §8: species with partition functions,
// grain, energies, densities and sums. The numbers are compared parsed with a
// golden file to 1e-9 relative (floating-point summation order only).
func TestStatesJSON(t *testing.T) {
	code, out, errs := runCLI(t, "states", "--json", "--ceiling", "20000 cm-1", "--grain", "100 cm-1", hcnFile)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	goldenJSON(t, "states-hcn.json", out, 1e-9)
}

// goldenJSON compares a JSON document with testdata/name value by value,
// numbers within rel relative tolerance.
func goldenJSON(t *testing.T, name, got string, rel float64) {
	t.Helper()
	if *update {
		golden(t, name, got)
		return
	}
	want, err := os.ReadFile(filepath.Join("testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	var g, w any
	if err := json.Unmarshal([]byte(got), &g); err != nil {
		t.Fatalf("output is not JSON: %v", err)
	}
	if err := json.Unmarshal(want, &w); err != nil {
		t.Fatal(err)
	}
	if msg := jsonDiff("", g, w, rel); msg != "" {
		t.Errorf("%s: %s (run with -update and review)", name, msg)
	}
}

func jsonDiff(path string, g, w any, rel float64) string {
	switch wv := w.(type) {
	case float64:
		gv, ok := g.(float64)
		// A fit error in percent below 1e-9 % is rounding (sameNumbers).
		if ok && strings.HasSuffix(path, "_pct") && math.Abs(gv) < 1e-9 && math.Abs(wv) < 1e-9 {
			break
		}
		if !ok || math.Abs(gv-wv) > rel*math.Max(math.Abs(wv), 1e-300) {
			return fmt.Sprintf("%s = %v, golden %v", path, g, wv)
		}
	case []any:
		gv, ok := g.([]any)
		if !ok || len(gv) != len(wv) {
			return fmt.Sprintf("%s: length or type differs", path)
		}
		for i := range wv {
			if m := jsonDiff(fmt.Sprintf("%s[%d]", path, i), gv[i], wv[i], rel); m != "" {
				return m
			}
		}
	case map[string]any:
		gv, ok := g.(map[string]any)
		if !ok || len(gv) != len(wv) {
			return fmt.Sprintf("%s: fields differ", path)
		}
		for k := range wv {
			if m := jsonDiff(path+"."+k, gv[k], wv[k], rel); m != "" {
				return m
			}
		}
	default:
		if g != w {
			return fmt.Sprintf("%s = %v, golden %v", path, g, w)
		}
	}
	return ""
}

func TestExitCodes(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.yaml")
	if err := os.WriteFile(bad, []byte(strings.Replace(string(demo.Text), "energy: 42.0 kcal/mol", "energy: 42.0", 1)), 0o644); err != nil {
		t.Fatal(err)
	}
	checkFailures(t, []failCase{
		{"missing unit", []string{"check", bad}, exitInput, "energy"},
		{"missing file", []string{"micro", filepath.Join(dir, "none.yaml")}, exitInput, "none.yaml"},
		{"unknown verb", []string{"frobnicate"}, exitUsage, "unknown command"},
		{"unknown flag", []string{"micro", "--frob"}, exitUsage, "--frob"},
		{"grain without unit", []string{"micro", "--grain", "10"}, exitUsage, "no unit"},
		{"two files", []string{"states", "a", "b"}, exitUsage, "at most one"},
		{"help", []string{"micro", "--help"}, exitOK, ""},
	})
}

// failCase is a command line that must end with code and one line on
// stderr containing msg.
type failCase struct {
	name string
	args []string
	code int
	msg  string
}

func checkFailures(t *testing.T, cases []failCase) {
	t.Helper()
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			code, _, errs := runCLI(t, tc.args...)
			if code != tc.code || !strings.Contains(errs, tc.msg) || strings.Count(strings.TrimSpace(errs), "\n") > 0 {
				t.Errorf("exit %d (want %d), stderr %q (want one line with %q)", code, tc.code, errs, tc.msg)
			}
		})
	}
}

// Every verb's --help shows a worked example.
func TestHelp(t *testing.T) {
	for _, v := range verbs() {
		code, out, _ := runCLI(t, v.name, "--help")
		if code != exitOK || !strings.Contains(out, "Example:") || !strings.Contains(out, "falloff "+v.name) {
			t.Errorf("%s --help: exit %d, output %q", v.name, code, out)
		}
	}
	if code, out, _ := runCLI(t, "help"); code != exitOK || !strings.Contains(out, "qualified review") {
		t.Errorf("help: exit %d or no caution", code)
	}
}

// For a large molecule at high temperature the thermal distribution peaks
// far above E0; the default ceiling must reach past it, or the thermal
// average of k(E) falls short of canonical TST (the identity of
// TestMicroJSONDemo; 0.5 % covers the grain error). An invented 30-atom
// molecule (84 modes) with a 25 kcal/mol barrier at 2500 K: its mean
// thermal energy, ~50 kcal/mol, lies above E0 + 40 kT.
func TestMicroLargeMolecule(t *testing.T) {
	var vib, tsVib []string
	for i := range 84 {
		v := fmt.Sprintf("%.0f", 150*math.Pow(3200.0/150, float64(i)/83))
		vib = append(vib, v)
		if i != 40 {
			tsVib = append(tsVib, v)
		}
	}
	text := fmt.Sprintf(`title: large invented molecule
molecules:
  big:
    mass: 180 amu
    vibrations: {unit: cm-1, values: [%s]}
    rotation: {constants: {unit: cm-1, values: [0.05, 0.03, 0.02]}, symmetry: 1}
  big-TS:
    energy: 25 kcal/mol
    imaginary-frequency: 800 cm-1
    mass: 180 amu
    vibrations: {unit: cm-1, values: [%s]}
    rotation: {constants: {unit: cm-1, values: [0.045, 0.027, 0.018]}, symmetry: 1}
reaction: {reactant: big, via: big-TS, products: [a, b]}
grid:
  temperatures: {unit: K, values: [1000, 2500]}
energy-grid:
  grain: 50 cm-1
`, strings.Join(vib, ", "), strings.Join(tsVib, ", "))
	path := filepath.Join(t.TempDir(), "big.yaml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCLI(t, "micro", "--json", path)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var m microJSON
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatal(err)
	}
	c := m.Channels[0]
	for i, tK := range c.Temperatures {
		r := c.KInfIntegrated[i] / c.KInf[i]
		t.Logf("%v K: <k(E)>/k∞ − 1 = %.2g", tK, r-1)
		if math.Abs(r-1) > 5e-3 {
			t.Errorf("%v K: <k(E)>/k∞ = %v", tK, r)
		}
	}
}

// A --ceiling whose state count would not fit in memory is refused before
// counting, as a usage error naming the flag, the estimate and a hint.
func TestCeilingFlagTooLarge(t *testing.T) {
	for _, verb := range []string{"states", "micro"} {
		code, _, errs := runCLI(t, verb, "-q", "--grain", "2e4 cm-1", "--ceiling", "1e9 cm-1")
		want := `falloff: --ceiling "1e9 cm-1": the state count would need 1e+09 bins of 1 cm-1, 8 GB of memory; the limit is 400 MB (hint: a ceiling of at most 5e+07 cm-1)` + "\n"
		if code != exitUsage || errs != want {
			t.Errorf("%s: exit %d, stderr %q", verb, code, errs)
		}
	}
}
