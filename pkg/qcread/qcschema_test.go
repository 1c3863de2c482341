package qcread

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"
)

// qhReadJSON decodes a JSON file into generic maps, for the tests' own
// look at recorded files.
func qhReadJSON(t testing.TB, path string) map[string]any {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var doc map[string]any
	if err := json.Unmarshal(data, &doc); err != nil {
		t.Fatal(err)
	}
	return doc
}

// qhPsi4Printed returns the harmonic frequencies (cm⁻¹, imaginary ones
// negative) in the "Freq [cm^-1]" rows that Psi4's frequency() prints
// after "==> Harmonic Vibrational Analysis <==" (translations and rotations
// are not in these rows), and the last "@RHF Final Energy" (E_h).
func qhPsi4Printed(text string) (freqs []float64, energy float64, err error) {
	start := strings.LastIndex(text, "==> Harmonic Vibrational Analysis <==")
	if start < 0 {
		return nil, 0, errors.New("no Harmonic Vibrational Analysis section")
	}
	for _, line := range strings.Split(text[start:], "\n") {
		rest, ok := strings.CutPrefix(strings.TrimSpace(line), "Freq [cm^-1]")
		if !ok {
			continue
		}
		for _, f := range strings.Fields(rest) {
			sign := 1.0
			if s, imag := strings.CutSuffix(f, "i"); imag {
				f, sign = s, -1
			}
			v, err := strconv.ParseFloat(f, 64)
			if err != nil {
				return nil, 0, fmt.Errorf("frequency %q: %v", f, err)
			}
			freqs = append(freqs, sign*v)
		}
	}
	i := strings.LastIndex(text, "@RHF Final Energy:")
	if i < 0 {
		return nil, 0, errors.New("no @RHF Final Energy")
	}
	f := strings.Fields(text[i+len("@RHF Final Energy:"):])
	if len(f) == 0 {
		return nil, 0, errors.New("no number after @RHF Final Energy")
	}
	energy, err = strconv.ParseFloat(f[0], 64)
	return freqs, energy, err
}

// qhSigned lists a reading's frequencies as one ascending list, imaginary
// ones negative.
func qhSigned(f *Frequencies) []float64 {
	var out []float64
	for i := len(f.Imaginary) - 1; i >= 0; i-- {
		out = append(out, -f.Imaginary[i])
	}
	return append(out, f.Vibrations...)
}

// psi4FreqTolCm1 is how closely our frequencies from the Hessian in Psi4's
// QCSchema file must match the frequencies Psi4's frequency() prints for
// the same geometry and level. Psi4 prints 4 decimals (±5e-5 cm⁻¹); its
// vibrational analysis uses CODATA 2014 constants (through QCElemental),
// whose conversion factor differs from CODATA 2018's by ~1e-9 relative
// (4e-6 cm⁻¹ at 4000 cm⁻¹); the two runs' Hessians agree to their SCF and
// CPHF convergence. Measured deviations are 5e-5 cm⁻¹, the print rounding;
// 1e-3 cm⁻¹ leaves a 20-fold margin while a wrong mass or a missed
// projection would shift frequencies by far more than 1 cm⁻¹.
const psi4FreqTolCm1 = 1e-3

