package qcread

import (
	"bytes"
	"context"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Tolerances of the NWChem tests, from the digits NWChem prints.
const (
	// nwFreqTol (cm⁻¹): P.Frequency rows print 2 decimals, the projected
	// infrared table 3 decimals of the same numbers (±0.005 + ±0.0005).
	nwFreqTol = 0.0055
	// nwPosTol (bohr): the Atom information table prints 8 significant
	// digits of bohr (≤ 5e-8 bohr for |x| < 10 bohr), the Å geometry 8
	// decimals (±5e-9 Å ≈ 1e-8 bohr).
	nwPosTol = 5e-8 + 1e-8
	// nwEnergyTol (E_h): the optimiser's "@" lines print 8 decimals; the
	// SCF at the same geometry reconverged in the frequency task moved the
	// energy by 3e-11 in these runs.
	nwEnergyTol = 5e-9 + 1e-9
	// nwDFTEnergyTol (E_h): for DFT the frequency task switches the
	// integration grid from medium to fine and tightens the convergence
	// (printed in hcn.out), which moved the B3LYP energy of HCN by 4.3e-7
	// E_h at the same geometry.
	nwDFTEnergyTol = 1e-6
	// nwZPETol (E_h): the zero-point correction prints 6 decimals of au
	// (±5e-7); ½Σν from frequencies rounded to 2 decimals moves by up to
	// 0.0025 cm⁻¹ per mode (1.2e-8 E_h each, at most 6 modes here).
	nwZPETol = 5e-7 + 6*1.2e-8
	// nwRotRelTol and nwRotAbsTol (cm⁻¹): after putting NWChem's own
	// constants into ours (nwRotFactor), what remains is the printing (6
	// decimals, ±5e-7 cm⁻¹), the geometry's 8 significant digits (≤ 1e-7
	// relative in the moments) and NWChem's masses printed to 8 digits
	// (15.994910 for ¹⁶O, 3e-7 relative).
	nwRotRelTol = 1e-6
	nwRotAbsTol = 5e-7
)

// NWChem's constants in src/vib/vib_wrtfreq.F (NWChem 7.0.2): single
// precision literals h = 6.626e-27 erg s, c = 2.998e10 cm/s, k = 1.3807e-16
// erg/K, R = 1.9863 cal/(mol K), 1 E_h = 627.5093314 kcal/mol, and the
// double 4.6497791e-41 g cm² per amu bohr².
var (
	nwH     = float64(float32(6.626e-27))
	nwC     = float64(float32(2.998e+10))
	nwK     = float64(float32(1.3807e-16))
	nwRgas  = 1.9863e-3 / 627.5093314 // E_h/K
	nwFconv = 4.6497791e-41
)

// nwZeroPoint is NWChem's zero-point correction (E_h) from frequencies in
// cm⁻¹: Σ ½ θ_v R over ν > 0.1 cm⁻¹ with θ_v = ν hc/k (vib_wrtfreq.F).
func nwZeroPoint(freqs []float64) float64 {
	z := 0.0
	for _, v := range freqs {
		if v > 0.1 {
			z += 0.5 * v * (nwH * nwC / nwK)
		}
	}
	return z * nwRgas
}

// nwRotFactor is NWChem's rotational constant over ours for the same
// moments: B = h/(8π²c) / (I fconv) with I in amu bohr² (vib_wrtfreq.F),
// against units.RotConstFromInertia / I with I in amu Å² (CODATA 2018).
var nwRotFactor = nwH / (8 * math.Pi * math.Pi * nwC) / nwFconv * BohrAngstrom * BohrAngstrom / units.RotConstFromInertia

type nwCase struct {
	file, program, method string
	linear                bool
	imaginary             int
	// geomFile holds the optimisation whose final geometry and energy the
	// frequencies must be at (the same file, or water.out for the
	// frequency-only run at that geometry).
	geomFile string
}

var nwCases = []nwCase{
	{"water.out", "NWChem 7.0.2", "RHF/6-31G*", false, 0, "water.out"},
	{"water_freq_only.out", "NWChem 7.0.2", "RHF/6-31G*", false, 0, "water.out"},
	{"hcn.out", "NWChem 7.0.2", "B3LYP/6-31G*", true, 0, "hcn.out"},
	{"nh3_ts.out", "NWChem 7.0.2", "RHF/6-31G*", false, 1, "nh3_ts.out"},
}

func nwPath(file string) string { return filepath.Join("testdata", "nwchem", file) }

// TestReadNWChem reads the recorded NWChem outputs (testdata/nwchem/
// README.md) and compares what the reader returns with what NWChem printed
// elsewhere in the same files.
func TestReadNWChem(t *testing.T) {
	for _, tc := range nwCases {
		t.Run(tc.file, func(t *testing.T) {
			f, err := ReadNWChemFile(nwPath(tc.file))
			if err != nil {
				t.Fatal(err)
			}
			wantDropped := 6
			if tc.linear {
				wantDropped = 5
			}
			if f.Program != tc.program || f.Method != tc.method || f.Linear != tc.linear || len(f.Imaginary) != tc.imaginary || len(f.Dropped) != wantDropped {
				t.Errorf("program %q, method %q, linear %v, %d imaginary, dropped %v; want %q, %q, %v, %d, %d",
					f.Program, f.Method, f.Linear, len(f.Imaginary), f.Dropped, tc.program, tc.method, tc.linear, tc.imaginary, wantDropped)
			}
			text := p4Read(t, nwPath(tc.file))
			nwCheckPrinted(t, f, text)

			// Geometry: the bohr table of the frequency task against the
			// last Å geometry NWChem printed before the task, both in bohr:
			// the reader converts with a0 (CODATA 2018), NWChem prints Å
			// with its own factor ("scale by 1.889725989 to convert to
			// a.u."), 7e-8 relative apart.
			want, toBohr := nwLastGeometry(t, text)
			if len(want) != len(f.Atoms) {
				t.Fatalf("%d atoms, NWChem's last geometry has %d", len(f.Atoms), len(want))
			}
			for i, a := range f.Atoms {
				for k := range 3 {
					if d := a.X[k]/BohrAngstrom - want[i].X[k]*toBohr; a.Symbol != want[i].Symbol || math.Abs(d) > nwPosTol {
						t.Errorf("atom %d: %v, want %v Å × %v (±%g bohr)", i+1, a, want[i], toBohr, nwPosTol)
					}
				}
			}

			// Energy: that of the optimisation's last step at this geometry.
			e := nwLastStepEnergy(t, p4Read(t, nwPath(tc.geomFile)))
			tol := nwEnergyTol
			if strings.HasPrefix(tc.method, "B3LYP") {
				tol = nwDFTEnergyTol
			}
			if !f.HasEnergy || math.Abs(f.Energy-e) > tol {
				t.Errorf("energy %.12f E_h (has %v), last optimisation step %.8f (±%g)", f.Energy, f.HasEnergy, e, tol)
			}
			t.Logf("energy − last optimisation step = %.1e E_h", f.Energy-e)
		})
	}
}

// nwCheckPrinted compares f, read from the NWChem output text, with the
// projected infrared table (3 decimals) and with NWChem's own zero-point
// correction and rotational constants.
func nwCheckPrinted(t *testing.T, f *Frequencies, text string) {
	t.Helper()
	var listed []float64
	for _, v := range nwIRTable(t, text) {
		if math.Abs(v) > 10 {
			listed = append(listed, v)
		}
	}
	var ours []float64
	ours = append(ours, f.Vibrations...)
	for _, v := range f.Imaginary {
		ours = append(ours, -v)
	}
	slices.Sort(listed)
	slices.Sort(ours)
	if len(listed) != len(ours) {
		t.Fatalf("frequencies %v, NWChem's projected IR table %v", ours, listed)
	}
	for i := range ours {
		if math.Abs(ours[i]-listed[i]) > nwFreqTol {
			t.Errorf("frequency %v cm⁻¹, NWChem's table %v", ours[i], listed[i])
		}
	}
	for _, v := range f.Dropped {
		if math.Abs(v) > 0.005 {
			t.Errorf("dropped mode %v cm⁻¹: NWChem projects them to 0.00", v)
		}
	}

	// Zero point: NWChem's formula and constants on our frequencies.
	zNW := nwZeroPoint(f.Vibrations)
	if f.Printed.ZeroPoint == 0 || math.Abs(zNW-f.Printed.ZeroPoint) > nwZPETol {
		t.Errorf("zero point with NWChem's constants %.8f E_h, printed %.6f (±%g)", zNW, f.Printed.ZeroPoint, nwZPETol)
	}
	z := 0.0
	for _, v := range f.Vibrations {
		z += v / 2
	}
	z /= units.HartreeCm1
	t.Logf("zero point: NWChem-constants − printed = %.1e E_h; ½Σν (CODATA) / printed − 1 = %.2e", zNW-f.Printed.ZeroPoint, z/f.Printed.ZeroPoint-1)

	g, err := Analyse(f.Atoms)
	if err != nil {
		t.Fatal(err)
	}
	if len(g.Constants) != len(f.Printed.Constants) {
		t.Fatalf("rotational constants %v, NWChem printed %v", g.Constants, f.Printed.Constants)
	}
	for i, c := range g.Constants {
		p := f.Printed.Constants[i]
		if math.Abs(c*nwRotFactor-p) > nwRotAbsTol+nwRotRelTol*p {
			t.Errorf("rotational constant %d: ours %.7f cm⁻¹ (×%.7f for NWChem's constants), NWChem %.6f", i, c, nwRotFactor, p)
		}
		t.Logf("rotational constant %d: ours/NWChem − 1 = %.1e raw, %.1e with NWChem's constants", i, c/p-1, c*nwRotFactor/p-1)
	}
}

// nwIRTable parses the mode column of NWChem's "Projected Infra Red
// Intensities" table (rows "k  ν || …").
func nwIRTable(t *testing.T, text string) []float64 {
	t.Helper()
	k := strings.Index(text, "Projected Infra Red Intensities")
	if k < 0 {
		t.Fatal("no projected infrared table")
	}
	var out []float64
	for l := range strings.Lines(text[k:]) {
		f := strings.Fields(l)
		if len(f) >= 3 && f[2] == "||" {
			if _, err := strconv.Atoi(f[0]); err != nil {
				continue
			}
			v, err := strconv.ParseFloat(f[1], 64)
			if err != nil {
				t.Fatal(err)
			}
			out = append(out, v)
		} else if len(out) > 0 {
			break
		}
	}
	return out
}

// nwLastGeometry parses the last "Output coordinates in angstroms (scale
// by s to convert to a.u.)" block before the frequency task (rows: number,
// tag, charge, x, y, z) and returns it with s.
func nwLastGeometry(t *testing.T, text string) ([]Atom, float64) {
	t.Helper()
	text = text[:strings.Index(text, nwchemFreqHeader)]
	k := strings.LastIndex(text, "Output coordinates in angstroms (scale by")
	if k < 0 {
		t.Fatal("no Å geometry before the frequency task")
	}
	scale, err := strconv.ParseFloat(strings.Fields(text[k+len("Output coordinates in angstroms (scale by"):])[0], 64)
	if err != nil {
		t.Fatal(err)
	}
	var atoms []Atom
	for l := range strings.Lines(text[k:]) {
		f := strings.Fields(l)
		if len(f) != 6 {
			if len(atoms) > 0 {
				break
			}
			continue
		}
		if _, err := strconv.Atoi(f[0]); err != nil {
			continue
		}
		a := Atom{Symbol: f[1]}
		for j := range 3 {
			v, err := strconv.ParseFloat(f[3+j], 64)
			if err != nil {
				t.Fatal(err)
			}
			a.X[j] = v
		}
		atoms = append(atoms, a)
	}
	return atoms, scale
}

// nwLastStepEnergy returns the energy of the last "@ step energy …" line
// of the geometry optimisation in text.
func nwLastStepEnergy(t *testing.T, text string) float64 {
	t.Helper()
	e := math.NaN()
	for l := range strings.Lines(text) {
		f := strings.Fields(l)
		if len(f) > 2 && f[0] == "@" {
			if _, err := strconv.Atoi(f[1]); err == nil {
				if v, err := strconv.ParseFloat(f[2], 64); err == nil {
					e = v
				}
			}
		}
	}
	if math.IsNaN(e) {
		t.Fatal("no optimisation step energy")
	}
	return e
}

// TestReadNWChemRefuses checks that broken or unusable outputs give one
// *ReadError line naming the file and the problem, and no result. The
// recorded ones are real NWChem runs (or, for *_truncated, a real output
// cut short; testdata/nwchem/README.md); the others are edits of a real
// output made here, named after the edit.
func TestReadNWChemRefuses(t *testing.T) {
	good := p4Read(t, nwPath("water_freq_only.out"))
	cut := func(s, from string) string { return s[:strings.Index(s, from)] }
	cases := []refusal{
		{"water_opt_fail.out", "", "NWChem stopped with an error: scf optimize failed"},
		{"water_opt_ignored.out", "", "a task failed and the run went on (!! warning: scf optimize failed)"},
		{"water_freq_only_truncated.out", "", "no closing \"Total times\" line"},
		{"water_two_freqs.out", "", "2 frequency tasks"},
		{"no-freq-task", cut(good, nwchemFreqHeader) + " Total times  cpu:        0.5s     wall:        0.7s\n", "no frequency task"},
		{"cut-before-freq-task", cut(good, nwchemFreqHeader), "the output is truncated"},
		{"deuterium-mass", strings.Replace(good, "-8.6686726D-01  1.0078250D+00", "-8.6686726D-01  2.0141018D+00", 1), "has mass 2.014102 u, not the most abundant isotope's 1.007825 u"},
		{"missing-coordinate-row", p4DropLine(good, "P.Frequency", "9 "), "projected normal modes have 8 coordinate rows, but 3 atoms need 9"},
		{"nan-frequency", strings.Replace(good, "P.Frequency     1826.55", "P.Frequency     NaN    ", 1), "\"NaN\" is not a finite number"},
		{"not-nwchem", p4Read(t, p4Path("water.out")), "no NWChem banner"},
		{"empty", "", "no NWChem banner"},
	}
	checkRefusals(t, cases, nwPath, ReadNWChemFile, ReadNWChem)
}

// TestReadNWChemLive reruns testdata/nwchem/water_freq_only.nw (HF/6-31G*
// water, about 1 s) in a temporary directory and checks the reader on the
// fresh output against NWChem's printed values and the recorded run.
func TestReadNWChemLive(t *testing.T) {
	nwchem := p4LiveProgram(t, "nwchem")
	dir := t.TempDir()
	in, err := os.ReadFile(nwPath("water_freq_only.nw"))
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "water_freq_only.nw"), in, 0o644); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithTimeout(t.Context(), 60*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, nwchem, "water_freq_only.nw")
	cmd.Dir = dir
	cmd.Env = append(os.Environ(), "OMP_NUM_THREADS=1")
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("nwchem: %v\n%s", err, stderr.String())
	}
	f, err := ReadNWChem(bytes.NewReader(stdout.Bytes()), "live water_freq_only.out")
	if err != nil {
		t.Fatal(err)
	}
	nwCheckPrinted(t, f, stdout.String())
	rec, err := ReadNWChemFile(nwPath("water_freq_only.out"))
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(f.Vibrations, rec.Vibrations) || math.Abs(f.Energy-rec.Energy) > 1e-9 {
		// The same input on the same program: the printed 2 decimals and
		// the energy to 1e-9 E_h (its SCF convergence) agree.
		t.Errorf("vibrations %v, energy %.12f; recorded run %v, %.12f", f.Vibrations, f.Energy, rec.Vibrations, rec.Energy)
	}
}

// FuzzReadNWChem feeds mutated recorded outputs to ReadNWChem: it must
// return either a one-line *ReadError or a result with finite numbers,
// never panic.
func FuzzReadNWChem(f *testing.F) {
	files, _ := filepath.Glob(filepath.Join("testdata", "nwchem", "*.out"))
	for _, p := range files {
		f.Add(p4Read(f, p))
	}
	f.Fuzz(func(t *testing.T, text string) {
		fr, err := ReadNWChem(strings.NewReader(text), "fuzz.out")
		p4CheckFuzzResult(t, fr, err)
	})
}

// The spin multiplicity is the one NWChem prints: "open shells = 0" from
// the SCF module (water, NH3, HF), "Spin multiplicity: 1" from DFT (HCN).
func TestReadNWChemMultiplicity(t *testing.T) {
	for _, f := range []string{"water.out", "hcn.out", "nh3_ts.out"} {
		d, err := ReadNWChemFile("testdata/nwchem/" + f)
		if err != nil {
			t.Fatal(err)
		}
		if d.Multiplicity != 1 {
			t.Errorf("%s: multiplicity %d, want 1", f, d.Multiplicity)
		}
	}
}