// TestReadQCSchemaPsi4 reads the QCSchema Hessian results that Psi4 1.3.2
// wrote (testdata/qcschema/README.md) and checks the frequencies computed
// from them against those Psi4's own frequency() printed for the same
// geometry and level (files *_freq.out), the energy against the printed
// "@RHF Final Energy" (1e-9 E_h: both runs converge to 1e-10 E_h), and the
// geometry against the symmetry numbers of the point groups (C2v σ = 2,
// D3h σ = 6; Fernández-Ramos et al., Theor. Chem. Acc. 118, 813, 2007,
// Table 1).
func TestReadQCSchemaPsi4(t *testing.T) {
	const energyTol = 1e-9 // E_h
	cases := []struct {
		json, out string
		nImag     int
		sigma     int
	}{
		{"water_hessian.json", "water_freq.out", 0, 2},
		{"nh3_hessian.json", "nh3_freq.out", 1, 6}, // planar NH3: the umbrella mode is imaginary
	}
	for _, tc := range cases {
		t.Run(tc.json, func(t *testing.T) {
			f, err := ReadQCSchemaFile(filepath.Join("testdata", "qcschema", tc.json))
			if err != nil {
				t.Fatal(err)
			}
			text, err := os.ReadFile(filepath.Join("testdata", "qcschema", tc.out))
			if err != nil {
				t.Fatal(err)
			}
			want, energy, err := qhPsi4Printed(string(text))
			if err != nil {
				t.Fatal(err)
			}
			got := qhSigned(f)
			if len(got) != len(want) || len(f.Imaginary) != tc.nImag {
				t.Fatalf("frequencies %v, want Psi4's %v with %d imaginary", got, want, tc.nImag)
			}
			worst := 0.0
			for i := range want {
				d := math.Abs(got[i] - want[i])
				worst = math.Max(worst, d)
				if d > psi4FreqTolCm1 {
					t.Errorf("ν[%d] = %.5f cm⁻¹, Psi4 printed %.4f", i, got[i], want[i])
				}
			}
			t.Logf("largest |ν − ν(Psi4)| = %.2g cm⁻¹", worst)
			if !f.HasEnergy || math.Abs(f.Energy-energy) > energyTol {
				t.Errorf("energy %.12f E_h (has %v), Psi4 printed %.12f", f.Energy, f.HasEnergy, energy)
			}
			if f.Program != "Psi4 1.3.2" || f.Method != "hf/6-31G*" || f.Linear {
				t.Errorf("program %q, method %q, linear %v", f.Program, f.Method, f.Linear)
			}
			g, err := Analyse(f.Atoms)
			if err != nil {
				t.Fatal(err)
			}
			if g.Symmetry != tc.sigma {
				t.Errorf("σ = %d (%s), want %d", g.Symmetry, g.PointGroup, tc.sigma)
			}
		})
	}
}

// qhMutate decodes the recorded water result, applies edit, and encodes
// it again: the labelled broken copies of the refusal tests.
func qhMutate(t *testing.T, edit func(doc map[string]any)) string {
	t.Helper()
	doc := qhReadJSON(t, filepath.Join("testdata", "qcschema", "water_hessian.json"))
	edit(doc)
	data, err := json.Marshal(doc)
	if err != nil {
		t.Fatal(err)
	}
	return string(data)
}

// TestReadQCSchemaRefuses checks that every broken or unsuitable file
// gives one *ReadError line naming the file and the problem, and no result.
func TestReadQCSchemaRefuses(t *testing.T) {
	mol := func(doc map[string]any) map[string]any { return doc["molecule"].(map[string]any) }
	cases := []struct {
		name string
		text string // "" reads testdata/qcschema/<name>
		want string
	}{
		{"water_hessian_truncated.json", "", "not valid JSON: unexpected end of JSON input"},
		{"water_scf_failed.json", "", "the calculation failed (success: false): SCFConvergenceError: psi4.driver.p4util.exceptions.SCFConvergenceError: Could not converge SCF iterations in 3 iterations."},
		{"water_energy.json", "", `driver "energy"`},
		{"hessian-short", qhMutate(t, func(d map[string]any) { r := d["return_result"].([]any); d["return_result"] = r[:len(r)-1] }), "the Hessian has 80 elements, but 3 atoms need (3N)² = 81"},
		{"symbols-geometry", qhMutate(t, func(d map[string]any) { m := mol(d); m["symbols"] = m["symbols"].([]any)[:2] }), "molecule.geometry has 9 coordinates, but molecule.symbols lists 2 atoms"},
		{"geometry-short", qhMutate(t, func(d map[string]any) { m := mol(d); m["geometry"] = m["geometry"].([]any)[:8] }), "molecule.geometry has 8 coordinates"},
		{"no-geometry", qhMutate(t, func(d map[string]any) { delete(mol(d), "geometry") }), "molecule.geometry: missing"},
		{"no-hessian", qhMutate(t, func(d map[string]any) { delete(d, "return_result") }), "no return_result"},
		{"null-in-hessian", qhMutate(t, func(d map[string]any) { d["return_result"].([]any)[5] = nil }), "return_result: element 5 is null"},
		{"nonsymmetric", qhMutate(t, func(d map[string]any) { d["return_result"].([]any)[5] = 0.1 }), "not symmetric"},
		{"deuterium-mass", qhMutate(t, func(d map[string]any) { mol(d)["masses"] = []any{15.99491461957, 2.01410177812, 1.00782503223} }), "isotopologues are not supported yet"},
		{"deuterium-symbol", qhMutate(t, func(d map[string]any) { mol(d)["symbols"] = []any{"O", "D", "H"} }), "isotopologues are not supported yet"},
		{"ghost", qhMutate(t, func(d map[string]any) { mol(d)["real"] = []any{true, true, false} }), "atom 3 is a ghost atom"},
		{"unknown-element", qhMutate(t, func(d map[string]any) { mol(d)["symbols"] = []any{"O", "H", "Xx"} }), `unknown element "Xx"`},
		{"label-not-symbol", qhMutate(t, func(d map[string]any) { mol(d)["symbols"] = []any{"O1", "H", "H"} }), `unknown element "O1"`},
		{"no-success", qhMutate(t, func(d map[string]any) { delete(d, "success") }), "no success field"},
		{"input", qhMutate(t, func(d map[string]any) { d["schema_name"] = "qcschema_input" }), "a QCSchema input"},
		{"other-schema", qhMutate(t, func(d map[string]any) { d["schema_name"] = "qcschema_optimization_output" }), `schema_name "qcschema_optimization_output"`},
		{"nan", strings.Replace(qhMutate(t, func(map[string]any) {}), `"return_result":[`, `"return_result":[NaN, `, 1), "not valid JSON"},
		{"two-documents", qhMutate(t, func(map[string]any) {}) + "\n{}", "not valid JSON"},
		{"array", "[1, 2]", "the document is a JSON array"},
		{"wrong-type", qhMutate(t, func(d map[string]any) { d["driver"] = 3 }), "driver is a JSON number"},
		{"empty", "", "not valid JSON"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var f *Frequencies
			var err error
			switch {
			case strings.HasSuffix(tc.name, ".json"):
				f, err = ReadQCSchemaFile(filepath.Join("testdata", "qcschema", tc.name))
			default:
				f, err = ReadQCSchema(strings.NewReader(tc.text), tc.name)
			}
			var re *ReadError
			if err == nil || !errors.As(err, &re) || f != nil {
				t.Fatalf("got %v, %v; want a *ReadError", f, err)
			}
			msg := err.Error()
			if !strings.Contains(msg, tc.want) || !strings.Contains(msg, tc.name) || strings.Contains(msg, "\n") {
				t.Errorf("error %q: want one line naming %q and containing %q", msg, tc.name, tc.want)
			}
		})
	}
}

// TestReadQCSchemaAccepts checks the documented variants QCElemental
// allows: nested (N×3) geometry and (3N×3N) Hessian, masses with null
// entries or standard values, and a missing schema_name; each must give
// the same frequencies as the recorded file (exactly, as the numbers are
// the same).
func TestReadQCSchemaAccepts(t *testing.T) {
	ref, err := ReadQCSchemaFile(filepath.Join("testdata", "qcschema", "water_hessian.json"))
	if err != nil {
		t.Fatal(err)
	}
	nest := func(flat []any, w int) []any {
		var rows []any
		for i := 0; i < len(flat); i += w {
			rows = append(rows, flat[i:i+w])
		}
		return rows
	}
	mol := func(doc map[string]any) map[string]any { return doc["molecule"].(map[string]any) }
	cases := map[string]func(map[string]any){
		"nested": func(d map[string]any) {
			m := mol(d)
			m["geometry"] = nest(m["geometry"].([]any), 3)
			d["return_result"] = nest(d["return_result"].([]any), 9)
		},
		"masses-null":     func(d map[string]any) { mol(d)["masses"] = []any{nil, nil, nil} },
		"masses-standard": func(d map[string]any) { mol(d)["masses"] = []any{15.99491461957, 1.00782503223, 1.00782503223} },
		"no-schema-name":  func(d map[string]any) { delete(d, "schema_name") },
	}
	for name, edit := range cases {
		t.Run(name, func(t *testing.T) {
			f, err := ReadQCSchema(strings.NewReader(qhMutate(t, edit)), name)
			if err != nil {
				t.Fatal(err)
			}
			got, want := qhSigned(f), qhSigned(ref)
			for i := range want {
				if got[i] != want[i] {
					t.Errorf("ν = %v, want %v", got, want)
					break
				}
			}
		})
	}
}

// TestIsQCSchema checks detection on the recorded files: the QCSchema ones
// (results, a failed run, an energy result) are recognised; Psi4's text
// output and the Molden files are not.
func TestIsQCSchema(t *testing.T) {
	cases := map[string]bool{
		"qcschema/water_hessian.json":           true,
		"qcschema/nh3_hessian.json":             true,
		"qcschema/water_energy.json":            true,
		"qcschema/water_scf_failed.json":        true,
		"qcschema/water_hessian_truncated.json": true,
		"qcschema/water_freq.out":               false,
		"qcschema/nh3_freq.out":                 false,
		"water.molden":                          false,
		"co2.molden":                            false,
	}
	for file, want := range cases {
		data, err := os.ReadFile(filepath.Join("testdata", file))
		if err != nil {
			t.Fatal(err)
		}
		if got := isQCSchema(data[:min(len(data), 64<<10)]); got != want {
			t.Errorf("isQCSchema(%s) = %v, want %v", file, got, want)
		}
	}
	for _, s := range []string{"", "{}", `{"a": 1}`, "[FREQ]\n", `["schema_name", "qcschema_output"]`} {
		if isQCSchema([]byte(s)) {
			t.Errorf("isQCSchema(%q) = true", s)
		}
	}
}

// TestReadQCSchemaLivePsi4 runs Psi4 twice on water HF/6-31G* at the
// recorded optimised geometry: once through its QCSchema runner
// (psi4 --json, driver hessian), once with frequency() in a text input;
// the frequencies computed from the first must match those printed by the
// second within psi4FreqTolCm1. It skips without psi4 unless
// FALLOFF_REQUIRE_QC=1, and in -short (it takes ~5 s).
func TestReadQCSchemaLivePsi4(t *testing.T) {
	if testing.Short() {
		t.Skip("runs Psi4 (~5 s)")
	}
	psi4, err := exec.LookPath("psi4")
	if err != nil {
		if os.Getenv("FALLOFF_REQUIRE_QC") == "1" {
			t.Fatalf("FALLOFF_REQUIRE_QC=1 but psi4 is not on PATH: %v", err)
		}
		t.Skip("psi4 not on PATH")
	}
	dir := t.TempDir()
	rec := qhReadJSON(t, filepath.Join("testdata", "qcschema", "water_hessian.json"))
	m := rec["molecule"].(map[string]any)
	geom := m["geometry"].([]any)
	input := map[string]any{
		"schema_name":    "qcschema_input",
		"schema_version": 1,
		"molecule":       map[string]any{"symbols": m["symbols"], "geometry": geom, "fix_com": true, "fix_orientation": true},
		"driver":         "hessian",
		"model":          map[string]any{"method": "hf", "basis": "6-31G*"},
		"keywords":       map[string]any{"scf_type": "pk", "e_convergence": 1e-10, "d_convergence": 1e-10},
	}
	data, err := json.Marshal(input)
	if err != nil {
		t.Fatal(err)
	}
	jsonPath := filepath.Join(dir, "water.json")
	if err := os.WriteFile(jsonPath, data, 0o644); err != nil {
		t.Fatal(err)
	}
	var freqIn strings.Builder
	freqIn.WriteString("molecule {\n0 1\nunits bohr\nno_com\nno_reorient\n")
	for i, s := range m["symbols"].([]any) {
		fmt.Fprintf(&freqIn, "%s %.12f %.12f %.12f\n", s, geom[3*i].(float64), geom[3*i+1].(float64), geom[3*i+2].(float64))
	}
	freqIn.WriteString("}\nset {\n  basis 6-31G*\n  scf_type pk\n  e_convergence 1e-10\n  d_convergence 1e-10\n}\nfrequency('hf')\n")
	if err := os.WriteFile(filepath.Join(dir, "freq.in"), []byte(freqIn.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	run := func(args ...string) {
		t.Helper()
		cmd := exec.Command(psi4, append([]string{"-n", "1", "-s", dir}, args...)...)
		cmd.Dir = dir
		cmd.Env = append(os.Environ(), "OMP_NUM_THREADS=1", "MKL_NUM_THREADS=1")
		var out bytes.Buffer
		cmd.Stdout, cmd.Stderr = &out, &out
		start := time.Now()
		if err := cmd.Run(); err != nil {
			t.Fatalf("psi4 %v: %v\n%s", args, err, out.String())
		}
		t.Logf("psi4 %v: %.1f s", args, time.Since(start).Seconds())
	}
	run("--json", jsonPath)
	run("-i", "freq.in", "-o", "freq.out")

	f, err := ReadQCSchemaFile(jsonPath)
	if err != nil {
		t.Fatal(err)
	}
	text, err := os.ReadFile(filepath.Join(dir, "freq.out"))
	if err != nil {
		t.Fatal(err)
	}
	want, _, err := qhPsi4Printed(string(text))
	if err != nil {
		t.Fatal(err)
	}
	got := qhSigned(f)
	if len(got) != len(want) {
		t.Fatalf("frequencies %v, Psi4 printed %v", got, want)
	}
	for i := range want {
		if math.Abs(got[i]-want[i]) > psi4FreqTolCm1 {
			t.Errorf("ν[%d] = %.5f cm⁻¹, Psi4 printed %.4f", i, got[i], want[i])
		}
	}
}

// FuzzReadQCSchema feeds the reader mutations of the recorded files: it
// must never panic, and must return either a *ReadError of one line naming
// the file, or frequencies that are finite with the counts the geometry
// asks for.
func FuzzReadQCSchema(f *testing.F) {
	for _, file := range []string{"water_hessian.json", "nh3_hessian.json", "water_energy.json", "water_scf_failed.json", "water_hessian_truncated.json"} {
		data, err := os.ReadFile(filepath.Join("testdata", "qcschema", file))
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	f.Add([]byte(`{"schema_name":"qcschema_output","success":true,"driver":"hessian","molecule":{"symbols":["H","H"],"geometry":[0,0,0,0,0,1.4]},"return_result":[[0,0,0,0,0,0],[0,0,0,0,0,0],[0,0,0.37,0,0,-0.37],[0,0,0,0,0,0],[0,0,0,0,0,0],[0,0,-0.37,0,0,0.37]]}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		res, err := ReadQCSchema(bytes.NewReader(data), "fuzz.json")
		if err != nil {
			var re *ReadError
			msg := err.Error()
			if !errors.As(err, &re) || !strings.HasPrefix(msg, "fuzz.json") || strings.ContainsAny(msg, "\r\n") {
				t.Fatalf("error %q: want a one-line *ReadError naming the file", msg)
			}
			if res != nil {
				t.Fatal("result with an error")
			}
			return
		}
		n := len(res.Atoms)
		want := 3*n - 6
		if res.Linear {
			want = 3*n - 5
		}
		if n == 1 {
			want = 0
		}
		if len(res.Vibrations)+len(res.Imaginary) != want {
			t.Fatalf("%d atoms (linear %v): %d + %d modes", n, res.Linear, len(res.Vibrations), len(res.Imaginary))
		}
		for _, v := range append(append([]float64{res.Energy}, res.Vibrations...), res.Imaginary...) {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("non-finite value %v", v)
			}
		}
	})
}
